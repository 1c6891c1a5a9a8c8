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
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "safesite/census/census_record.hpp"
#include "safesite/census/census_summary.hpp"
#include "safesite/census/missing_row_policy.hpp"
#include "safesite/census/row_policies.hpp"
#include "safesite/census/size_transform.hpp"
#include "safesite/census/validation_report.hpp"
#include "safesite/io/csv_table.hpp"

namespace safesite::census {

/// How to read a census file (from the model file: spec::to_census_options).
struct CensusOptions {
    io::ColumnMap columns;                 ///< our column name → the file's
    SizeTransform transform = SizeTransform::none;
    std::vector<std::string> microsites;   ///< known labels, in model order
    /// Position of the bare-soil label in `microsites` (spec: `[microsites].bare`); empty when
    /// none is named, and then no row counts as bare soil (every label is a neighbour form).
    std::optional<std::size_t> bare;
    MissingRowPolicy missing_row = MissingRowPolicy::error;
    AliveWithoutSize alive_without_size = AliveWithoutSize::keep;
    AliveAfterDead alive_after_dead = AliveAfterDead::error;
    bool seedling_flag = true;             ///< the file has a `seedling` column
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

    /// The file has a `neighbour_size` column (possibly with every cell empty).
    bool has_neighbour_sizes() const noexcept { return m_has_neighbour_sizes; }

    /// Neighbour sizes seen by the census, per neighbour form: for every microsite label other
    /// than the bare-soil one (CensusOptions::bare), the `neighbour_size` values (raw scale,
    /// > 0) of the records with status alive that have one, one value per plant-year record,
    /// in file order (ascending line). A label with no such record maps to an empty vector;
    /// without the column every vector is empty.
    ///
    /// Use: the sample from which the trapping probability of form f is averaged,
    /// \f$ \bar\tau_f = \frac{1}{n_f} \sum_{i=1}^{n_f} \tau_f(d_i) \f$ over the n_f values
    /// d_i of label f (docs/methods/census.md, "Neighbour sizes").
    ///
    /// Modelling assumption (ours, not a cited result): a seed meets a neighbour in
    /// proportion to the neighbour's area, and focal plants come to stand under neighbours
    /// roughly in proportion to area too, so the census records under form f sample neighbour
    /// sizes the way seeds meet them (area-weighted), and the plain mean above needs no
    /// further weighting. A neighbour with several focal plants under it is counted once per
    /// record.
    std::map<std::string, std::vector<double>> neighbour_sizes_by_microsite() const;

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
    bool m_has_neighbour_sizes = false;
};

/// Type and validate a parsed census file. Data problems are collected in report(); only a missing
/// required column (plant, year, plot, microsite, status, size, flowered, and seedling when
/// options.seedling_flag) and a file with a header but no data row throw a DataError at once (at
/// the header line). Optional columns: seeds, x, y, neighbour_size. The coordinates x and y are
/// used by no computation: a malformed coordinate is a warning (`bad_coordinate`, counted, first
/// examples located) and the coordinate is left empty. A row with an unreadable cell is left out
/// and its plant is spared the follow-on checks that its missing row would set off (first record
/// not a seedling, missing rows, no transitions), so that one bad cell gives one error.
/// Preconditions: options.microsites is not empty; options.bare, when set, is <
/// options.microsites.size().
Census read_census(const io::CsvTable& table, CensusOptions options);

/// Read, type and validate a census file; throws DataError for malformed CSV, a missing
/// column, or when the report has an error (the error's reason is the whole report).
Census load_census(const std::filesystem::path& file, CensusOptions options);

}  // namespace safesite::census
