#include "safesite/io/csv_table.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <fstream>
#include <set>
#include <sstream>

#include "safesite/io/near_match.hpp"
#include "safesite/io/quoted.hpp"

namespace safesite::io {

namespace {

std::string quote_value(std::string_view value) { return quoted_short(value); }

/// A header name as shown in messages: as written when short and plain, else quoted and cut.
std::string shown_name(const std::string& name) {
    if (name.size() <= k_quoted_keep &&
        std::none_of(name.begin(), name.end(),
                     [](char c) { return static_cast<unsigned char>(c) < 0x20; }))
        return name;
    return quoted_short(name);
}

/// Common ways of writing "no value" that are not an empty cell (checked case-sensitively
/// for the exact spellings below, surrounding spaces removed).
bool missing_marker(std::string_view v) {
    static constexpr std::string_view markers[] = {
        "NA", "N/A", "n/a", "na", "NaN", "nan", "NAN", ".", "-", "--", "?",
        "null", "NULL", "Null", "None", "none", "missing", "#N/A"};
    for (auto m : markers)
        if (v == m) return true;
    return false;
}

std::string_view trimmed(std::string_view s) {
    std::size_t b = 0, e = s.size();
    while (b < e && (s[b] == ' ' || s[b] == '\t')) ++b;
    while (e > b && (s[e - 1] == ' ' || s[e - 1] == '\t')) --e;
    return s.substr(b, e - b);
}

std::string header_list(const std::vector<std::string>& header) {
    constexpr std::size_t k_max_names = 30;
    std::string out;
    for (std::size_t i = 0; i < header.size() && i < k_max_names; ++i) {
        if (i > 0) out += ", ";
        out += shown_name(header[i]);
    }
    if (header.size() > k_max_names)
        out += " and " + std::to_string(header.size() - k_max_names) + " more";
    return out;
}

/// The record-level CSV scanner (RFC 4180 section 2, rules 1-7).
class Scanner {
public:
    Scanner(std::string_view text, const std::string& file) : m_text(text), m_file(file) {
        // A UTF-8 byte-order mark (EF BB BF) is not part of the data.
        if (m_text.size() >= 3 && static_cast<unsigned char>(m_text[0]) == 0xEF &&
            static_cast<unsigned char>(m_text[1]) == 0xBB &&
            static_cast<unsigned char>(m_text[2]) == 0xBF)
            m_pos = 3;
    }

    bool at_end() const { return m_pos >= m_text.size(); }
    std::size_t line() const { return m_line; }

    /// Skip an empty line or (when `comments`) a `#` comment line. True when one was skipped.
    bool skip_blank_or_comment(bool comments) {
        if (at_end()) return false;
        const char c = m_text[m_pos];
        if (c == '\n' || (c == '\r' && peek(1) == '\n')) {
            end_line();
            return true;
        }
        if (comments && c == '#') {
            while (!at_end() && m_text[m_pos] != '\n') ++m_pos;
            if (!at_end()) end_line();
            return true;
        }
        return false;
    }

    /// Read one record: its fields and the line each field starts on.
    void record(std::vector<std::string>& fields, std::vector<std::size_t>& lines) {
        fields.clear();
        lines.clear();
        while (true) {
            lines.push_back(m_line);
            fields.push_back(field(fields.size() + 1));
            if (at_end()) return;
            const char c = m_text[m_pos];
            if (c == ',') {
                ++m_pos;
                if (at_end()) {  // a trailing comma before the end of the file: one empty field
                    lines.push_back(m_line);
                    fields.emplace_back();
                    return;
                }
                continue;
            }
            // field() stops only at ',', a line end or the end of the text.
            end_line();
            return;
        }
    }

private:
    char peek(std::size_t ahead) const {
        return m_pos + ahead < m_text.size() ? m_text[m_pos + ahead] : '\0';
    }

    void end_line() {
        if (m_text[m_pos] == '\r') ++m_pos;
        ++m_pos;  // the '\n'
        ++m_line;
    }

    bool at_line_end() const {
        const char c = m_text[m_pos];
        return c == '\n' || (c == '\r' && peek(1) == '\n');
    }

    [[noreturn]] void fail(std::size_t line, std::size_t column, const std::string& reason) const {
        throw DataError({m_file, line, column, ""}, capped(reason));
    }

