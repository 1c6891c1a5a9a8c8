#pragma once
/// \file glm.hpp
/// Generalized linear models fitted by iteratively reweighted least squares (IRLS), and fixed
/// models with given coefficients, with prediction on new data.
///
/// Model: \f$g(\mu_i) = \eta_i = x_i^\top\beta + o_i\f$ with the family's distribution for
/// \f$y_i\f$ (family.hpp). Estimation: IRLS with a rank-revealing QR solve of each weighted
/// least-squares step (McCullagh & Nelder 1989, §2.5; Green 1984); negative binomial θ and the
/// spread parameters γ by maximum likelihood, alternating with the IRLS for β.
/// Methods, equations and output columns: docs/methods/regression.md.
///
/// Usage:
///
///     GlmOptions opt;
///     opt.family = Family::binomial;
///     GlmFit fit = fit_glm("survived ~ size + microsite", transitions, opt);
///     Eigen::VectorXd p = fit.predict(mesh_table);          // survival probability
///     for (const auto& w : fit.warnings) ...                 // plain-language warnings

#include <array>
#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/formula.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::stats {

/// Scale of a prediction: the linear predictor η or the mean μ = g⁻¹(η).
enum class Scale { link, response };

/// Options of fit_glm.
struct GlmOptions {
    Family family = Family::gaussian;
    std::optional<Link> link;          ///< default: canonical_link(family)
    /// Prior weights, one per table row (not per used row), ≥ 0; empty = all 1.
    std::vector<double> prior_weights;
    /// gaussian_spread: the x of \f$\sigma(x)=\exp(\gamma_0+\gamma_1 x)\f$, a numeric column or a
    /// log/pow expression of one (rows where it is missing are dropped).
    std::string spread_column = "size";
    int max_iterations = 100;          ///< IRLS (and outer θ / γ) iterations, ≥ 1
    /// Convergence: \f$|D_k - D_{k-1}| / (|D_k| + 0.1) <\f$ tolerance for the deviance D
    /// (and the same relative change for θ and γ), > 0.
    double tolerance = 1e-10;
    /// Extra columns whose missing values drop rows (e.g. grouping factors), so that
    /// candidate models are compared on the same rows.
    std::vector<std::string> also_required;
};

/// One row of a coefficient table (docs/methods/regression.md, "Output columns").
struct CoefficientRow {
    std::string term;     ///< design column name
    double estimate;      ///< \f$\hat\beta_j\f$ (NaN when aliased)
    double std_error;     ///< \f$\sqrt{\hat V_{jj}}\f$
    double statistic;     ///< \f$\hat\beta_j / \mathrm{SE}_j\f$: t (Gaussian) or z (others)
    double p_value;       ///< two-sided, from t(df_residual) or N(0, 1)
};

/// Prediction with delta-method standard errors.
struct Prediction {
    Eigen::VectorXd fit;  ///< η or μ per row of the new table (NaN where a value is missing)
    Eigen::VectorXd se;   ///< standard error on the same scale
};

/// A fitted (or fixed) GLM. All vectors are indexed like `column_names`.
struct GlmFit {
    Family family = Family::gaussian;
    Link link = Link::identity;
    DesignSpec spec;                         ///< terms object: rebuilds columns for new data
    std::vector<std::string> column_names;
    Eigen::VectorXd coefficients;            ///< NaN for aliased columns
    Eigen::VectorXd std_errors;              ///< NaN for aliased columns (0 for fixed models)
    Eigen::VectorXd statistics;              ///< t (gaussian) or z, NaN when aliased
    Eigen::VectorXd p_values;                ///< two-sided
    std::vector<bool> aliased;               ///< linearly dependent on earlier columns
    Eigen::MatrixXd covariance;              ///< p × p; NaN rows/columns for aliased ones
    bool t_statistics = false;               ///< gaussian: t with df_residual; else z

