#include "safesite/report/text_summary.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "safesite/error.hpp"
#include "safesite/report/caution.hpp"

namespace safesite::report {

namespace {

/// Display width of UTF-8 text: one per code point (continuation bytes 10xxxxxx not counted).
std::size_t width(const std::string& s) {
    std::size_t n = 0;
    for (unsigned char c : s) {
        if ((c & 0xC0u) != 0x80u) ++n;
    }
    return n;
}

std::string pad(const std::string& s, std::size_t w, bool right) {
    const std::size_t k = width(s);
    if (k >= w) return s;
    const std::string fill(w - k, ' ');
    return right ? fill + s : s + fill;
}

std::string show(const Cell& cell, int digits) {
    if (std::holds_alternative<Missing>(cell)) return "-";
    if (const double* x = std::get_if<double>(&cell)) {
        if (!std::isfinite(*x)) return format_cell(cell);
        return fmt::format("{:.{}g}", *x, digits);
    }
    return format_cell(cell);
}

/// Wrap a paragraph at `cols` columns.
std::string wrap(const std::string& text, std::size_t cols) {
    std::string out, line, word;
    auto flush_word = [&] {
        if (word.empty()) return;
        if (!line.empty() && width(line) + 1 + width(word) > cols) {
            out += line + "\n";
            line.clear();
        }
        if (!line.empty()) line.push_back(' ');
        line.append(word);
        word.clear();
    };
    for (char c : text) {
        if (c == ' ' || c == '\n') {
            flush_word();
        } else {
            word += c;
        }
    }
    flush_word();
    if (!line.empty()) out += line + "\n";
    return out;
}

}  // namespace

std::string render_table(const TidyTable& table, const TextOptions& options) {
    check_table(table);
    if (options.significant_digits < 1 || options.significant_digits > 17) {
        throw UsageError(fmt::format("significant digits {} out of range; expected 1..17",
                                     options.significant_digits));
    }
    const std::size_t ncol = table.columns.size();
    const std::size_t shown = std::min(table.rows.size(), options.max_rows);
    std::vector<std::vector<std::string>> cells(shown, std::vector<std::string>(ncol));
    std::vector<std::size_t> w(ncol);
    std::vector<bool> numeric(ncol, true);
    for (std::size_t c = 0; c < ncol; ++c) w[c] = width(table.columns[c]);
    for (std::size_t r = 0; r < shown; ++r) {
        for (std::size_t c = 0; c < ncol; ++c) {
            const Cell& cell = table.rows[r][c];
            if (std::holds_alternative<std::string>(cell)) numeric[c] = false;
            cells[r][c] = show(cell, options.significant_digits);
            w[c] = std::max(w[c], width(cells[r][c]));
        }
    }
    std::string out = table.name + "\n";
    auto line = [&](const std::vector<std::string>& v) {
        std::string s = " ";
        for (std::size_t c = 0; c < ncol; ++c) {
            s.push_back(' ');
            s.append(pad(v[c], w[c], numeric[c]));
        }
        // No trailing blanks.
        while (!s.empty() && s.back() == ' ') s.pop_back();
        out += s + "\n";
    };
    line(table.columns);
    for (const auto& row : cells) line(row);
    if (table.rows.size() > shown) {
        out += fmt::format("  … {} more rows\n", table.rows.size() - shown);
    }
    return out;
}

std::string render_summary(const std::vector<TidyTable>& tables, const RunInfo& info,
                           const TextOptions& options) {
    std::string out;
    if (!info.model_name.empty() || !info.model_file.empty()) {
        out += fmt::format("model: {}", info.model_name);
        if (!info.model_file.empty()) {
            out += fmt::format("{}({})", info.model_name.empty() ? "" : " ", info.model_file);
        }
        out += "\n";
    }
    if (info.seed) out += fmt::format("seed: {}\n", *info.seed);
    for (const auto& t : tables) {
        out.push_back('\n');
        out.append(render_table(t, options));
    }
    if (!info.warnings.empty()) {
        out += "\nwarnings:\n";
        for (const auto& w : info.warnings) out += fmt::format("  - {}\n", w);
    }
    out.push_back('\n');
    out.append(wrap(fmt::format("Caution: {}", k_caution), 90));
    return out;
}

}  // namespace safesite::report
