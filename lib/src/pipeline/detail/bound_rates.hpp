#pragma once
// Predictions for kernels from fitted or given regressions: η = X β + offset (+ year shift,
// + the year's conditional modes) through the inverse link, with X built by the stats
// module's DesignSpec on the covariate table (the same columns as in the fit).

#include <map>
#include <string>

#include <Eigen/Core>

#include "safesite/pipeline/kernel_rates.hpp"
#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/mixed_fit.hpp"

namespace safesite::pipeline::detail {

/// g⁻¹(X β + offset + shift[year]) for a GLM (or the fixed part of a mixed model); `shift`
/// maps year labels to an additive change of the linear predictor (truth files; empty for
/// fitted models).
TablePrediction glm_mean(stats::DesignSpec design, Eigen::VectorXd beta, stats::Link link,
                         std::map<std::string, double> shift = {});

/// g⁻¹(X β + offset + b_year + b_year,slope x) with the conditional modes of the row's year
/// (0 for a year the fit did not see); other grouping factors contribute 0.
/// `slope_column` names the random-slope covariate ("" for none).
TablePrediction mixed_mean(stats::DesignSpec design, stats::MixedFit fit,
                           std::string slope_column);

/// A constant SD (Gaussian residual SD), > 0.
TablePrediction constant_sd(double sd);

/// SD = exp(γ0 + γ1 x) with x the numeric expression `spread` (a column, `log(col)`, ...)
/// evaluated on the table (gaussian-spread growth).
TablePrediction spread_sd(std::string spread, double gamma0, double gamma1);

}  // namespace safesite::pipeline::detail