    double deviance = 0.0;                   ///< residual deviance (see regression.md)
    double null_deviance = 0.0;              ///< deviance of the intercept-only (or offset) model
    double df_residual = 0.0;                ///< n − rank
    double df_null = 0.0;                    ///< n − 1 (n without intercept)
    double loglik = 0.0;                     ///< maximised log-likelihood
    double aic = 0.0;                        ///< −2 loglik + 2 k
    int n_parameters = 0;                    ///< k: rank + σ (gaussian) + θ (negbin) + 2 (γ)
    int rank = 0;
    int iterations = 0;                      ///< IRLS iterations (total over outer loops)
    bool converged = false;
    bool separation = false;                 ///< binomial: (quasi-)complete separation found
    std::size_t n_used = 0;                  ///< rows used
    std::size_t n_dropped = 0;               ///< rows dropped for missing values

    double theta = 0.0;                      ///< negbin dispersion θ (Var = μ + μ²/θ)
    double theta_se = 0.0;                   ///< its SE from the observed information
    double sigma = 0.0;                      ///< gaussian: residual SD √(Σw r²/df_residual)
    std::array<double, 2> spread{0.0, 0.0};     ///< gaussian_spread: γ0, γ1
    std::array<double, 2> spread_se{0.0, 0.0};  ///< their SEs (expected information)
    NumExpr spread_x;                        ///< gaussian_spread: the x of σ(x)

    bool fixed = false;                      ///< built by fixed_glm (no data)
    std::vector<std::string> warnings;       ///< plain-language warnings (regression.md)

    /// Coefficient by design column name; throws UsageError listing the names when unknown.
    double coefficient(const std::string& name) const;
    /// The coefficient table rows in column order.
    std::vector<CoefficientRow> coefficient_table() const;

    /// Predict for every row of `newdata` (which needs the predictor and offset columns;
    /// factor labels must be levels of the fitted model). Aliased columns are left out
    /// (their coefficients count as 0). Rows with a missing value give NaN.
    /// Throws FormulaError (missing or mistyped column) or DataError (unknown level).
    Eigen::VectorXd predict(const Table& newdata, Scale scale = Scale::response) const;
    /// Prediction with standard errors by the delta method:
    /// \f$\mathrm{se}(\hat\eta)=\sqrt{x^\top \hat V x}\f$, \f$\mathrm{se}(\hat\mu) =
    /// |d\mu/d\eta|\,\mathrm{se}(\hat\eta)\f$.
    Prediction predict_with_se(const Table& newdata, Scale scale = Scale::response) const;
    /// Residual SD at spread value x: σ (gaussian) or \f$\exp(\gamma_0+\gamma_1 x)\f$
    /// (gaussian_spread). Throws UsageError for the other families.
    double sd_at(double x) const;
    /// Residual SD per row of `newdata` (gaussian_spread evaluates the spread expression).
    Eigen::VectorXd sd(const Table& newdata) const;
};

/// Fit a GLM of `formula` to `data`. Throws FormulaError / DataError (bad formula or data:
/// binomial y outside [0, trials], negative counts, non-finite values), UsageError (bad
/// options: link not admissible, wrong number of prior weights, no rows), NumericalError
/// (non-finite deviance). Non-convergence, separation and rank deficiency are warnings.
GlmFit fit_glm(const std::string& formula, const Table& data, const GlmOptions& options);
/// Same with a parsed formula.
GlmFit fit_glm(const Formula& formula, const Table& data, const GlmOptions& options);

/// Extra parameters of a fixed model.
struct FixedExtras {
    std::optional<double> sigma;                    ///< gaussian: residual SD > 0
    std::optional<std::array<double, 2>> spread;    ///< gaussian_spread: γ0, γ1
    std::optional<double> theta;                    ///< negbin: θ > 0
    std::string spread_column = "size";             ///< gaussian_spread: x of σ(x)
};

/// A model with given coefficients (truth files, models without data), predicting exactly as
/// a fitted one. The terms are learned from `level_template` (its columns, factor levels and,
/// for orthpoly/nspline, its values). Every design column needs a coefficient: throws
/// SpecError with key = the name for an unknown name and for a missing one (the message
/// lists the expected names); UsageError when an extra parameter the family needs is absent.
GlmFit fixed_glm(const std::string& formula, const std::map<std::string, double>& coefficients,
                 Family family, std::optional<Link> link, const Table& level_template,
                 const FixedExtras& extras = {});

}  // namespace safesite::stats
