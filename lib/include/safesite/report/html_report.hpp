#pragma once
/// \file html_report.hpp
/// The HTML report of an output folder (design.md section 6: "an HTML report that works
/// offline"): one self-contained HTML5 file, `report.html` (docs/formats.md "Output folder").
/// Inline CSS only, no scripts, no external resources (fonts, images, style sheets); the SVG
/// figures are inlined; the only links are to places in the page. Sections, in reading order:
/// header (model, file, safesite version, seed, number of warnings), the caution, the warnings
/// (when any), a table of contents, key results, the figures grouped by Figure::section (main
/// results, "Model checking", other sections), the main tables (numbers to 4 significant
/// digits), "Life history" (tables named `life_*`), "Diagnostics" (its figures and the tables
/// `mesh_check`, `eviction`, `reducibility`, `diagnostics`, at most 150 rows each), the
/// assumptions, and the files of the folder. Each caption is shown once, under its figure.

#include <filesystem>
#include <string>
#include <vector>

#include "safesite/report/figures.hpp"
#include "safesite/report/run_info.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::report {

/// Significant digits of the numbers shown in the report (the CSV files and summary.json keep
/// full precision).
inline constexpr int k_report_digits = 4;

/// The tables the report shows in full, in this order, when present and not empty
/// (`scenarios`: the rows of the pooled kernel only).
const std::vector<std::string>& report_table_names();

/// One line on what the file `<name>.csv` of table `name` holds (docs/formats.md "Output
/// tables"); a generic line for a table it does not know.
std::string table_description(const std::string& name);

/// The report as HTML5 text. Pure: the same arguments give the same bytes (no clock, no
/// paths beyond those in `info`). Every text taken from the arguments is escaped (& < > " ').
/// A figure is inlined when its SVG text is a lone `<svg …>…</svg>` element (an XML
/// declaration before it is dropped) holding no script, no `href`, no `url(` and no
/// `foreignObject`; otherwise the report says the figure was left out and names its file.
/// Missing tables give no section; missing columns leave the key result out.
/// \throws UsageError when a table fails check_table().
std::string render_html_report(const std::vector<TidyTable>& tables, const RunInfo& info,
                               const std::vector<Figure>& figures);

/// Write render_html_report() as `<dir>/report.html` atomically (io::write_file_atomic);
/// `dir` is created when absent. Returns the path.
/// \throws UsageError as render_html_report(); InputError (key "out") when the folder cannot
///         be created or the file cannot be written.
std::filesystem::path write_html_report(const std::filesystem::path& dir,
                                        const std::vector<TidyTable>& tables,
                                        const RunInfo& info, const std::vector<Figure>& figures);

}  // namespace safesite::report