    std::string field(std::size_t column) {
        std::string out;
        if (!at_end() && m_text[m_pos] == '"') {
            const std::size_t start_line = m_line;
            ++m_pos;
            while (true) {
                if (at_end())
                    fail(start_line, column,
                         "quoted field is not closed before the end of the file; expected a "
                         "closing '\"'");
                const char c = m_text[m_pos];
                if (c == '"') {
                    if (peek(1) == '"') {  // rule 7: a doubled quote is one quote
                        out += '"';
                        m_pos += 2;
                        continue;
                    }
                    ++m_pos;
                    break;
                }
                if (c == '\n') ++m_line;  // rule 6: line breaks inside quotes are data
                out += c;
                ++m_pos;
            }
            if (!at_end() && m_text[m_pos] != ',' && !at_line_end())
                fail(m_line, column,
                     "text after the closing quote of a quoted field; expected ',' or a line "
                     "end (write a quote inside a quoted field as \"\")");
            return out;
        }
        const std::size_t start = m_pos;
        while (!at_end() && m_text[m_pos] != ',' && !at_line_end()) {
            if (m_text[m_pos] == '"')
                fail(m_line, column,
                     "quote inside an unquoted field; expected the whole field in quotes with "
                     "inner quotes doubled (RFC 4180)");
            ++m_pos;
        }
        out.assign(m_text.substr(start, m_pos - start));
        return out;
    }

