#include "safesite/arrival/binomial_fit.hpp"

#include <cmath>
#include <limits>
#include <map>

#include "safesite/error.hpp"
#include "safesite/stats/design.hpp"
#include "safesite/stats/glm.hpp"
#include "safesite/stats/mixed_model.hpp"

namespace safesite::arrival {
namespace {

// Design matrix and offset of `data` for a fitted spec; every row must be complete.
void prediction_design(const stats::DesignSpec& spec, const stats::Table& data,
                       Eigen::MatrixXd& x, Eigen::VectorXd& offset) {
    const std::vector<std::size_t> rows = spec.complete_rows(data, false);
    if (rows.size() != data.rows())
        throw UsageError("prediction: " + std::to_string(data.rows() - rows.size()) +
                         " of the rows have missing predictor values");
    x = spec.model_matrix(data, rows);
    offset = spec.offset(data, rows);
}

// Binomial GLM by stats::fit_glm (IRLS; docs/methods/regression.md). Aliased columns (NaN
// coefficients) count as 0 in predictions, as fit_glm's own predict does.
void fit_plain(const stats::Table& data, stats::Link link, BinomialFit& fit) {
    stats::GlmOptions options;
    options.family = stats::Family::binomial;
    options.link = link;
    const stats::GlmFit g = stats::fit_glm(fit.formula, data, options);
    fit.spec = g.spec;
    fit.names = g.column_names;
    fit.coefficients = g.coefficients;
    fit.standard_errors = g.std_errors;
    fit.covariance = g.covariance;
    for (Eigen::Index j = 0; j < fit.coefficients.size(); ++j) {
        if (!std::isfinite(fit.coefficients[j])) {
            fit.coefficients[j] = 0.0;
            fit.covariance.row(j).setZero();
            fit.covariance.col(j).setZero();
        }
    }
    fit.log_likelihood = g.loglik;
    fit.aic = g.aic;
    fit.nobs = static_cast<int>(g.n_used);
    fit.converged = g.converged;
    fit.warnings = g.warnings;
}

// Binomial GLMM with a random intercept per grouping column, by the Laplace approximation of
// safesite::stats::fit_mixed_core (docs/methods/mixed-models.md).
void fit_grouped(const stats::Design& d, const stats::Table& data, stats::Link link,
                 const std::vector<std::string>& groups, BinomialFit& fit) {
    std::vector<stats::GroupingFactor> factors;
    for (const auto& g : groups) {
        if (!data.is_categorical(g))
            throw UsageError("binomial fit of \"" + fit.formula + "\": grouping column \"" + g +
                             "\" is not a categorical column of the data");
        const auto& column = data.categorical(g);
        stats::GroupingFactor f;
        f.name = g;
        std::map<std::string, int> index;
        for (std::size_t r : d.rows) {
            const std::string& label = column.values[r];
            auto [it, fresh] = index.emplace(label, static_cast<int>(f.level_names.size()));
            if (fresh) f.level_names.push_back(label);
            f.level.push_back(it->second);
        }
        factors.push_back(std::move(f));
    }
    stats::MixedOptions options;
    options.family = stats::Family::binomial;
    options.link = link;
    options.groups = groups;
    const stats::MixedFit m =
        stats::fit_mixed_core(d.X, d.y, d.trials, d.offset, factors, options, d.column_names);
    fit.coefficients = m.fixed;
    fit.standard_errors = m.fixed_se;
    fit.covariance = m.fixed_cov;
    fit.groups = groups;
    for (const auto& g : groups) {
        double sd = 0.0;
        double sd_se = std::numeric_limits<double>::quiet_NaN();
        for (const auto& vc : m.variance_components)
            if (vc.group == g && vc.term == "(Intercept)") {
                sd = vc.sd;
                sd_se = vc.sd_se;
            }
        fit.group_sd.push_back(sd);
        fit.group_sd_se.push_back(sd_se);
    }
    fit.log_likelihood = m.log_likelihood;
    fit.aic = m.aic;
    fit.converged = m.converged;
    fit.warnings = m.warnings;
}

}  // namespace

Eigen::VectorXd BinomialFit::linear_predictor(const stats::Table& data) const {
    Eigen::MatrixXd x;
    Eigen::VectorXd offset;
    prediction_design(spec, data, x, offset);
    return x * coefficients + offset;
}

Eigen::VectorXd BinomialFit::linear_predictor_se(const stats::Table& data) const {
    Eigen::MatrixXd x;
    Eigen::VectorXd offset;
    prediction_design(spec, data, x, offset);
    // se_i² = x_iᵀ V x_i.
    return (x * covariance).cwiseProduct(x).rowwise().sum().cwiseSqrt();
}

double BinomialFit::total_group_sd() const {
    double v = 0.0;
    for (double s : group_sd) v += s * s;
    return std::sqrt(v);
}

BinomialFit fit_binomial(const stats::Table& data, const std::string& formula, stats::Link link,
                         const std::vector<std::string>& groups) {
    BinomialFit fit;
    fit.formula = formula;
    fit.link = link;
    if (groups.empty()) {
        fit_plain(data, link, fit);
        return fit;
    }
    stats::DesignOptions options;
    options.also_required = groups;
    const stats::Design d = stats::build_design(formula, data, options);
    fit.spec = d.spec;
    fit.names = d.column_names;
    fit.nobs = static_cast<int>(d.X.rows());
    fit_grouped(d, data, link, groups, fit);
    return fit;
}

}  // namespace safesite::arrival
