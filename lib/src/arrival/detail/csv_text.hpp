#pragma once
// Small helpers shared by the arrival CSV writers (private to lib/src/arrival).

#include <algorithm>
#include <cstdio>
#include <set>
#include <string>
#include <vector>

#include "core/number_text.hpp"
#include "safesite/error.hpp"

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
inline std::string csv_number(double x) { return core::number_text(x, 10); }

/// `"a", "b", "c"` for messages listing admissible labels.
inline std::string quoted_list(const std::vector<std::string>& labels) {
    std::string out;
    for (const auto& l : labels) out += (out.empty() ? "\"" : ", \"") + l + "\"";
    return out;
}

/// Factor levels for a regression table: the labels of `order` that occur in `present`, in
/// that order (the first is the reference level of treatment contrasts; a label without rows
/// would give an all-zero design column). A present label outside `order` is a UsageError
/// naming `what` (e.g. "trapping table: form").
inline std::vector<std::string> ordered_levels(const std::set<std::string>& present,
                                               const std::vector<std::string>& order,
                                               const std::string& what) {
    std::vector<std::string> levels;
    for (const auto& l : order)
        if (present.count(l)) levels.push_back(l);
    for (const auto& l : present)
        if (std::find(levels.begin(), levels.end(), l) == levels.end())
            throw UsageError(what + " \"" + l + "\" is not among " + quoted_list(order));
    return levels;
}

}  // namespace safesite::arrival::detail
