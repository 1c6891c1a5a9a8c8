#pragma once
/// \file near_match.hpp
/// "Did you mean" hints for misspelt keys and labels.

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace safesite::io {

/// Edit distance between two strings: the least number of single-character insertions,
/// deletions, substitutions and swaps of adjacent characters turning `a` into `b` (optimal
/// string alignment distance; Damerau 1964, Levenshtein 1966; see docs/references.md).
/// Cost: O(|a|·|b|) time, three rows of |b| + 1 counters.
std::size_t edit_distance(std::string_view a, std::string_view b);

/// The candidate closest to `word` when it is near enough to be a likely misspelling:
/// distance ≤ max(2, |candidate| / 3) (a common-practice threshold, not from a source), and
/// not equal to `word`. Ties go to the first candidate. Nothing when no candidate is near.
std::optional<std::string> closest_match(std::string_view word,
                                         const std::vector<std::string>& candidates);

/// "; did you mean 'x'?" for the closest match, or "" when there is none.
std::string did_you_mean(std::string_view word, const std::vector<std::string>& candidates);

}  // namespace safesite::io
