#pragma once
/// \file model_check_figures.hpp
/// The model-checking figures (docs/formats.md, "Model-checking figures";
/// docs/methods/model-checking.md), drawn from the `check_*` tables (and `retention_curve`,
/// `reproductive_value`, `year_decomposition`) alone: nothing is refitted or recomputed.
/// Every figure has section "Model checking" and a name starting with `check_`; a figure
/// whose tables are absent or empty is not made. Multi-panel figures have one panel per
/// microsite (and stage), growth form or kernel block (svg_chart.hpp, compose_panels).

#include <optional>
#include <string>
#include <vector>

#include "safesite/report/figures.hpp"
#include "safesite/report/tidy_table.hpp"

namespace safesite::report {

/// The section name of the model-checking figures.
inline const char* const k_model_check_section = "Model checking";

/// "check_survival" / "check_flowering": observed proportions in equal-count size bins with
/// Wilson 95 % whiskers (check_binned) and the fitted pooled curve, with the census-year
/// curves drawn faintly (check_curves), one panel per microsite. `rate` is "survival" or
/// "flowering".
std::optional<Figure> check_binary_figure(const std::vector<TidyTable>& tables,
                                          const std::string& rate);

/// "check_growth": size at t+1 against size at t (check_growth) with the pooled fitted mean
/// and ±1, ±2 SD bands (check_curves, rate growth), one panel per microsite (and stage).
std::optional<Figure> check_growth_figure(const std::vector<TidyTable>& tables);

/// "check_growth_residuals": standardised growth residuals against size at t, with lines at
/// 0 and ±2.
std::optional<Figure> check_growth_residuals_figure(const std::vector<TidyTable>& tables);

/// "check_growth_qq": standardised residuals against their normal scores (Blom), with the
/// 1:1 line.
std::optional<Figure> check_growth_qq_figure(const std::vector<TidyTable>& tables);

/// "check_seeds": seed counts against size (check_seeds) with the fitted mean (check_curves,
/// rate seeds), both as log10(seeds + 1).
std::optional<Figure> check_seeds_figure(const std::vector<TidyTable>& tables);

/// "check_recruit_sizes": histogram of recruit sizes (density) with the pooled fitted
/// density (check_recruit_sizes, check_curves rate recruit_size), one panel per microsite.
std::optional<Figure> check_recruit_sizes_figure(const std::vector<TidyTable>& tables);

/// "check_trapping": observed share trapped per trial against neighbour size with the fitted
/// curve, per seed type, one panel per growth form (check_trapping, check_trapping_curve).
std::optional<Figure> check_trapping_figure(const std::vector<TidyTable>& tables);

/// "check_retention": observed share of seeds present at each check day with Wilson 95 %
/// whiskers (check_retention) over the fitted retention curve (retention_curve), per seed
/// type, one panel per microsite.
std::optional<Figure> check_retention_figure(const std::vector<TidyTable>& tables);

/// "check_size_distribution": observed size distribution (last census; all years) against
/// the stable size distribution of the pooled kernel, one panel per microsite.
std::optional<Figure> check_size_distribution_figure(const std::vector<TidyTable>& tables);

/// "check_reproductive_value": reproductive value of the pooled kernel per size, one line per
/// microsite and stage (table reproductive_value, kernel pooled).
std::optional<Figure> check_reproductive_value_figure(const std::vector<TidyTable>& tables);

/// "check_kernel" / "check_sensitivity" / "check_elasticity": heat maps of the pooled
/// kernel's surface (check_surfaces, `surface` = "kernel", "sensitivity", "elasticity"), one
/// panel per non-empty class block.
std::optional<Figure> check_surface_figure(const std::vector<TidyTable>& tables,
                                           const std::string& surface);

/// "check_year_contributions": contribution of each vital rate to λ_t − λ_pooled per census
/// year as grouped bars, with the total Δλ (table year_decomposition).
std::optional<Figure> check_year_contributions_figure(const std::vector<TidyTable>& tables);

/// Every model-checking figure the tables allow, in the order above.
std::vector<Figure> model_check_figures(const std::vector<TidyTable>& tables);

}  // namespace safesite::report
