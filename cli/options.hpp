#pragma once
/// \file options.hpp
/// Command-line values with a stated range (docs/cli.md, "Ranges"): every numeric option is
/// checked as text before it is converted, so a negative count, a 20-digit seed or a value
/// past the range is refused (exit 2) before any work, naming the option, the value (shortened
/// when long) and the range. The range is also appended to the option's --help text.

#include <cstdint>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>

namespace safesite::cli {

/// Largest seed accepted anywhere (command line and `[uncertainty] seed`): 2^63 − 1, the
/// largest TOML integer, so that every seed can be written in a model file.
inline constexpr std::int64_t k_max_seed = INT64_MAX;

/// The check of a whole number in [lo, hi] written in decimal digits (a leading '-' only
/// when lo < 0), as a CLI11 validator whose message names the value and the range.
CLI::Validator integer_range(std::int64_t lo, std::int64_t hi);
/// The check of a finite decimal number in [lo, hi].
CLI::Validator decimal_range(double lo, double hi);
/// " (an integer from lo to hi)" / " (a number from lo to hi)" for the help text.
std::string range_text(std::int64_t lo, std::int64_t hi);
std::string range_text(double lo, double hi);

/// A whole-number option in [lo, hi]; `target` (any integer type, or std::optional of one,
/// holding every value of the range) receives the value after the check.
template <class T>
CLI::Option* add_integer(CLI::App* cmd, const std::string& name, T& target, std::int64_t lo,
                         std::int64_t hi, const std::string& description) {
    return cmd->add_option(name, target, description + range_text(lo, hi))
        ->check(integer_range(lo, hi));
}
/// A decimal option in [lo, hi].
template <class T>
CLI::Option* add_decimal(CLI::App* cmd, const std::string& name, T& target, double lo,
                         double hi, const std::string& description) {
    return cmd->add_option(name, target, description + range_text(lo, hi))
        ->check(decimal_range(lo, hi));
}

/// The value as quoted in messages: whole when short, else its head, "…" and its length.
std::string shown_value(const std::string& value);

/// For a mistyped option: the verb's option (`--name`) nearest to `given` as
/// "; did you mean '--name'?", or "".
std::string option_hint(const CLI::App& cmd, const std::string& given);

/// The first argument of `args` that looks like a long option (`--name` or `--name=value`)
/// and is not an option of `cmd` (nor --help): the name as typed, or "".
std::string unknown_option(const CLI::App& cmd, const std::vector<std::string>& args);

}  // namespace safesite::cli
