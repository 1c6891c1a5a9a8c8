#pragma once
// Small helpers shared by the arrival CSV writers (private to lib/src/arrival).

#include <cstdio>
#include <string>

namespace safesite::arrival::detail {

/// A CSV field: quoted (with doubled inner quotes) when it holds a comma, quote or line break
/// (RFC 4180 section 2).
inline std::string csv_field(const std::string& s) {
    if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
    std::string out = "\"";
    for (char c : s) {
        if (c == '"') out += '"';
        out += c;
    }
    return out + "\"";
}

/// A decimal with up to 10 significant digits and '.' as decimal mark ("%.10g" in the C
/// locale, which every safesite program uses).
inline std::string csv_number(double x) {
    char buffer[40];
    std::snprintf(buffer, sizeof buffer, "%.10g", x);
    return buffer;
}

}  // namespace safesite::arrival::detail
