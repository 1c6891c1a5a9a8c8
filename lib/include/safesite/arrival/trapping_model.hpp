#pragma once
/// \file trapping_model.hpp
/// The trapping model: a binomial regression (logit link) of trapped out of launched on
/// neighbour size, growth form and seed type, the neighbour as a grouping factor; and the
/// trapping probability τ_f of each form for the focal seed type, averaged over the sizes of
/// the neighbours a seed may meet (docs/methods/arrival.md, "The trapping model").

#include <map>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/arrival/binomial_fit.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::arrival {

/// The default trapping formula (model file key `[arrival] trapping_formula`).
inline constexpr const char* default_trapping_formula =
    "trapped / launched ~ log(neighbour_size) + form + seed_type";

/// Fit the trapping model to a table from trapping_table(): binomial, logit link, random
/// intercepts for `groups` (e.g. {"neighbour"}). Throws as fit_binomial.
BinomialFit fit_trapping(const stats::Table& trials,
                         const std::string& formula = default_trapping_formula,
                         const std::vector<std::string>& groups = {});

/// Mean trapping probability over neighbours with linear predictors η_i (logit scale) and a
/// neighbour random intercept b ~ N(0, sd²):
/// \f[ \bar\tau = \frac{1}{n}\sum_{i=1}^{n} \mathrm{E}_b\!\left[\operatorname{logit}^{-1}
///     (\eta_i + b)\right], \f]
/// the expectation by a 40-node Gauss–Hermite rule (error far below 1e-10 for sd ≤ 3; exact
/// evaluation when sd = 0). Throws UsageError for an empty η or sd < 0.
double average_trapping(const Eigen::VectorXd& eta, double sd = 0.0);

/// τ_f of each form for `seed_type`: the fitted model's linear predictor at each size in
/// `sizes_by_form[f]` (raw scale, > 0), averaged with average_trapping() over the sizes and
/// the random intercepts' total SD (fit.total_group_sd()). The prediction table holds the
/// columns neighbour_size, form and seed_type; a formula reading any other column throws
/// stats::FormulaError. Throws UsageError when a form has no sizes or a size is ≤ 0, and
/// DataError/UsageError when a form or the seed type was not in the trapping data.
std::map<std::string, double> trapping_by_form(
    const BinomialFit& fit, const std::string& seed_type,
    const std::map<std::string, std::vector<double>>& sizes_by_form);

}  // namespace safesite::arrival
