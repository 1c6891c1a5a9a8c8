#pragma once
/// \file binomial_fit.hpp
/// The fitted binomial regression behind the trapping and retention models: a formula's
/// design constants, the coefficients with their covariance, and the SDs of random
/// intercepts when grouping factors were given. Prediction rebuilds the design columns for new
/// rows exactly as for the training data.

#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::arrival {

/// A binomial GLM (fixed effects) or GLMM (random intercepts for `groups`, Laplace
/// approximation) fitted by safesite::stats.
struct BinomialFit {
    std::string formula;                    ///< formula as fitted
    stats::Link link = stats::Link::logit;  ///< link g with g(μ) = η
    stats::DesignSpec spec;                 ///< rebuilds the design columns for new rows
    std::vector<std::string> names;         ///< coefficient names (docs/formats.md)
    Eigen::VectorXd coefficients;           ///< β̂ (link scale)
    Eigen::VectorXd standard_errors;        ///< se(β̂)
    Eigen::MatrixXd covariance;             ///< Cov(β̂)
    std::vector<std::string> groups;        ///< grouping factors with a random intercept
    std::vector<double> group_sd;           ///< SD of each group's intercepts (link scale)
    /// Standard error of each group_sd (observed information, delta method; NaN at a boundary
    /// fit, SD = 0, or when the information is not positive definite: docs/methods/
    /// mixed-models.md).
    std::vector<double> group_sd_se;
    double log_likelihood = 0.0;            ///< log L (Laplace approximation for GLMMs)
    double aic = 0.0;
    int nobs = 0;                           ///< rows used
    bool converged = false;
    std::vector<std::string> warnings;      ///< plain-language diagnostics from the fitter

    /// Linear predictor xᵀβ̂ + offset for the rows of `data` (random effects at 0). `data`
    /// must hold the predictor and offset columns; categorical values must be training
    /// levels. Throws stats::FormulaError / DataError as the design code does.
    Eigen::VectorXd linear_predictor(const stats::Table& data) const;
    /// Standard error of xᵀβ̂ for each row of `data` (offsets carry no uncertainty).
    Eigen::VectorXd linear_predictor_se(const stats::Table& data) const;
    /// √(Σ_g sd_g²): SD of the sum of the random intercepts (0 for a GLM).
    double total_group_sd() const;
};

/// Fit `formula` as a binomial regression with `link` on `data`; with `groups` non-empty, a
/// random intercept for each grouping column (a GLMM). Throws stats::FormulaError for a
/// formula that does not fit the table, UsageError for a group column that is not
/// categorical, NumericalError when the fitter fails. Non-convergence is reported in the
/// result (`converged`, `warnings`), not thrown.
BinomialFit fit_binomial(const stats::Table& data, const std::string& formula, stats::Link link,
                         const std::vector<std::string>& groups = {});

}  // namespace safesite::arrival
