#pragma once
/// \file transition_data.hpp
/// The tables the vital-rate regressions see, built from a valid census
/// (docs/methods/census.md, "Transitions" and "Recruits").

#include "safesite/census/census.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::census {

/// The regression tables of a census.
///
/// `transitions`: one row per plant alive at t with a row at t + 1 = t + 1 (calendar years)
/// saying alive or dead. Columns, exactly:
/// - `size` (numeric): transformed size h(x) at t;
/// - `size_next` (numeric): h(x) at t + 1, NaN when dead;
/// - `survived` (numeric 0/1): alive at t + 1;
/// - `flowered` (numeric 0/1): flowered at t;
/// - `seeds` (numeric): seed count at t, NaN when not counted;
/// - `microsite` (categorical, levels = model labels in order);
/// - `year` (categorical, the label of year t, levels ascending);
/// - `plot`, `plant` (categorical, levels sorted);
/// - `seedling` (numeric 0/1): the row at t is the plant's first record and it was a new
///   recruit (the seedling flag; without the flag: first recorded after its plot's first
///   census).
/// Plants not found at t + 1 (or with no row there under missing_row = notfound) are left out.
///
/// `recruits`: one row per new recruit first seen alive at t + 1 whose plot was censused at t,
/// attributed to the transition t → t + 1. Columns: `size` (numeric, transformed), `microsite`
/// (categorical, model labels), `year` (categorical, the label of year **t**), `plot`
/// (categorical).
///
/// `plants`: one row per plant recorded alive in a census year t, whatever its fate at t + 1
/// (also plants not found at t + 1 and plants in the last census year): the seeds produced at
/// t come from all of them. Columns: `size`, `flowered`, `seeds` (NaN when not counted),
/// `microsite`, `year` (label of t; levels ascending), `plot`, `plant`, `seedling` — with the
/// meanings of the transitions table. Use it for the seeds produced per year (observed counts,
/// and the flowering plants without a count whose seeds are predicted).
struct TransitionData {
    stats::Table transitions;
    stats::Table recruits;
    stats::Table plants;
};

/// Build the tables. Throws UsageError when the census has validation errors (callers load
/// it with load_census, which refuses such a census).
TransitionData build_transitions(const Census& census);

}  // namespace safesite::census
