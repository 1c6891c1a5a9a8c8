#pragma once
/// \file csv_table.hpp
/// An RFC 4180 CSV file held as text cells, each with its line in the file, plus typed access
/// that turns a bad cell into a DataError naming file, line, column and the column name.
///
/// Reading rules (docs/formats.md, "CSV conventions"; RFC 4180 section 2 [Shafranovich 2005]):
/// - comma separator; a field may be enclosed in double quotes; inside quotes a doubled quote
///   `""` stands for one quote, and commas and line breaks are part of the field;
/// - LF or CRLF line ends (a lone CR inside a quoted field is kept as is);
/// - a UTF-8 byte-order mark at the very start is skipped;
/// - lines starting with `#` before the header are comments (reference files keep their source
///   there); after the header `#` has no special meaning;
/// - the first non-comment line is the header; entirely empty lines are skipped;
/// - every row must have as many fields as the header (ragged rows are errors);
/// - a quote inside an unquoted field, text after a closing quote and a quoted field left open
///   at the end of the file are errors;
/// - refused before scanning: UTF-16/UTF-32 text (by byte-order mark), binary data (any NUL
///   byte), lone-CR line ends; read() also names a missing path and a folder as such;
/// - an empty cell is the missing value; typed reads refuse markers such as `NA`, `NaN`, `.`,
///   `-` and say so (an optional cell: "leave it empty"); values quoted in messages are cut
///   to 40 characters with their length (io/quoted.hpp) and messages are capped.
///
/// Locations: lines are 1-based physical lines of the file (a field spanning lines reports the
/// line where it starts); the column of a cell is its 1-based **field index**, not a character
/// position. Column names in errors are the file's own header names.

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "safesite/error.hpp"

namespace safesite::io {

/// Mapping of our column names to the names used in a file (e.g. "plant" → "tag"). A name
/// absent from the map is looked up as itself.
using ColumnMap = std::map<std::string, std::string>;

/// A parsed CSV file: a header and rows of text cells with their source lines.
class CsvTable {
public:
    /// Parse CSV text. `file` is the name used in error locations (may be empty).
    /// Throws DataError (with line and column) on malformed CSV, a missing or duplicated
    /// header name, or a ragged row.
    static CsvTable parse(std::string_view text, std::string file = {});

    /// Read and parse a file. Error locations name the path as given.
    /// Throws DataError when the file cannot be read, and as parse().
    static CsvTable read(const std::filesystem::path& path);

    /// The file name used in error locations.
    const std::string& file() const noexcept { return m_file; }
    /// Header names in file order.
    const std::vector<std::string>& header() const noexcept { return m_header; }
    /// Line of the header in the file (1-based).
    std::size_t header_line() const noexcept { return m_header_line; }
    /// Number of data rows (header and comments excluded).
    std::size_t rows() const noexcept { return m_row_line.size(); }
    /// Number of columns (the header's field count).
    std::size_t columns() const noexcept { return m_header.size(); }

    /// Line where data row `row` (0-based) starts.
    std::size_t line(std::size_t row) const { return m_row_line.at(row); }
    /// Line where the cell starts (differs from line(row) after a multi-line quoted field).
    std::size_t line(std::size_t row, std::size_t col) const {
        return m_cell_line.at(row * columns() + col);
    }

    /// Index (0-based) of a header name, or nothing.
    std::optional<std::size_t> find(std::string_view file_name) const;
    /// Index of our column `name` (mapped through `map`). Throws DataError at the header line
    /// listing the header when the column is absent.
    std::size_t require(const std::string& name, const ColumnMap& map = {}) const;
    /// Index of our column `name` (mapped through `map`), or nothing when absent.
    std::optional<std::size_t> locate(const std::string& name, const ColumnMap& map = {}) const;

    /// The raw text of a cell, exactly as in the file (quotes removed).
    const std::string& cell(std::size_t row, std::size_t col) const {
        return m_cells.at(row * columns() + col);
    }
    /// True when the cell is empty or only spaces/tabs.
    bool empty(std::size_t row, std::size_t col) const;

    /// A required text cell (leading/trailing spaces and tabs removed); throws DataError
    /// when empty.
    std::string text(std::size_t row, std::size_t col) const;
    /// A finite decimal number with '.' as decimal mark (surrounding spaces allowed); throws
    /// DataError when empty, not a number or not finite.
    double real(std::size_t row, std::size_t col) const;
    /// A whole number (optional sign, digits only); throws DataError otherwise.
    std::int64_t integer(std::size_t row, std::size_t col) const;
    /// A 0/1 flag; throws DataError for anything else.
    bool flag(std::size_t row, std::size_t col) const;

    /// Empty cell → nothing; otherwise as text()/real()/integer()/flag().
    std::optional<std::string> optional_text(std::size_t row, std::size_t col) const;
    std::optional<double> optional_real(std::size_t row, std::size_t col) const;
    std::optional<std::int64_t> optional_integer(std::size_t row, std::size_t col) const;
    std::optional<bool> optional_flag(std::size_t row, std::size_t col) const;

    /// A table with the given data rows of this one, in the order given (a row may repeat, as
    /// in a bootstrap resample); header, file name and source lines are kept. Throws
    /// UsageError for a row index out of range.
    CsvTable select_rows(const std::vector<std::size_t>& rows) const;
    /// Replace the text of one cell (e.g. to give a resampled plant a distinct tag); its source
    /// line is kept. Throws UsageError for an index out of range.
    void set_cell(std::size_t row, std::size_t col, std::string text);

    /// The location of a cell: {file, line, column = field index + 1, key = header name}.
    SourceLocation where(std::size_t row, std::size_t col) const;
    /// A DataError located at a cell, e.g. for checks done by the caller.
    DataError error_at(std::size_t row, std::size_t col, const std::string& reason) const;

private:
    double read_real(std::size_t row, std::size_t col, bool may_be_empty) const;
    std::int64_t read_integer(std::size_t row, std::size_t col, bool may_be_empty) const;
    bool read_flag(std::size_t row, std::size_t col, bool may_be_empty) const;
    /// Throws when the cell is a missing-value marker such as NA (the remedy depends on
    /// whether an empty cell is allowed there).
    void refuse_marker(std::size_t row, std::size_t col, const char* expected,
                       bool may_be_empty) const;

    std::string m_file;
    std::vector<std::string> m_header;
    std::size_t m_header_line = 0;
    std::vector<std::string> m_cells;          // row-major, rows() × columns()
    std::vector<std::size_t> m_cell_line;      // line where each cell starts
    std::vector<std::size_t> m_row_line;       // line where each row starts
};

}  // namespace safesite::io