    std::string_view m_text;
    const std::string& m_file;
    std::size_t m_pos = 0;
    std::size_t m_line = 1;
};

/// Refuse text that is not UTF-8 CSV before scanning it: UTF-16/32 (by byte-order mark), binary
/// data (a NUL byte), classic-Mac line ends (lone CR, no LF at all).
void check_text(std::string_view text, const std::string& file) {
    auto byte = [&](std::size_t i) { return static_cast<unsigned char>(text[i]); };
    if (text.size() >= 2 && ((byte(0) == 0xFF && byte(1) == 0xFE) ||
                             (byte(0) == 0xFE && byte(1) == 0xFF)))
        throw DataError({file, 1, 0, ""},
                        "the file is UTF-16 text (it starts with a UTF-16 byte-order mark); "
                        "expected UTF-8: save it again as \"CSV UTF-8\" or plain UTF-8 text");
    if (text.size() >= 4 && byte(0) == 0 && byte(1) == 0 && byte(2) == 0xFE && byte(3) == 0xFF)
        throw DataError({file, 1, 0, ""},
                        "the file is UTF-32 text; expected UTF-8: save it again as UTF-8 text");
    const std::size_t nul = text.find('\0');
    if (nul != std::string_view::npos) {
        const auto line =
            1 + static_cast<std::size_t>(std::count(text.begin(), text.begin() + nul, '\n'));
        throw DataError({file, line, 0, ""},
                        "the file holds a NUL byte (byte " + std::to_string(nul + 1) +
                            "): it is binary data, not CSV text; expected a UTF-8 CSV file (a "
                            "UTF-16 file without byte-order mark looks like this too: save it "
                            "as UTF-8)");
    }
    if (text.find('\n') == std::string_view::npos) {
        const std::size_t cr = text.find('\r');
        if (cr != std::string_view::npos && cr + 1 < text.size())
            throw DataError({file, 1, 0, ""},
                            "lines end with a lone carriage return (CR, old Mac line ends); "
                            "expected LF or CRLF line ends: save the file again as CSV with "
                            "Windows or Unix line ends");
    }
}

}  // namespace

CsvTable CsvTable::parse(std::string_view text, std::string file) {
    CsvTable t;
    t.m_file = std::move(file);
    check_text(text, t.m_file);
    Scanner scan(text, t.m_file);

    std::vector<std::string> fields;
    std::vector<std::size_t> lines;
    while (scan.skip_blank_or_comment(true)) {
    }
    if (scan.at_end())
        throw DataError({t.m_file, 0, 0, ""},
                        text.empty() ? "the file is empty; expected CSV text starting with a "
                                       "header row of column names"
                                     : "no header row: the file holds only comment or empty "
                                       "lines; expected a header row of column names");
    t.m_header_line = scan.line();
    scan.record(fields, lines);
    std::set<std::string> seen;
    for (std::size_t c = 0; c < fields.size(); ++c) {
        std::string name(trimmed(fields[c]));
        if (name.empty())
            throw DataError({t.m_file, t.m_header_line, c + 1, ""},
                            "empty column name in the header; expected a name for every column");
        if (!seen.insert(name).second)
            throw DataError({t.m_file, t.m_header_line, c + 1, name},
                            "column name " + quote_value(name) + " appears twice in the header");
        t.m_header.push_back(std::move(name));
    }

    while (true) {
        while (scan.skip_blank_or_comment(false)) {
        }
        if (scan.at_end()) break;
        const std::size_t row_line = scan.line();
        scan.record(fields, lines);
        if (fields.size() != t.m_header.size()) {
            const std::size_t col = std::min(fields.size(), t.m_header.size() + 1);
            throw DataError({t.m_file, row_line, col, ""},
                            "row has " + std::to_string(fields.size()) + " fields; expected " +
                                std::to_string(t.m_header.size()) + " as in the header (" +
                                header_list(t.m_header) + ")");
        }
        t.m_row_line.push_back(row_line);
        for (std::size_t c = 0; c < fields.size(); ++c) {
            t.m_cells.push_back(std::move(fields[c]));
            t.m_cell_line.push_back(lines[c]);
        }
    }
    return t;
}

CsvTable CsvTable::read(const std::filesystem::path& path) {
    namespace fs = std::filesystem;
    const std::string name = path.string();
    std::error_code ec;
    const fs::file_status st = fs::status(path, ec);
    if (st.type() == fs::file_type::not_found)
        throw DataError({name, 0, 0, ""},
                        "no such file; expected a CSV file at this path (a relative path in a "
                        "model file is taken from the model file's folder)");
    if (st.type() == fs::file_type::directory)
        throw DataError({name, 0, 0, ""},
                        "this is a folder, not a file; expected the path of a CSV file");
    std::ifstream in(path, std::ios::binary);
    if (!in)
        throw DataError({name, 0, 0, ""},
                        "the file cannot be opened for reading (check that it exists and that "
                        "you have permission to read it)");
    std::ostringstream buffer;
    buffer << in.rdbuf();
    if (in.bad())
        throw DataError({name, 0, 0, ""}, "the file cannot be read (an input/output error)");
    return parse(buffer.str(), name);
}

std::optional<std::size_t> CsvTable::find(std::string_view file_name) const {
    for (std::size_t c = 0; c < m_header.size(); ++c)
        if (m_header[c] == file_name) return c;
    return std::nullopt;
}

std::optional<std::size_t> CsvTable::locate(const std::string& name, const ColumnMap& map) const {
    auto it = map.find(name);
    return find(it == map.end() ? name : it->second);
}

std::size_t CsvTable::require(const std::string& name, const ColumnMap& map) const {
    auto it = map.find(name);
    const std::string& file_name = it == map.end() ? name : it->second;
    if (auto c = find(file_name)) return *c;
    std::string reason = "required column " + quote_value(file_name);
    if (file_name != name) reason += " (our column '" + name + "')";
    reason += " is missing; the header has: " + header_list(m_header);
    if (auto near = closest_match(file_name, m_header))
        reason += "; did you mean " + shown_name(*near) + "?";
    throw DataError({m_file, m_header_line, 0, file_name}, capped(reason));
}

bool CsvTable::empty(std::size_t row, std::size_t col) const {
    return trimmed(cell(row, col)).empty();
}

SourceLocation CsvTable::where(std::size_t row, std::size_t col) const {
    return {m_file, line(row, col), col + 1, m_header.at(col)};
}

DataError CsvTable::error_at(std::size_t row, std::size_t col, const std::string& reason) const {
    return DataError(where(row, col), capped(reason));
}

std::string CsvTable::text(std::size_t row, std::size_t col) const {
    std::string_view v = trimmed(cell(row, col));
    if (v.empty())
        throw error_at(row, col, shown_name(m_header[col]) + " is empty; expected a value");
    return std::string(v);
}

void CsvTable::refuse_marker(std::size_t row, std::size_t col, const char* expected,
                             bool may_be_empty) const {
    const std::string_view v = trimmed(cell(row, col));
    if (!missing_marker(v)) return;
    const std::string name = shown_name(m_header[col]);
    if (may_be_empty)
        throw error_at(row, col,
                       name + " " + quote_value(v) +
                           " is read as text, not as a missing value; to say \"not counted\" "
                           "or \"not measured\" leave the cell empty (an empty cell is the "
                           "missing value in safesite's CSV files); otherwise expected " +
                           expected);
    throw error_at(row, col,
                   name + " " + quote_value(v) +
                       " looks like a missing-value marker, but this column needs a value in "
                       "every row; expected " + expected);
}

double CsvTable::real(std::size_t row, std::size_t col) const {
    return read_real(row, col, false);
}

double CsvTable::read_real(std::size_t row, std::size_t col, bool may_be_empty) const {
    const std::string& raw = cell(row, col);
    std::string_view v = trimmed(raw);
    const std::string name = shown_name(m_header[col]);
    if (v.empty()) throw error_at(row, col, name + " is empty; expected a number");
    refuse_marker(row, col, "a decimal number with '.'", may_be_empty);
    std::string_view digits = v;
    if (digits.front() == '+') digits.remove_prefix(1);
    double value = 0.0;
    auto [end, ec] = std::from_chars(digits.data(), digits.data() + digits.size(), value,
                                     std::chars_format::general);
    if (ec == std::errc::result_out_of_range)
        throw error_at(row, col,
                       name + " " + quote_value(raw) +
                           " is out of the range of a double; expected a finite number");
    if (ec != std::errc() || end != digits.data() + digits.size())
        throw error_at(row, col,
                       name + " " + quote_value(raw) +
                           " is not a number; expected a decimal with '.'");
    if (!std::isfinite(value))
        throw error_at(row, col,
                       name + " " + quote_value(raw) + " is not finite; expected a number");
    return value;
}

std::int64_t CsvTable::integer(std::size_t row, std::size_t col) const {
    return read_integer(row, col, false);
}

std::int64_t CsvTable::read_integer(std::size_t row, std::size_t col, bool may_be_empty) const {
    const std::string& raw = cell(row, col);
    std::string_view v = trimmed(raw);
    const std::string name = shown_name(m_header[col]);
    if (v.empty()) throw error_at(row, col, name + " is empty; expected a whole number");
    refuse_marker(row, col, "a whole number", may_be_empty);
    std::string_view digits = v;
    if (digits.front() == '+') digits.remove_prefix(1);
    std::int64_t value = 0;
    auto [end, ec] = std::from_chars(digits.data(), digits.data() + digits.size(), value);
    if (ec == std::errc::result_out_of_range)
        throw error_at(row, col,
                       name + " " + quote_value(raw) +
                           " is too large for a whole number; expected at most 19 digits");
    if (ec != std::errc() || end != digits.data() + digits.size())
        throw error_at(row, col,
                       name + " " + quote_value(raw) + " is not a whole number; expected " +
                           "digits only");
    return value;
}

bool CsvTable::flag(std::size_t row, std::size_t col) const { return read_flag(row, col, false); }

bool CsvTable::read_flag(std::size_t row, std::size_t col, bool may_be_empty) const {
    const std::string& raw = cell(row, col);
    std::string_view v = trimmed(raw);
    if (v == "0") return false;
    if (v == "1") return true;
    refuse_marker(row, col, "0 or 1", may_be_empty);
    throw error_at(row, col,
                   shown_name(m_header[col]) + " " + quote_value(raw) +
                       " is not a flag; expected 0 or 1");
}

std::optional<std::string> CsvTable::optional_text(std::size_t row, std::size_t col) const {
    if (empty(row, col)) return std::nullopt;
    return text(row, col);
}

std::optional<double> CsvTable::optional_real(std::size_t row, std::size_t col) const {
    if (empty(row, col)) return std::nullopt;
    return read_real(row, col, true);
}

std::optional<std::int64_t> CsvTable::optional_integer(std::size_t row, std::size_t col) const {
    if (empty(row, col)) return std::nullopt;
    return read_integer(row, col, true);
}

std::optional<bool> CsvTable::optional_flag(std::size_t row, std::size_t col) const {
    if (empty(row, col)) return std::nullopt;
    return read_flag(row, col, true);
}

CsvTable CsvTable::select_rows(const std::vector<std::size_t>& rows) const {
    CsvTable out;
    out.m_file = m_file;
    out.m_header = m_header;
    out.m_header_line = m_header_line;
    const std::size_t n = columns();
    out.m_cells.reserve(rows.size() * n);
    out.m_cell_line.reserve(rows.size() * n);
    out.m_row_line.reserve(rows.size());
    for (std::size_t r : rows) {
        if (r >= this->rows())
            throw UsageError("CSV row " + std::to_string(r) + " out of range (" +
                             std::to_string(this->rows()) + " rows)");
        const auto first = static_cast<std::ptrdiff_t>(r * n);
        out.m_cells.insert(out.m_cells.end(), m_cells.begin() + first,
                           m_cells.begin() + first + static_cast<std::ptrdiff_t>(n));
        out.m_cell_line.insert(out.m_cell_line.end(), m_cell_line.begin() + first,
                               m_cell_line.begin() + first + static_cast<std::ptrdiff_t>(n));
        out.m_row_line.push_back(m_row_line[r]);
    }
    return out;
}

void CsvTable::set_cell(std::size_t row, std::size_t col, std::string text) {
    if (row >= rows() || col >= columns())
        throw UsageError("CSV cell (" + std::to_string(row) + ", " + std::to_string(col) +
                         ") out of range");
    m_cells[row * columns() + col] = std::move(text);
}

}  // namespace safesite::io
