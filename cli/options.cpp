#include "options.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <sstream>
#include <system_error>

#include "safesite/io/near_match.hpp"

namespace safesite::cli {

namespace {

std::string decimal_text(double x) {
    std::ostringstream s;
    s.precision(12);
    s << x;
    return s.str();
}

}  // namespace

std::string shown_value(const std::string& value) {
    // 40 characters show any number in full (a 20-digit seed is 20); longer text is a mistake
    // whose head is enough to recognise it (common practice).
    constexpr std::size_t k_keep = 40;
    if (value.size() <= k_keep) return "'" + value + "'";
    std::size_t cut = 24;
    while (cut > 0 && (static_cast<unsigned char>(value[cut]) & 0xC0) == 0x80) --cut;
    return "'" + value.substr(0, cut) + "…' (" + std::to_string(value.size()) + " characters)";
}

std::string range_text(std::int64_t lo, std::int64_t hi) {
    return " (an integer from " + std::to_string(lo) + " to " + std::to_string(hi) + ")";
}

std::string range_text(double lo, double hi) {
    return " (a number from " + decimal_text(lo) + " to " + decimal_text(hi) + ")";
}

CLI::Validator integer_range(std::int64_t lo, std::int64_t hi) {
    const std::string expected =
        "expected an integer from " + std::to_string(lo) + " to " + std::to_string(hi);
    return CLI::Validator(
        [lo, hi, expected](std::string& text) -> std::string {
            const bool negative = !text.empty() && text[0] == '-';
            const std::size_t digits_from = negative ? 1 : 0;
            const auto first = text.begin() + static_cast<std::ptrdiff_t>(digits_from);
            const bool digits =
                text.size() > digits_from &&
                std::all_of(first, text.end(), [](char c) { return c >= '0' && c <= '9'; });
            if (!digits)
                return "value " + shown_value(text) + " is not a whole number; " + expected;
            std::int64_t v = 0;
            const auto res = std::from_chars(text.data(), text.data() + text.size(), v);
            // Past the 64-bit range (a 20-digit number): out of range whatever the bounds.
            if (res.ec != std::errc() || v < lo || v > hi)
                return "value " + shown_value(text) + " is out of range; " + expected;
            return std::string();
        },
        "", "integer range");
}

CLI::Validator decimal_range(double lo, double hi) {
    const std::string expected =
        "expected a number from " + decimal_text(lo) + " to " + decimal_text(hi);
    return CLI::Validator(
        [lo, hi, expected](std::string& text) -> std::string {
            double v = 0.0;
            const auto res = std::from_chars(text.data(), text.data() + text.size(), v);
            if (text.empty() || res.ec == std::errc::invalid_argument ||
                res.ptr != text.data() + text.size())
                return "value " + shown_value(text) + " is not a number; " + expected;
            if (res.ec != std::errc() || !std::isfinite(v) || v < lo || v > hi)
                return "value " + shown_value(text) + " is out of range; " + expected;
            return std::string();
        },
        "", "number range");
}

std::string option_hint(const CLI::App& cmd, const std::string& given) {
    std::vector<std::string> names;
    for (const CLI::Option* o : cmd.get_options())
        for (const auto& l : o->get_lnames()) names.push_back("--" + l);
    const auto match = io::closest_match(given, names);
    return match ? "; did you mean '" + *match + "'?" : std::string();
}

std::string unknown_option(const CLI::App& cmd, const std::vector<std::string>& args) {
    for (const auto& a : args) {
        if (a.size() < 3 || a.rfind("--", 0) != 0) continue;
        const std::string name = a.substr(0, a.find('='));
        bool known = false;
        for (const CLI::Option* o : cmd.get_options())
            for (const auto& l : o->get_lnames()) known = known || name == "--" + l;
        if (!known) return name;
    }
    return std::string();
}

}  // namespace safesite::cli
