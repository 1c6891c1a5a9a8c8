#pragma once
/// \file figures.hpp
/// The figures of a run (design.md section 6), drawn from the tidy tables alone — by table
/// and column name (docs/formats.md "Output tables") — so that they do not depend on how the
/// analyses are computed. Each is a standalone SVG 1.1 document (svg_chart.hpp) written as
/// `<dir>/figures/<name>.svg` (docs/formats.md "Output folder").
///
/// A figure function returns nothing when the table it needs is absent, empty, lacks a
/// needed column or has no rows for it; optional tables (`intervals`, `hazards`) only add
/// whiskers or choose the seed type. Cells may be text or numbers: labels such as `kernel`
/// are compared as written in the CSV (format_cell), values are read from integer or
/// decimal cells, and missing or non-finite values are left out of the figure.

#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "safesite/report/tidy_table.hpp"

namespace safesite::report {

/// One figure: the file stem, the SVG text and the report section it belongs to.
/// The HTML report (html_report.hpp) shows the figures grouped by `section`: "" (the main
/// results) first, then "Model checking", then any other section in order of first
/// appearance, and "Diagnostics" last. It shows the caption once, as HTML text under the
/// drawing, taken from the SVG's `<desc>` (less the caution); a caption drawn by SvgChart (the
/// group `<g class="caption" …>` at the end of the document) is taken out of the inlined copy.
struct Figure {
    std::string name;     ///< file stem, e.g. "lambda_by_year" (written as figures/<name>.svg)
    std::string svg;      ///< standalone SVG 1.1 document
    std::string section;  ///< report section: "" (main results), "Model checking", "Diagnostics"
};

/// "lambda_by_year": λ of every census-year kernel (table `lambda`, kernel ≠ pooled) as
/// points joined by a line, the pooled λ as a dashed line across the plot, the reference
/// λ = 1; with `intervals` rows of quantity `lambda`, a whisker per year and a band for the
/// pooled interval. Nothing without `lambda` rows.
std::optional<Figure> lambda_by_year_figure(const std::vector<TidyTable>& tables);

/// "scenarios": Δλ of every scenario for the pooled kernel (table `scenarios`, kernel =
/// pooled) as horizontal bars from 0, with the reference Δλ = 0; whiskers from `intervals`
/// rows of quantity `scenario_delta_lambda`. Nothing without pooled scenario rows.
std::optional<Figure> scenarios_figure(const std::vector<TidyTable>& tables);

/// "retention_curves": R(t) from table `retention_curve`, one line per microsite, for the
/// focal seed type (the `seed_type` of the rows with focal = 1 in table `hazards`; without
/// them, the only seed type of the curve table). y from 0 to 1. Nothing when the curve table
/// is absent or the focal seed type cannot be told.
std::optional<Figure> retention_curves_figure(const std::vector<TidyTable>& tables);

/// "arrival": arrival fraction a_m per microsite (table `arrival`) as grouped horizontal
/// bars, one bar per scenario (the baseline first, in table order) in each microsite, and a
/// last group "lost (in no microsite)" below a separating line: 1 − Σ_m a_m per scenario
/// (left out for a scenario with a missing fraction).
std::optional<Figure> arrival_figure(const std::vector<TidyTable>& tables);

/// "perturbation": pooled λ against the proportional change δ of juvenile survival, in %
/// (table `perturbation`, kernel = pooled), points joined by a line in order of δ, with the
/// references λ = 1 and δ = 0.
std::optional<Figure> perturbation_figure(const std::vector<TidyTable>& tables);

/// Every figure the tables allow, in the order of the functions above, then the model-checking
/// figures (model_check_figures.hpp, section "Model checking").
std::vector<Figure> all_figures(const std::vector<TidyTable>& tables);

/// Write figures already drawn (e.g. all_figures(tables)) as `<dir>/figures/<name>.svg`, each
/// atomically (report::write_output_file); the `figures` folder is created when there is
/// something to write. Other files are left alone. Returns the paths written (empty for no
/// figure).
/// \throws InputError (key "out") when the folder cannot be created or a file cannot be
///         written.
std::vector<std::filesystem::path> write_figures(const std::filesystem::path& dir,
                                                 const std::vector<Figure>& figures);

}  // namespace safesite::report
