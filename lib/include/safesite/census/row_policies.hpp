#pragma once
/// \file row_policies.hpp
/// What to do with two things real censuses hold (docs/methods/census.md, "Row policies"):
/// a plant recorded alive with no size measured, and a tag recorded alive after a row that
/// recorded it dead. Set in the model file's `[census]` table.

#include <optional>
#include <string_view>

namespace safesite::census {

/// `census.alive_without_size`:
/// - keep (default): the row stays an alive record. It counts for survival (the plant is
///   alive at t + 1 whatever its size), for flowering and seeds counted, for recruit counts
///   and for the plants alive per microsite; it has no size, so it is left out of every fit
///   where size at t is a predictor (survival, flowering, seeds with `size` in their formula)
///   and of every fit where its size is the response (growth into that year, recruit size).
///   A warning counts the rows. A flowering plant kept this way needs its seed count (its
///   seeds cannot be predicted from a size it does not have): without one it is an error.
/// - error: the row is an error (`missing_size`).
enum class AliveWithoutSize { keep, error };

/// `census.alive_after_dead`:
/// - error (default): a plant recorded alive after a row recording it dead is an error;
/// - notfound: every dead row followed by an alive row of the same plant is read as
///   "notfound" (the plant was overlooked, or its tag was misread that year); a warning counts
///   the rows so changed.
enum class AliveAfterDead { error, notfound };

/// Model-file spelling: "keep", "error".
std::string_view to_string(AliveWithoutSize p) noexcept;
std::optional<AliveWithoutSize> parse_alive_without_size(std::string_view name) noexcept;
/// Model-file spelling: "error", "notfound".
std::string_view to_string(AliveAfterDead p) noexcept;
std::optional<AliveAfterDead> parse_alive_after_dead(std::string_view name) noexcept;

}  // namespace safesite::census
