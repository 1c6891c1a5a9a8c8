#pragma once
// Numbers in error messages and written text (private to the library): "%.<digits>g" in the C
// locale, which every safesite program uses, so '.' is the decimal mark.

#include <cstdio>
#include <string>

namespace safesite::core {

/// x with `significant` significant digits (1..17), e.g. number_text(0.1234567, 4) = "0.1235".
inline std::string number_text(double x, int significant) {
    char buffer[48];
    std::snprintf(buffer, sizeof buffer, "%.*g", significant, x);
    return buffer;
}

}  // namespace safesite::core
