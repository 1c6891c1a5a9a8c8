#pragma once
/// \file tidy_table.hpp
/// A tidy table: the plain value every analysis result is turned into before it is written.
/// One observation per row, one variable per column (long form), so that the CSV is readable
/// as-is by spreadsheet and statistics software (design.md section 6).

#include <cstdint>
#include <string>
#include <variant>
#include <vector>

namespace safesite::report {

/// A missing value: written as an empty CSV field and as JSON `null`.
using Missing = std::monostate;

/// One cell: missing, text, integer or double. Doubles are written with the shortest decimal
/// form that reads back to the same binary value (round trip); non-finite doubles are written
/// as `NaN`, `Inf`, `-Inf` in CSV and `null` in JSON.
using Cell = std::variant<Missing, std::string, std::int64_t, double>;

/// A named table of cells. `name` is the file stem of its CSV (`<dir>/<name>.csv`) and must
/// match `[a-z0-9_-]+`; every row has exactly `columns.size()` cells (check_table()).
struct TidyTable {
    std::string name;                   ///< file stem and JSON key, e.g. "lambda_by_year"
    std::vector<std::string> columns;   ///< column names, in order
    std::vector<std::vector<Cell>> rows;
};

/// Cell constructors that avoid variant ambiguities (`1` is an integer, `1.0` a double).
inline Cell text(std::string value) { return Cell(std::move(value)); }
inline Cell integer(std::int64_t value) { return Cell(value); }
inline Cell number(double value) { return Cell(value); }
inline Cell missing() { return Cell(Missing{}); }

/// Check that the name is a valid file stem and every row has one cell per column.
/// \throws UsageError naming the table and the offending row.
void check_table(const TidyTable& table);

/// The index of a column by name. \throws UsageError naming the table and its columns.
std::size_t column_index(const TidyTable& table, const std::string& column);

/// The cell as CSV field text (before quoting): "" for missing, the text, the integer,
/// or the round-trip form of the double.
std::string format_cell(const Cell& cell);

}  // namespace safesite::report
