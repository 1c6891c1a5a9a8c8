#pragma once
// Predictions for kernels from fitted or given regressions: η = X β + offset (+ year shift,
// + the year's conditional modes) through the inverse link, with X built by the stats
// module's DesignSpec on the covariate table (the same columns as in the fit).

#include <map>
#include <string>

#include <Eigen/Core>

#include "safesite/pipeline/kernel_rates.hpp"
#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/glm.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/mixed_fit.hpp"

namespace safesite::pipeline::detail {

/// A fitted or fixed GLM bound for kernels: mean g⁻¹(η + shift[year]) with η the fit's
/// linear predictor on the new rows; `shift` maps year labels to an additive change of η
/// (truth files; empty for fitted models). For the Gaussian families `sd` is the fit's
/// residual SD per row.
BoundRate glm_rate(const stats::GlmFit& fit, std::map<std::string, double> shift = {});

/// g⁻¹(X β + offset [+ b_year + b_year,slope x]) from a mixed model: with `year_effects`
/// the conditional modes of the row's year are added (0 for a year the fit did not see);
/// other grouping factors (plot, plant) always contribute 0 (population-level rates).
/// `slope_column` names the random-slope covariate of year ("" for none).
TablePrediction mixed_mean(stats::DesignSpec design, stats::MixedFit fit, bool year_effects,
                           std::string slope_column);

/// A constant SD (Gaussian residual SD), > 0.
TablePrediction constant_sd(double sd);

}  // namespace safesite::pipeline::detail
