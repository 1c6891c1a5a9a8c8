#pragma once
/// \file missing_row_policy.hpp
/// What to do with a plant that has no row in a year its plot was censused.

#include <optional>
#include <string_view>

namespace safesite::census {

/// - error:    the gap is a data error (the run stops, exit 3);
/// - notfound: the plant is treated as recorded "notfound" that year (a warning), which
///             excludes it from the survival transition into that year.
enum class MissingRowPolicy { error, notfound };

/// Model-file spelling: "error", "notfound".
std::string_view to_string(MissingRowPolicy p) noexcept;
std::optional<MissingRowPolicy> parse_missing_row_policy(std::string_view name) noexcept;

}  // namespace safesite::census
