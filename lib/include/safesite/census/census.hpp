#pragma once
/// \file census.hpp
/// The long-format census (docs/formats.md, "Census"): read, typed, validated.
///
/// Reading never stops at the first problem: every cell that cannot be read and every rule of
/// docs/methods/census.md that is broken becomes an issue of the census' ValidationReport.
/// `load_census` then throws a DataError carrying the whole report when there is an error;
/// warnings never stop a run.

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "safesite/census/missing_row_policy.hpp"
#include "safesite/census/size_transform.hpp"
#include "safesite/census/validation_report.hpp"
#include "safesite/io/csv_table.hpp"

namespace safesite::census {

/// How to read a census file (from the model file: spec::to_census_options).
struct CensusOptions {
    io::ColumnMap columns;                 ///< our column name → the file's
    SizeTransform transform = SizeTransform::none;
    std::vector<std::string> microsites;   ///< known labels, in model order
    MissingRowPolicy missing_row = MissingRowPolicy::error;
    bool seedling_flag = true;             ///< the file has a `seedling` column
};

enum class Status { alive, dead, notfound };

/// One plant in one census year.
struct CensusRecord {
    std::string plant;
    int year = 0;
    std::string plot;
    std::string microsite;
    std::size_t microsite_index = 0;  ///< position in CensusOptions::microsites
    Status status = Status::alive;
    double size = 0.0;                ///< transformed size h(x); NaN unless alive
    double raw_size = 0.0;            ///< size as in the file; NaN when empty
    bool flowered = false;            ///< alive rows only
    std::optional<std::int64_t> seeds;  ///< empty = not counted
    bool seedling = false;            ///< the seedling flag of the row
    std::optional<double> x, y;       ///< coordinates, read for validation only
    std::size_t line = 0;             ///< file line; 0 for a row added by missing_row = notfound
};

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
    /// Smallest and largest transformed size over all alive rows (NaN when none): the data
    /// range from which mesh bounds are derived (L = min − margin·range, U = max + margin·range).
    double size_min = 0.0;
    double size_max = 0.0;

    /// Share of the alive plants in each microsite in census year `year` (label order; sums
    /// to 1 unless no plant is alive). Throws UsageError for a year not in the census.
    std::vector<double> microsite_share(int year) const;
    /// Share of alive plant-years in each microsite over all census years (label order).
    std::vector<double> microsite_share() const;
};

/// A read and validated census.
class Census {
public:
    const std::string& file() const noexcept { return m_file; }
    const CensusOptions& options() const noexcept { return m_options; }
    /// Records sorted by plant tag then year; rows with unreadable cells are left out; with
    /// missing_row = notfound the added "notfound" rows are included (line 0).
    const std::vector<CensusRecord>& records() const noexcept { return m_records; }
    const ValidationReport& report() const noexcept { return m_report; }
    const CensusSummary& summary() const noexcept { return m_summary; }
    bool valid() const noexcept { return !m_report.has_errors(); }

    /// Transitions as pairs of record indices (row at t, row at t + 1), in record order.
    const std::vector<std::pair<std::size_t, std::size_t>>& transition_rows() const noexcept {
        return m_transitions;
    }
    /// Attributed recruits as record indices (their first row, at t + 1).
    const std::vector<std::size_t>& recruit_rows() const noexcept { return m_recruits; }
    /// Per record: the row is the plant's first record and the plant was a new recruit.
    bool is_seedling_row(std::size_t record) const { return m_seedling_row.at(record); }

private:
    friend Census read_census(const io::CsvTable& table, CensusOptions options);
    std::string m_file;
    CensusOptions m_options;
    std::vector<CensusRecord> m_records;
    ValidationReport m_report;
    CensusSummary m_summary;
    std::vector<std::pair<std::size_t, std::size_t>> m_transitions;
    std::vector<std::size_t> m_recruits;
    std::vector<bool> m_seedling_row;
};

/// Type and validate a parsed census file. Data problems are collected in report(); only a
/// missing required column (plant, year, plot, microsite, status, size, flowered, and seedling
/// when options.seedling_flag) throws a DataError at once. Precondition: options.microsites
/// is not empty.
Census read_census(const io::CsvTable& table, CensusOptions options);

/// Read, type and validate a census file; throws DataError for malformed CSV, a missing
/// column, or when the report has an error (the error's reason is the whole report).
Census load_census(const std::filesystem::path& file, CensusOptions options);

/// "alive", "dead", "notfound".
const char* to_string(Status s) noexcept;

}  // namespace safesite::census
