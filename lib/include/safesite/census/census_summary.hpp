#pragma once
/// \file census_summary.hpp
/// Counts of a validated census per year and overall (docs/methods/census.md, "Summaries").

#include <cstddef>
#include <cstdint>
#include <vector>

namespace safesite::census {

/// Counts for one census year t.
struct YearSummary {
    int year = 0;
    bool next_censused = false;       ///< year t + 1 is a census year
    std::size_t alive = 0;            ///< plants recorded alive in t
    std::vector<std::size_t> alive_by_microsite;  ///< model label order
    std::size_t flowering = 0;
    std::int64_t seeds_counted = 0;   ///< sum of the seed counts recorded in t
    std::size_t flowering_without_count = 0;  ///< flowered, seed count empty
    std::size_t transitions = 0;      ///< t → t+1 transitions (alive at t, alive/dead at t+1)
    std::size_t excluded_notfound = 0;  ///< alive at t, not found at t+1 (not in transitions)
    /// Recruits first seen at t + 1 attributed to t, per microsite (label order).
    std::vector<std::size_t> recruits_by_microsite;
};

/// A missing census year between two census years.
struct CensusGap {
    int from = 0;  ///< last census year before the gap
    int to = 0;    ///< next census year
};

/// What the census holds.
struct CensusSummary {
    std::size_t rows = 0;    ///< data rows of the file
    std::size_t plants = 0;  ///< distinct plant tags
    std::vector<int> years;  ///< census years, ascending
    std::vector<CensusGap> gaps;
    std::vector<YearSummary> per_year;  ///< one per census year, ascending
    std::size_t transitions = 0;
    std::size_t recruits = 0;               ///< attributed to a transition year
    std::size_t unattributed_recruits = 0;  ///< seedlings in their plot's first census year
    /// Smallest and largest transformed size over the alive rows with a size (NaN when none):
    /// the data range from which mesh bounds are derived
    /// (L = min − margin·range, U = max + margin·range).
    double size_min = 0.0;
    double size_max = 0.0;
    /// Rows recorded alive without a size and kept (census.alive_without_size = "keep").
    std::size_t alive_without_size = 0;
    /// Dead rows read as not found because the plant is alive later
    /// (census.alive_after_dead = "notfound").
    std::size_t dead_read_as_notfound = 0;

    /// Share of the alive plants in each microsite in census year `year` (label order; sums
    /// to 1 unless no plant is alive). Throws UsageError for a year not in the census.
    std::vector<double> microsite_share(int year) const;
    /// Share of alive plant-years in each microsite over all census years (label order).
    std::vector<double> microsite_share() const;
};

}  // namespace safesite::census
