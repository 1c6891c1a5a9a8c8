#pragma once
/// \file retention_data.hpp
/// Retention checks (docs/formats.md, "Retention checks"): seeds placed at a station in a
/// microsite and checked on later days; one row per seed per check. Each seed's history is
/// turned into intervals between consecutive checks for the grouped-time hazard model
/// (retention_model.hpp).

#include <cstddef>
#include <filesystem>
#include <map>
#include <string>
#include <string_view>
#include <vector>

#include "safesite/stats/table.hpp"

namespace safesite::io {
class CsvTable;
using ColumnMap = std::map<std::string, std::string>;
}

namespace safesite::arrival {

/// One check of one seed.
struct RetentionCheck {
    std::string seed;        ///< seed id
    std::string station;     ///< station id (a neighbour or a bare-soil marker)
    std::string microsite;   ///< microsite label of the station
    std::string seed_type;   ///< seed type
    double day = 0;          ///< days since placement, ≥ 0
    bool present = true;     ///< seed still there at the check
    std::size_t line = 0;    ///< line in the source file (0 when not read from a file)
};

/// Retention checks as read from a file, in file order (rows of one seed need not be
/// adjacent).
struct RetentionData {
    std::string file;
    std::vector<RetentionCheck> checks;
};

/// Validate parsed CSV as retention checks. Required columns: seed, station, microsite, seed_type,
/// day, present. `microsites` are the admissible microsite labels. Throws DataError (file, line,
/// column, column name; the message names the seed) for: a missing column, a header without data
/// rows (at the header line), an empty or malformed cell (a missing-value marker such as `NA`
/// included), day < 0, present not 0/1, an unknown microsite, a seed whose station, microsite or
/// seed type changes between rows, a seed whose first row is not day 0 ("no day-0 placement") or is
/// absent at day 0, days not strictly increasing in file order, and a seed present again after it
/// was absent. `columns` maps our column names to the file's (`[data.retention_columns]`); unmapped
/// names are looked up as they are.
RetentionData retention_from_csv(const io::CsvTable& csv,
                                 const std::vector<std::string>& microsites,
                                 const io::ColumnMap& columns = {});

/// Parse CSV text (see retention_from_csv).
RetentionData parse_retention(std::string_view text, const std::vector<std::string>& microsites,
                              std::string file = {});

/// Read a retention CSV file (see retention_from_csv).
RetentionData read_retention(const std::filesystem::path& path,
                             const std::vector<std::string>& microsites,
                             const io::ColumnMap& columns = {});

/// One interval between two consecutive checks of a seed that was present at its start.
struct RetentionInterval {
    std::string seed, station, microsite, seed_type;
    double start_day = 0;      ///< day of the check opening the interval
    double interval_days = 0;  ///< length Δ > 0 in days
    bool left = false;         ///< absent at the closing check (departed during the interval)
};

/// Each consecutive pair of checks (d_j, d_{j+1}) of a seed present at d_j gives one interval
/// {Δ = d_{j+1} − d_j, left = not present at d_{j+1}}; intervals after the departure are not
/// at risk and are dropped. Histories are assumed valid (as retention_from_csv returns them);
/// seeds are taken in order of first appearance, checks in file order.
std::vector<RetentionInterval> retention_intervals(const std::vector<RetentionCheck>& checks);

/// Intervals as a regression table with columns seed, station, microsite (factor; levels =
/// microsites present, in the order of `microsites`), seed_type (factor, levels sorted),
/// start_day, interval_days, left (0/1), log_interval = log(interval_days).
stats::Table interval_table(const std::vector<RetentionInterval>& intervals,
                            const std::vector<std::string>& microsites);

/// The checks as CSV text in the column order of docs/formats.md (header first, LF).
std::string format_retention_csv(const std::vector<RetentionCheck>& checks);

}  // namespace safesite::arrival
