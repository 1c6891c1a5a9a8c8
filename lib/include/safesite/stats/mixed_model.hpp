#pragma once
/// \file mixed_model.hpp
/// Fitting mixed models (random intercepts for one or more grouping factors, nested or
/// crossed, and a random slope by one factor): Gaussian by REML or ML through the profiled
/// likelihood; binomial (logit, probit, cloglog) and Poisson (log) by the Laplace
/// approximation with penalised IRLS inside. Method: docs/methods/mixed-models.md;
/// references [Bates2015], [Breslow1993], [Powell2009] in docs/references.md.

#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/family.hpp"
#include "safesite/stats/grouping_factor.hpp"
#include "safesite/stats/mixed_fit.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::stats {

/// Options of a mixed-model fit.
struct MixedOptions {
    Family family = Family::gaussian;  ///< gaussian, binomial or poisson
    std::optional<Link> link;          ///< default: the canonical link of the family
    /// Grouping columns with a random intercept each (fit_mixed only; the model file's
    /// `groups` key, plus "year" when a rate's year handling is "random").
    std::vector<std::string> groups;
    /// Numeric column with a random slope (fit_mixed only; model file key `random_slope`);
    /// empty for none.
    std::string slope_column;
    /// The grouping factor that carries the random slope; must be one of `groups`.
    std::string slope_group = "year";
    /// Intercept and slope of the slope group correlated (unstructured 2×2 covariance, the
    /// default) or independent (diagonal).
    bool correlated_slope = true;
    bool reml = true;                  ///< Gaussian only: REML (default) or ML
    int max_evaluations = 10000;       ///< cap on objective evaluations per optimisation stage
};

/// Fit a mixed model to plain arrays.
///
/// \param X        n × p fixed-effect design (full column rank, p ≥ 1)
/// \param y        response: Gaussian values; binomial successes 0 ≤ y ≤ trials; Poisson
///                 counts ≥ 0
/// \param trials   binomial trials (length n; ignored otherwise, may be empty then)
/// \param offset   offset on the link scale (length n, or empty for none)
/// \param groups   grouping factors (at least one), with an optional random slope each
/// \param options  family, link, REML/ML, slope correlation, evaluation cap
/// \param column_names names of the columns of X (empty: "x1".."xp")
/// \throws UsageError for inconsistent sizes, an unsupported family or link, or bad values;
///         NumericalError when X is rank deficient or no finite criterion can be computed.
/// Non-convergence and boundary fits are not errors: they are flagged in the result.
MixedFit fit_mixed_core(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                        const Eigen::VectorXd& trials, const Eigen::VectorXd& offset,
                        const std::vector<GroupingFactor>& groups, const MixedOptions& options,
                        const std::vector<std::string>& column_names = {});

/// Fit a mixed model of `formula` (fixed effects only, docs/formats.md; random terms are
/// never written in the formula) to `data`, with a random intercept for every column named
/// in `options.groups` and, when `options.slope_column` is set, a random slope of that
/// numeric column by `options.slope_group`.
///
/// Grouping columns may be categorical (levels in the column's level order) or numeric
/// (e.g. an integer year; levels in numeric order, labelled by their value). Rows with a
/// missing value in the formula's columns, a grouping column or the slope column are left
/// out, as by build_design. Only levels present in the used rows become levels of the fit.
///
/// \throws FormulaError for a formula error or an unknown / mistyped column; UsageError when
///         `groups` is empty, names a column twice, or `slope_group` is not one of `groups`,
///         or the slope column is not numeric; the errors of fit_mixed_core otherwise.
MixedFit fit_mixed(const std::string& formula, const Table& data, const MixedOptions& options);

}  // namespace safesite::stats
