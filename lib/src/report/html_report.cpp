#include "safesite/report/html_report.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdlib>
#include <map>
#include <optional>

#include <fmt/format.h>

#include "safesite/error.hpp"
#include "safesite/report/caution.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/svg_chart.hpp"
#include "safesite/version.hpp"

// Coordinates of plants are never shown: no tidy table carries them (docs/formats.md "Output
// tables"), and this report renders only tables and figures, so exact positions of rare
// plants cannot leak into a report that is passed around. Keep it that way: do not add a
// table or figure with x/y columns here.

namespace safesite::report {

namespace {

namespace fs = std::filesystem;

/// Text escaped for HTML character data and attribute values (the XML escape of the figures:
/// & < > " ' as entities; control characters become spaces, which HTML collapses anyway).
std::string esc(const std::string& s) { return xml_escape(s); }

/// The inverse of the five entities of xml_escape(), for text taken out of an SVG.
std::string unescape_xml(std::string s) {
    static const std::pair<const char*, const char*> entities[] = {
        {"&lt;", "<"}, {"&gt;", ">"}, {"&quot;", "\""}, {"&#39;", "'"}, {"&amp;", "&"}};
    for (const auto& [from, to] : entities) {
        const std::string f(from);
        for (std::size_t i = s.find(f); i != std::string::npos; i = s.find(f, i + 1)) {
            s.replace(i, f.size(), to);
        }
    }
    return s;
}

/// A cell as shown: doubles to k_report_digits significant digits, missing as an em dash.
std::string show(const Cell& cell) {
    if (std::holds_alternative<Missing>(cell)) return "\u2014";
    if (const double* x = std::get_if<double>(&cell)) {
        if (!std::isfinite(*x)) return format_cell(cell);
        return fmt::format("{:.{}g}", *x, k_report_digits);
    }
    return format_cell(cell);
}

const TidyTable* find_table(const std::vector<TidyTable>& tables, const std::string& name) {
    for (const auto& t : tables)
        if (t.name == name) return &t;
    return nullptr;
}

std::optional<std::size_t> find_column(const TidyTable& t, const std::string& name) {
    for (std::size_t c = 0; c < t.columns.size(); ++c)
        if (t.columns[c] == name) return c;
    return std::nullopt;
}

/// Rows of `t` whose column `column` reads `value` (as written in the CSV).
std::vector<const std::vector<Cell>*> rows_where(const TidyTable& t, const std::string& column,
                                                 const std::string& value) {
    std::vector<const std::vector<Cell>*> out;
    const auto c = find_column(t, column);
    if (!c) return out;
    for (const auto& row : t.rows)
        if (format_cell(row[*c]) == value) out.push_back(&row);
    return out;
}

/// The cell of `row` in column `name` shown as text, or nothing when the column is absent.
std::optional<std::string> shown(const TidyTable& t, const std::vector<Cell>& row,
                                 const std::string& name) {
    const auto c = find_column(t, name);
    if (!c) return std::nullopt;
    return show(row[*c]);
}

// ---------------------------------------------------------------------------------------------
// Sections

constexpr const char* k_style =
    R"(body { font-family: sans-serif; line-height: 1.45; color: #1d1d1d;
  background: #fdfdfb; max-width: 62em; margin: 0 auto; padding: 1em 1.5em 3em; }
h1 { font-size: 1.6em; margin-bottom: 0.2em; }
h2 { font-size: 1.3em; border-bottom: 2px solid #5b7a4a; padding-bottom: 0.15em; margin-top: 2em; }
h3 { font-size: 1.05em; margin-bottom: 0.3em; font-family: monospace; }
dl.meta { display: grid; grid-template-columns: max-content auto; gap: 0.1em 1em; margin: 0.5em 0; }
dl.meta dt { font-weight: bold; }
dl.meta dd { margin: 0; }
.caution { border: 2px solid #a5662b; background: #fbf1e4; padding: 0.6em 1em; margin: 1.2em 0; }
.caution h2 { border: none; margin: 0 0 0.3em; font-size: 1.1em; }
.caution p { margin: 0; }
ul.key li { margin: 0.25em 0; }
.warnings { border: 2px solid #8c2f39; background: #fbeaec; padding: 0.6em 1em; margin: 1.2em 0; }
.warnings h2 { border: none; margin: 0 0 0.3em; font-size: 1.1em; }
.warnings ul { margin: 0; }
nav#contents ol { margin: 0.2em 0; }
nav#contents > ol > li { margin: 0.3em 0; }
nav#contents ol ol { font-size: 0.92em; }
figure { margin: 1.5em 0; }
figure svg { max-width: 100%; height: auto; }
figcaption { font-size: 0.92em; color: #333; }
table { border-collapse: collapse; margin: 0.4em 0 1em; font-size: 0.9em; }
th, td { padding: 0.15em 0.6em; border-bottom: 1px solid #d8d8d0; }
th { text-align: left; background: #eef1ea; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
p.note { font-size: 0.9em; color: #444; }
code { font-size: 0.95em; }
)";

void header(std::string& o, const RunInfo& info) {
    const std::string title =
        info.model_name.empty() ? std::string("safesite report") : info.model_name;
    o += "<header>\n<h1>" + esc(title) + "</h1>\n<dl class=\"meta\">\n";
    if (!info.model_file.empty())
        o += "<dt>model file</dt><dd><code>" + esc(info.model_file) + "</code></dd>\n";
    if (!info.command.empty())
        o += "<dt>command</dt><dd><code>safesite " + esc(info.command) + "</code></dd>\n";
    const std::string v = info.safesite_version.empty() ? version() : info.safesite_version;
    o += "<dt>safesite version</dt><dd>" + esc(v) + "</dd>\n";
    if (info.seed) o += fmt::format("<dt>seed</dt><dd>{}</dd>\n", *info.seed);
    if (info.warnings.empty())
        o += "<dt>warnings</dt><dd>none</dd>\n";
    else
        o += fmt::format(
            "<dt>warnings</dt><dd><a href=\"#warnings\">{} (listed below the "
            "caution)</a></dd>\n",
            info.warnings.size());
    o += "</dl>\n</header>\n";
}

void caution(std::string& o) {
    o += "<section class=\"caution\" id=\"caution\">\n<h2>Caution</h2>\n<p>" + esc(k_caution) +
         "</p>\n</section>\n";
}

void key_results(std::string& o, const std::vector<TidyTable>& tables) {
    std::vector<std::string> items;
    // Pooled λ, with its bootstrap interval when `intervals` has one.
    if (const TidyTable* t = find_table(tables, "lambda")) {
        const auto rows = rows_where(*t, "kernel", "pooled");
        if (!rows.empty()) {
            if (const auto lambda = shown(*t, *rows.front(), "lambda")) {
                std::string item = "Pooled growth rate \u03bb = <strong>" + esc(*lambda) +
                                   "</strong>";
                if (const TidyTable* iv = find_table(tables, "intervals")) {
                    for (const auto* row : rows_where(*iv, "quantity", "lambda")) {
                        const auto kernel = shown(*iv, *row, "kernel");
                        if (!kernel || *kernel != "pooled") continue;
                        const auto lo = shown(*iv, *row, "lower");
                        const auto hi = shown(*iv, *row, "upper");
                        const auto level = find_column(*iv, "level");
                        if (!lo || !hi) break;
                        std::string pct;
                        if (level) {
                            if (const double* l = std::get_if<double>(&(*row)[*level])) {
                                if (std::isfinite(*l)) pct = fmt::format("{:g} % ", 100.0 * *l);
                            }
                        }
                        item += " (bootstrap " + esc(pct) + "interval " + esc(*lo) + " to " +
                                esc(*hi) + ")";
                        break;
                    }
                }
                items.push_back(item + "; above 1 the population grows, below 1 it shrinks.");
            }
        }
    }
    // Stochastic growth rate.
    if (const TidyTable* t = find_table(tables, "stochastic_lambda"); t && !t->rows.empty()) {
        const auto& row = t->rows.front();
        if (const auto ls = shown(*t, row, "lambda")) {
            std::string item = "Stochastic growth rate \u03bb<sub>s</sub> = <strong>" +
                               esc(*ls) + "</strong>";
            if (const auto k = shown(*t, row, "kernels"))
                item += " (census-year kernels drawn at random: " + esc(*k);
            else
                item += " (census-year kernels drawn at random";
            if (const auto se = shown(*t, row, "std_error"))
                item += "; Monte Carlo standard error of log \u03bb<sub>s</sub> " + esc(*se);
            items.push_back(item + ").");
        }
    }
    // Arrival fractions from the arrival chain.
    if (const TidyTable* t = find_table(tables, "arrival_chain"); t && !t->rows.empty()) {
        const auto m = find_column(*t, "microsite");
        const auto f = find_column(*t, "fraction");
        if (m && f) {
            std::string item = "Arrival fractions a<sub>m</sub> (share of seeds reaching each "
                               "microsite):";
            bool first = true;
            for (const auto& row : t->rows) {
                item += first ? " " : ", ";
                first = false;
                item += esc(format_cell(row[*m])) + " " + esc(show(row[*f]));
            }
            items.push_back(item + ".");
        }
    }
    // Scenario Δλ of the pooled kernel.
    if (const TidyTable* t = find_table(tables, "scenarios")) {
        const auto s = find_column(*t, "scenario");
        const auto d = find_column(*t, "delta_lambda");
        const auto rows = rows_where(*t, "kernel", "pooled");
        if (s && d && !rows.empty()) {
            std::string item = "Change of the pooled \u03bb under each scenario "
                               "(\u0394\u03bb):";
            bool first = true;
            for (const auto* row : rows) {
                item += first ? " " : ", ";
                first = false;
                item += esc(format_cell((*row)[*s])) + " " + esc(show((*row)[*d]));
            }
            items.push_back(item + ".");
        }
    }
    if (items.empty()) return;
    o += "<section id=\"key-results\">\n<h2>Key results</h2>\n<ul class=\"key\">\n";
    for (const auto& i : items) o += "<li>" + i + "</li>\n";
    o += "</ul>\n</section>\n";
}

/// The text of the first `<tag>…</tag>` of an SVG document, unescaped; empty when absent.
std::string svg_element_text(const std::string& svg, const std::string& tag) {
    const std::string open = "<" + tag + ">", close = "</" + tag + ">";
    const std::size_t i = svg.find(open);
    if (i == std::string::npos) return {};
    const std::size_t j = svg.find(close, i);
    if (j == std::string::npos) return {};
    return unescape_xml(svg.substr(i + open.size(), j - i - open.size()));
}

/// The `<svg …>…</svg>` element of a figure fit for inlining, or nothing (see header).
std::optional<std::string> inline_svg(const std::string& text) {
    std::size_t start = 0;
    if (text.rfind("<?xml", 0) == 0) {
        const std::size_t end = text.find("?>");
        if (end == std::string::npos) return std::nullopt;
        start = text.find_first_not_of(" \t\r\n", end + 2);
        if (start == std::string::npos) return std::nullopt;
    }
    std::string svg = text.substr(start);
    while (!svg.empty() && (svg.back() == '\n' || svg.back() == '\r' || svg.back() == ' '))
        svg.pop_back();
    if (svg.rfind("<svg", 0) != 0) return std::nullopt;
    if (svg.size() < 6 || svg.compare(svg.size() - 6, 6, "</svg>") != 0) return std::nullopt;
    for (const char* bad : {"<script", "href", "url(", "foreignObject", "<!"})
        if (svg.find(bad) != std::string::npos) return std::nullopt;
    return svg;
}

/// An inlined figure less its drawn caption: the last element of an SvgChart document is
/// `<g class="caption" transform="translate(0 Y)">…</g>`; it is removed and the drawing cut at
/// height Y (width, height and viewBox of the root element). Other SVG is left as it is.
std::string without_drawn_caption(const std::string& svg) {
    const std::string key = "<g class=\"caption\" transform=\"translate(0 ";
    const std::size_t g = svg.rfind(key);
    if (g == std::string::npos) return svg;
    const std::size_t close = svg.find("</g>", g);
    if (close == std::string::npos) return svg;
    const std::size_t after = svg.find_first_not_of(" \t\r\n", close + 4);
    if (after == std::string::npos || svg.compare(after, 6, "</svg>") != 0) return svg;
    const std::string y_text = svg.substr(g + key.size(), svg.find(')', g) - g - key.size());
    char* end = nullptr;
    const double y = std::strtod(y_text.c_str(), &end);
    if (end == y_text.c_str() || !std::isfinite(y) || y <= 0.0) return svg;
    std::string out = svg.substr(0, g) + svg.substr(after);
    // Root attributes: height="H" and viewBox="0 0 W H" become Y.
    const std::size_t head_end = out.find('>');
    std::string head = out.substr(0, head_end);
    const std::string h = format_fixed(y, 2);
    const std::size_t hp = head.find(" height=\"");
    const std::size_t vp = head.find(" viewBox=\"0 0 ");
    if (hp == std::string::npos || vp == std::string::npos) return svg;
    const std::size_t hq = head.find('"', hp + 9);
    head.replace(hp + 9, hq - hp - 9, h);
    const std::size_t vs = head.find(" viewBox=\"0 0 ") + 15;
    const std::size_t ve = head.find('"', vs);
    const std::string wh = head.substr(vs, ve - vs);
    const std::size_t space = wh.find(' ');
    if (space == std::string::npos) return svg;
    head.replace(vs, ve - vs, wh.substr(0, space) + " " + h);
    return head + out.substr(head_end);
}

/// The section of the report figures of `section` go to: its heading and anchor.
struct FigureSection {
    std::string key;  ///< Figure::section
    std::string heading;
    std::string id;
};

/// Anchor text of a free heading: lower-case letters and digits, other runs as '-'.
std::string slug(const std::string& s) {
    std::string out;
    for (unsigned char c : s) {
        if (std::isalnum(c) != 0 && c < 0x80) {
            out += static_cast<char>(std::tolower(c));
        } else if (!out.empty() && out.back() != '-') {
            out += '-';
        }
    }
    while (!out.empty() && out.back() == '-') out.pop_back();
    return out.empty() ? std::string("section") : out;
}

/// Sections of the figures in report order: main results, "Model checking", others in order
/// of first appearance, "Diagnostics" (which the diagnostics section shows with its tables).
std::vector<FigureSection> figure_sections(const std::vector<Figure>& figures) {
    std::vector<std::string> keys = {"", "Model checking"};
    for (const auto& f : figures)
        if (f.section != "Diagnostics" &&
            std::find(keys.begin(), keys.end(), f.section) == keys.end())
            keys.push_back(f.section);
    keys.push_back("Diagnostics");
    std::vector<FigureSection> out;
    for (const auto& k : keys) {
        if (k.empty()) {
            out.push_back({k, "Figures", "figures"});
        } else if (k == "Diagnostics") {
            out.push_back({k, k, "diagnostics"});
        } else if (k == "Model checking") {
            out.push_back({k, k, "model-checking"});
        } else {
            out.push_back({k, k, "section-" + slug(k)});
        }
    }
    return out;
}

/// Figure numbers in the order the report shows them (by section, then as given).
std::vector<std::size_t> figure_numbers(const std::vector<Figure>& figures) {
    std::vector<std::size_t> number(figures.size(), 0);
    std::size_t n = 0;
    for (const auto& s : figure_sections(figures))
        for (std::size_t i = 0; i < figures.size(); ++i)
            if (figures[i].section == s.key) number[i] = ++n;
    return number;
}

std::string figure_title(const Figure& f) {
    const auto svg = inline_svg(f.svg);
    return svg ? svg_element_text(*svg, "title") : std::string();
}

void figure_html(std::string& o, const Figure& f, std::size_t n) {
    const std::string file = "figures/" + f.name + ".svg";
    const auto svg = inline_svg(f.svg);
    o += "<figure id=\"figure-" + esc(f.name) + "\">\n";
    if (svg) {
        o += without_drawn_caption(*svg) + "\n";
    } else {
        o += "<p class=\"note\">This figure was left out: its file is not a plain SVG "
             "drawing without scripts or links.</p>\n";
    }
    // Caption, once: the figure's caption line (the <desc> element, less the caution that
    // figures carry there and this report shows at the top); the title is drawn above.
    std::string desc = svg ? svg_element_text(*svg, "desc") : std::string();
    const std::string tail = std::string(" ") + k_caution;
    if (desc.size() >= tail.size() &&
        desc.compare(desc.size() - tail.size(), tail.size(), tail) == 0)
        desc.erase(desc.size() - tail.size());
    if (desc == k_caution) desc.clear();
    o += fmt::format("<figcaption><strong>Figure {}.</strong> ", n);
    if (!svg) {
        const std::string title = figure_title(f);
        if (!title.empty()) o += esc(title) + ". ";
    }
    if (!desc.empty()) o += esc(desc) + " ";
    o += "(<code>" + esc(file) + "</code>)</figcaption>\n</figure>\n";
}

/// The figures of one section, without a heading.
void figures_of(std::string& o, const std::vector<Figure>& figures, const std::string& section) {
    const auto numbers = figure_numbers(figures);
    for (std::size_t i = 0; i < figures.size(); ++i)
        if (figures[i].section == section) figure_html(o, figures[i], numbers[i]);
}

bool has_section(const std::vector<Figure>& figures, const std::string& section) {
    return std::any_of(figures.begin(), figures.end(),
                       [&](const Figure& f) { return f.section == section; });
}

/// Rows shown of a long diagnostic or life-history table (all are in its CSV file).
constexpr std::size_t k_max_shown_rows = 150;

void html_table(std::string& o, const TidyTable& t,
                const std::vector<const std::vector<Cell>*>& rows) {
    // A column is numeric (right-aligned) when no shown cell of it is text.
    std::vector<bool> numeric(t.columns.size(), true);
    for (const auto* row : rows)
        for (std::size_t c = 0; c < row->size(); ++c)
            if (std::holds_alternative<std::string>((*row)[c])) numeric[c] = false;
    o += "<table>\n<thead><tr>";
    for (const auto& c : t.columns) o += "<th>" + esc(c) + "</th>";
    o += "</tr></thead>\n<tbody>\n";
    for (const auto* row : rows) {
        o += "<tr>";
        for (std::size_t c = 0; c < row->size(); ++c) {
            o += numeric[c] ? "<td class=\"num\">" : "<td>";
            o += esc(show((*row)[c])) + "</td>";
        }
        o += "</tr>\n";
    }
    o += "</tbody>\n</table>\n";
}

/// One table with its heading, description and file name; at most `max_rows` rows shown.
std::string table_block(const TidyTable& t, const std::vector<const std::vector<Cell>*>& rows,
                        const std::string& note, std::size_t max_rows) {
    std::string body = "<section id=\"table-" + esc(t.name) + "\">\n<h3>" + esc(t.name) + "</h3>\n";
    std::string shown_note;
    std::vector<const std::vector<Cell>*> shown_rows = rows;
    if (shown_rows.size() > max_rows) {
        shown_rows.resize(max_rows);
        shown_note =
            fmt::format(" The first {} of {} rows; all are in the file.", max_rows, rows.size());
    }
    body += "<p class=\"note\">" + esc(table_description(t.name)) + esc(note) + esc(shown_note) +
            " File: <code>" + esc(t.name) + ".csv</code>.</p>\n";
    html_table(body, t, shown_rows);
    body += "</section>\n";
    return body;
}

std::vector<const std::vector<Cell>*> all_rows(const TidyTable& t) {
    std::vector<const std::vector<Cell>*> rows;
    for (const auto& row : t.rows) rows.push_back(&row);
    return rows;
}

/// Names of the tables of the life-history section: those starting with "life_", in the
/// order given.
std::vector<std::string> life_table_names(const std::vector<TidyTable>& tables) {
    std::vector<std::string> out;
    for (const auto& t : tables)
        if (t.name.rfind("life_", 0) == 0 && !t.rows.empty()) out.push_back(t.name);
    return out;
}

/// Tables of the diagnostics section, in this order, when present and not empty.
const std::vector<std::string>& diagnostic_table_names() {
    static const std::vector<std::string> names = {"mesh_check", "eviction", "reducibility",
                                                   "diagnostics"};
    return names;
}

bool any_table(const std::vector<TidyTable>& tables, const std::vector<std::string>& names) {
    for (const auto& n : names)
        if (const TidyTable* t = find_table(tables, n); t && !t->rows.empty()) return true;
    return false;
}

/// The main tables: their names in the order shown (when present and not empty).
std::vector<std::string> main_tables_shown(const std::vector<TidyTable>& tables) {
    std::vector<std::string> out;
    for (const auto& name : report_table_names()) {
        const TidyTable* t = find_table(tables, name);
        if (!t || t->rows.empty()) continue;
        if (name == "scenarios" && find_column(*t, "kernel") &&
            rows_where(*t, "kernel", "pooled").empty())
            continue;
        out.push_back(name);
    }
    return out;
}

void tables_section(std::string& o, const std::vector<TidyTable>& tables) {
    std::string body;
    for (const auto& name : main_tables_shown(tables)) {
        const TidyTable* t = find_table(tables, name);
        std::vector<const std::vector<Cell>*> rows;
        std::string note;
        if (name == "scenarios" && find_column(*t, "kernel")) {
            rows = rows_where(*t, "kernel", "pooled");
            note = " Rows of the pooled kernel; every census-year kernel is in the file.";
        } else {
            rows = all_rows(*t);
        }
        body += table_block(*t, rows, note, rows.size());
    }
    if (body.empty()) return;
    o += "<section id=\"tables\">\n<h2>Tables</h2>\n";
    o += fmt::format("<p class=\"note\">Decimals are shown to {} significant digits; the CSV "
                     "files and <code>summary.json</code> keep full precision. A dash marks a "
                     "missing value.</p>\n",
                     k_report_digits);
    o += body;
    o += "</section>\n";
}

void life_history_section(std::string& o, const std::vector<TidyTable>& tables) {
    const auto names = life_table_names(tables);
    if (names.empty()) return;
    o += "<section id=\"life-history\">\n<h2>Life history</h2>\n";
    for (const auto& n : names) {
        const TidyTable* t = find_table(tables, n);
        o += table_block(*t, all_rows(*t), "", k_max_shown_rows);
    }
    o += "</section>\n";
}

void diagnostics_section(std::string& o, const std::vector<TidyTable>& tables,
                         const std::vector<Figure>& figures) {
    if (!has_section(figures, "Diagnostics") && !any_table(tables, diagnostic_table_names()))
        return;
    o += "<section id=\"diagnostics\">\n<h2>Diagnostics</h2>\n<p class=\"note\">Checks of the "
         "numerical model: mesh convergence, probability mass evicted from the mesh, and "
         "kernels that are reducible. The warnings they raise are listed at the top.</p>\n";
    figures_of(o, figures, "Diagnostics");
    for (const auto& n : diagnostic_table_names()) {
        const TidyTable* t = find_table(tables, n);
        if (t && !t->rows.empty()) o += table_block(*t, all_rows(*t), "", k_max_shown_rows);
    }
    o += "</section>\n";
}

void warnings_section(std::string& o, const RunInfo& info) {
    if (info.warnings.empty()) return;
    o += "<section class=\"warnings\" id=\"warnings\">\n<h2>Warnings</h2>\n<ul>\n";
    for (const auto& w : info.warnings) o += "<li>" + esc(w) + "</li>\n";
    o += "</ul>\n</section>\n";
}

void assumptions_section(std::string& o, const RunInfo& info) {
    o += "<section id=\"assumptions\">\n<h2>Assumptions</h2>\n";
    if (info.assumptions.empty()) {
        o += "<p>None stated.</p>\n";
    } else {
        o += "<ol>\n";
        for (const auto& a : info.assumptions) o += "<li>" + esc(a) + "</li>\n";
        o += "</ol>\n";
    }
    o += "</section>\n";
}

/// The table of contents: every section present, the figures under theirs, the tables under
/// theirs.
void contents(std::string& o, const std::vector<TidyTable>& tables, const RunInfo& info,
              const std::vector<Figure>& figures, bool key_results_shown) {
    const auto numbers = figure_numbers(figures);
    auto link = [](const std::string& id, const std::string& text) {
        return "<a href=\"#" + esc(id) + "\">" + esc(text) + "</a>";
    };
    auto figure_list = [&](const std::string& section) {
        std::string l;
        for (std::size_t i = 0; i < figures.size(); ++i) {
            if (figures[i].section != section) continue;
            std::string title = figure_title(figures[i]);
            if (title.empty()) title = figures[i].name;
            l += "<li>" +
                 link("figure-" + figures[i].name, fmt::format("Figure {}. ", numbers[i]) + title) +
                 "</li>\n";
        }
        return l.empty() ? l : "<ol>\n" + l + "</ol>\n";
    };
    auto table_list = [&](const std::vector<std::string>& names) {
        std::string l;
        for (const auto& n : names) l += "<li>" + link("table-" + n, n) + "</li>\n";
        return l.empty() ? l : "<ol>\n" + l + "</ol>\n";
    };
    o += "<nav id=\"contents\">\n<h2>Contents</h2>\n<ol>\n";
    o += "<li>" + link("caution", "Caution") + "</li>\n";
    if (!info.warnings.empty())
        o += "<li>" + link("warnings", fmt::format("Warnings ({})", info.warnings.size())) +
             "</li>\n";
    if (key_results_shown) o += "<li>" + link("key-results", "Key results") + "</li>\n";
    for (const auto& s : figure_sections(figures)) {
        if (s.key == "Diagnostics" || !has_section(figures, s.key)) continue;
        o += "<li>" + link(s.id, s.heading) + "\n" + figure_list(s.key) + "</li>\n";
    }
    const auto main = main_tables_shown(tables);
    if (!main.empty()) o += "<li>" + link("tables", "Tables") + "\n" + table_list(main) + "</li>\n";
    const auto life = life_table_names(tables);
    if (!life.empty())
        o += "<li>" + link("life-history", "Life history") + "\n" + table_list(life) + "</li>\n";
    if (has_section(figures, "Diagnostics") || any_table(tables, diagnostic_table_names())) {
        std::vector<std::string> diag;
        for (const auto& n : diagnostic_table_names())
            if (const TidyTable* t = find_table(tables, n); t && !t->rows.empty())
                diag.push_back(n);
        o += "<li>" + link("diagnostics", "Diagnostics") + "\n" + figure_list("Diagnostics") +
             table_list(diag) + "</li>\n";
    }
    o += "<li>" + link("assumptions", "Assumptions") + "</li>\n";
    o += "<li>" + link("files", "Files of this folder") + "</li>\n";
    o += "</ol>\n</nav>\n";
}

void files_section(std::string& o, const std::vector<TidyTable>& tables,
                   const std::vector<Figure>& figures) {
    o += "<section id=\"files\">\n<h2>Files of this folder</h2>\n<table>\n"
         "<thead><tr><th>file</th><th>holds</th></tr></thead>\n<tbody>\n";
    auto line = [&](const std::string& file, const std::string& what) {
        o += "<tr><td><code>" + esc(file) + "</code></td><td>" + esc(what) + "</td></tr>\n";
    };
    line("report.html", "this report (self-contained; opens offline)");
    line("summary.json", "every table again with the metadata of the run, the caution, the "
                         "assumptions and the warnings");
    for (const auto& t : tables) line(t.name + ".csv", table_description(t.name));
    for (const auto& f : figures) {
        const auto svg = inline_svg(f.svg);
        std::string title = svg ? svg_element_text(*svg, "title") : std::string();
        line("figures/" + f.name + ".svg",
             title.empty() ? std::string("figure (SVG)") : "figure: " + title);
    }
    o += "</tbody>\n</table>\n<p class=\"note\">Formats: docs/formats.md of safesite, "
         "\u201cOutput folder\u201d and \u201cOutput tables\u201d.</p>\n</section>\n";
}

}  // namespace

const std::vector<std::string>& report_table_names() {
    static const std::vector<std::string> names = {
        "lambda",       "arrival_chain",      "hazards",       "trapping",
        "scenarios",    "intervals",          "sensitivities", "break_even",
        "year_decomposition", "establishment", "coefficients",  "model_comparison"};
    return names;
}

std::string table_description(const std::string& name) {
    static const std::map<std::string, std::string> d = {
        {"coefficients", "Coefficients of every vital-rate regression with standard errors."},
        {"model_comparison", "Candidate formulas of each fitted rate compared by AIC."},
        {"establishment", "Establishment per microsite estimated from the census."},
        {"trapping", "Trapping probability of each neighbour form for each seed type."},
        {"hazards", "Daily departure hazard of seeds per microsite and seed type."},
        {"retention_curve", "Share of seeds still in place by day since placement."},
        {"arrival_chain", "The arrival chain of the focal seed type: cover, trapping, hazard, "
                          "landing and arrival fraction per microsite, and the seeds lost."},
        {"intervals", "Bootstrap percentile intervals of the main quantities."},
        {"bootstrap_replicates", "Every bootstrap replicate's value of every interval quantity."},
        {"lambda", "Growth rate \u03bb, R0 and generation time of every kernel."},
        {"stochastic_lambda", "Stochastic growth rate with census-year kernels drawn at random."},
        {"year_decomposition", "Each census year's \u03bb minus the pooled \u03bb, split by vital "
                               "rate."},
        {"perturbation", "\u03bb under proportional changes of juvenile survival."},
        {"stable_structure", "Stable size structure of every kernel per microsite and stage."},
        {"reproductive_value", "Reproductive value of every kernel per microsite and stage."},
        {"life_history_at_birth", "Life expectancy, flowering before death, age at first "
                                  "flowering and lifetime seeds of a recruit per microsite."},
        {"life_history_by_size", "The same life-history measures per size, microsite and "
                                 "stage (pooled kernel)."},
        {"arrival", "Arrival fraction per microsite, baseline and scenarios."},
        {"scenarios", "\u03bb and its change under each scenario, per kernel."},
        {"sensitivities", "Sensitivities and elasticities of \u03bb to single parameters."},
        {"break_even", "Bare-soil establishment that keeps the pooled \u03bb when seeds under a "
                       "neighbour form are moved to bare soil."},
        {"diagnostics", "Mesh convergence, eviction and warnings per kernel."},
        {"assumptions", "The stated assumptions, numbered."},
        {"census_years", "Census summary per year."},
        {"census_microsites", "Census summary per year and microsite."},
        {"census_gaps", "Missing census year ranges."},
        {"problems", "Problems found in the census."},
    };
    const auto it = d.find(name);
    if (it != d.end()) return it->second;
    return "A table of this run (docs/formats.md, \u201cOutput tables\u201d).";
}

std::string render_html_report(const std::vector<TidyTable>& tables, const RunInfo& info,
                               const std::vector<Figure>& figures) {
    for (const auto& t : tables) check_table(t);
    std::string o;
    o += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
    o += "<title>" +
         esc("safesite report" + (info.model_name.empty() ? "" : ": " + info.model_name)) +
         "</title>\n<style>\n" + k_style + "</style>\n</head>\n<body>\n";
    header(o, info);
    caution(o);
    warnings_section(o, info);
    std::string key;
    key_results(key, tables);
    contents(o, tables, info, figures, !key.empty());
    o += key;
    for (const auto& s : figure_sections(figures)) {
        if (s.key == "Diagnostics" || !has_section(figures, s.key)) continue;
        o += "<section id=\"" + esc(s.id) + "\">\n<h2>" + esc(s.heading) + "</h2>\n";
        figures_of(o, figures, s.key);
        o += "</section>\n";
    }
    tables_section(o, tables);
    life_history_section(o, tables);
    diagnostics_section(o, tables, figures);
    assumptions_section(o, info);
    files_section(o, tables, figures);
    o += "<footer><p class=\"note\">Written by safesite " + esc(version()) +
         ". Re-render with <code>safesite report DIR</code>.</p></footer>\n</body>\n</html>\n";
    return o;
}

fs::path write_html_report(const fs::path& dir, const std::vector<TidyTable>& tables,
                           const RunInfo& info, const std::vector<Figure>& figures) {
    const std::string html = render_html_report(tables, info, figures);
    ensure_output_folder(dir);
    const fs::path p = dir / "report.html";
    write_output_file(p, html);
    return p;
}

}  // namespace safesite::report
