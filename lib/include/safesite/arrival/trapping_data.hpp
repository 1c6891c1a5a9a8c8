#pragma once
/// \file trapping_data.hpp
/// Trapping trials (docs/formats.md, "Trapping trials"): seeds of one type sent past one
/// neighbour plant; how many stop under it. One row per neighbour × seed type.

#include <cstddef>
#include <cstdint>
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

/// One trapping trial.
struct TrappingTrial {
    std::string neighbour;       ///< neighbour plant id (grouping factor)
    std::string form;            ///< growth form of the neighbour (a non-bare microsite label)
    double neighbour_size = 0;   ///< neighbour size on the raw scale, > 0
    std::string seed_type;       ///< seed type, e.g. "plumed"
    std::int64_t launched = 0;   ///< seeds sent past the neighbour, > 0
    std::int64_t trapped = 0;    ///< seeds that stopped under it, 0 ≤ trapped ≤ launched
    std::size_t line = 0;        ///< line in the source file (0 when not read from a file)
};

/// Trapping trials as read from a file, in file order.
struct TrappingData {
    std::string file;                  ///< file name used in error locations
    std::vector<TrappingTrial> trials;
};

/// Validate parsed CSV as trapping trials. Required columns: neighbour, form, neighbour_size,
/// seed_type, launched, trapped (other columns are ignored). `forms` are the admissible growth
/// forms (the non-bare microsites). Throws DataError with file, line, column and column name for: a
/// missing column, a header without data rows (at the header line), an empty or malformed cell (a
/// missing-value marker such as `NA` included), neighbour_size ≤ 0, launched ≤ 0, trapped < 0 or >
/// launched, an unknown form, the same neighbour given two forms, or the same neighbour × seed type
/// twice. `columns` maps our column names to the file's (`[data.trapping_columns]`); unmapped names
/// are looked up as they are.
TrappingData trapping_from_csv(const io::CsvTable& csv, const std::vector<std::string>& forms,
                               const io::ColumnMap& columns = {});

/// Parse CSV text (see trapping_from_csv). `file` names the source in errors.
TrappingData parse_trapping(std::string_view text, const std::vector<std::string>& forms,
                            std::string file = {});

/// Read a trapping CSV file (see trapping_from_csv). DataError when it cannot be read.
TrappingData read_trapping(const std::filesystem::path& path,
                           const std::vector<std::string>& forms,
                           const io::ColumnMap& columns = {});

/// The trials as a regression table with columns neighbour (factor), form (factor; levels are
/// the forms present, in the order of `forms`), neighbour_size (numeric, raw scale),
/// seed_type (factor, levels sorted), launched, trapped (numeric). Response for a binomial
/// fit: `trapped / launched`.
stats::Table trapping_table(const std::vector<TrappingTrial>& trials,
                            const std::vector<std::string>& forms);

/// The trials as CSV text in the column order of docs/formats.md, header first, LF line ends;
/// fields holding a comma, quote or line break are quoted (RFC 4180).
std::string format_trapping_csv(const std::vector<TrappingTrial>& trials);

}  // namespace safesite::arrival
