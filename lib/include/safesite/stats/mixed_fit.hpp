#pragma once
/// \file mixed_fit.hpp
/// The result of a mixed-model fit: fixed effects, variance components, conditional modes of
/// the random effects, likelihood figures, diagnostics in words, and prediction.
///
/// Model (docs/methods/mixed-models.md):
/// \f[ g(\mathrm{E}[y_i \mid b]) = \eta_i = x_i^\top\beta + o_i + \sum_g z_{gi}^\top b_{g,\ell_g(i)},
///     \qquad b_{g,\ell} \sim N(0, \Sigma_g) \text{ independent,} \f]
/// with \f$ z_{gi} = 1 \f$ for a random intercept and \f$ z_{gi} = (1, x_i) \f$ with a random
/// slope. References: [Bates2015], [Breslow1993] in docs/references.md.

#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/glm.hpp"
#include "safesite/stats/grouping_factor.hpp"

namespace safesite::stats {

/// One standard deviation of the model: a random term of a grouping factor, or the residual
/// SD of a Gaussian model (group "residual", term "").
struct VarianceComponent {
    std::string group;          ///< grouping factor name, or "residual"
    std::string term;           ///< "(Intercept)" or the slope covariate's name
    double sd = 0.0;            ///< SD on the link scale (Gaussian: response units), ≥ 0
    double sd_se = 0.0;         ///< approximate standard error of `sd` (observed information,
                                ///< delta method); NaN when not available (boundary fits)
    double correlation = 0.0;   ///< slope terms with a correlated intercept: correlation with
                                ///< that intercept, in [−1, 1]; NaN otherwise
    bool boundary = false;      ///< true when the SD (or |correlation| = 1) sits on the boundary
};

/// Conditional modes of one grouping factor's random effects.
struct GroupEffects {
    std::string group;                  ///< grouping factor name
    std::vector<std::string> levels;    ///< level labels (rows of the matrices below)
    std::vector<std::string> terms;     ///< "(Intercept)" and, with a slope, its covariate
    Eigen::MatrixXd modes;              ///< levels × terms: \f$\tilde b\f$ (link scale)
    Eigen::MatrixXd conditional_variances;  ///< levels × terms: \f$\mathrm{Var}(b \mid y)\f$
                                            ///< (Laplace/Gaussian approximation, β fixed)
};

/// The result of fit_mixed or fit_mixed_core. Plain data plus prediction helpers.
struct MixedFit {
    Family family = Family::gaussian;
    Link link = Link::identity;
    bool reml = false;                       ///< Gaussian fitted by REML (criterion below)

    std::vector<std::string> fixed_names;    ///< design column names
    Eigen::VectorXd fixed;                   ///< \f$\hat\beta\f$
    Eigen::VectorXd fixed_se;                ///< standard errors of \f$\hat\beta\f$
    Eigen::MatrixXd fixed_cov;               ///< \f$\widehat{\mathrm{Cov}}(\hat\beta)\f$

    std::vector<VarianceComponent> variance_components;
    std::vector<GroupEffects> random_effects;
    Eigen::VectorXd theta;                   ///< optimiser parameters: relative Cholesky factors
    double sigma = 0.0;                      ///< Gaussian residual SD; NaN for other families

    double log_likelihood = 0.0;  ///< ML: log L (Laplace for non-Gaussian); REML: −½ REML criterion
    double aic = 0.0;             ///< −2 log L + 2 df
    int df = 0;                   ///< fixed effects + variance parameters (+ σ for Gaussian)
    int nobs = 0;                 ///< rows used
    int iterations = 0;           ///< objective evaluations of the outer optimisation(s)
    bool converged = false;
    std::vector<std::string> warnings;       ///< plain-language diagnostics

    /// Set by fit_mixed (formula front end): the learned design, to rebuild the fixed-effect
    /// columns for new data, and the table columns of the grouping factors and the slope.
    DesignSpec spec;
    bool has_spec = false;
    std::vector<std::string> group_columns;
    std::string slope_column;

    /// The random effect of `level` of `group` for `term` ("(Intercept)" or the slope
    /// covariate), 0 for a level not seen in the fit. Throws UsageError for an unknown
    /// group or term.
    double random_effect(const std::string& group, const std::string& level,
                         const std::string& term = "(Intercept)") const;

    /// Linear predictor for new rows: \f$\eta = X\beta + o\f$ plus, with `include_random`,
    /// each row's conditional modes (matched by level name; 0 for unseen levels). `groups`
    /// carry the new rows' level labels and slope covariates and are matched to the fitted
    /// factors by name; a fitted factor missing from `groups` contributes 0. Throws
    /// UsageError on a column-count or length mismatch.
    Eigen::VectorXd linear_predictor(const Eigen::MatrixXd& X, const Eigen::VectorXd& offset,
                                     const std::vector<GroupingFactor>& groups,
                                     bool include_random) const;
    /// Linear predictor for every row of `newdata` (fits made by fit_mixed only): the
    /// fixed part \f$x^\top\beta + o\f$ from the formula's columns, plus, with
    /// `include_random`, each row's conditional modes for the grouping columns present in
    /// `newdata` (a level not seen in the fit, a missing label or an absent grouping column
    /// contributes 0 — the population mean). Without `include_random` this is the "average
    /// year" (docs/methods/mixed-models.md). Rows with a missing predictor give NaN.
    /// Throws UsageError for a fit without formula or a missing random-slope column;
    /// FormulaError / DataError as DesignSpec does for missing columns or unknown levels.
    Eigen::VectorXd linear_predictor(const Table& newdata, bool include_random) const;
    /// Prediction for every row of `newdata` on the link scale (η, as linear_predictor) or
    /// the response scale (μ = g⁻¹(η)). With `include_random` each row uses its level's
    /// conditional mode (0 for unseen levels): a year kernel; without, fixed effects only:
    /// the "average year" kernel. Rows with a missing predictor give NaN. Throws as
    /// linear_predictor(const Table&, bool).
    Eigen::VectorXd predict(const Table& newdata, Scale scale, bool include_random) const;
    /// \f$\mu = g^{-1}(\eta)\f$ element-wise with this fit's link.
    Eigen::VectorXd inverse_link(const Eigen::VectorXd& eta) const;
};

}  // namespace safesite::stats
