#include "safesite/arrival/binomial_fit.hpp"

#include <cmath>
#include <map>

#include <Eigen/Cholesky>

#include "safesite/error.hpp"
#include "safesite/stats/design.hpp"
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

// Binomial GLM by iteratively reweighted least squares (McCullagh & Nelder 1989, section
// 2.5): z = η − o + (y/n − μ)/μ'(η), w = n μ'(η)² / (μ(1 − μ)), β ← (XᵀWX)⁻¹XᵀWz, until the
// deviance changes by less than 1e-10 relative (common practice).
void irls_binomial(const stats::Design& d, stats::Link link, BinomialFit& fit) {
    const Eigen::Index n = d.X.rows(), p = d.X.cols();
    Eigen::VectorXd beta = Eigen::VectorXd::Zero(p);
    Eigen::VectorXd eta(n);
    // Start from the empirical proportions, shrunk away from 0 and 1 (common practice).
    for (Eigen::Index i = 0; i < n; ++i) {
        const double mu = (d.y[i] + 0.5) / (d.trials[i] + 1.0);
        eta[i] = stats::link_function(link, mu);
    }
    double deviance_old = INFINITY, loglik = 0.0;
    Eigen::MatrixXd xtwx(p, p);
    fit.converged = false;
    for (int iter = 0; iter < 100; ++iter) {
        Eigen::VectorXd w(n), z(n);
        for (Eigen::Index i = 0; i < n; ++i) {
            const double mu = stats::inverse_link(link, eta[i]);
            const double dmu = stats::inverse_link_derivative(link, eta[i]);
            const double prop = d.y[i] / d.trials[i];
            z[i] = eta[i] - d.offset[i] + (prop - mu) / dmu;
            w[i] = d.trials[i] * dmu * dmu / (mu * (1.0 - mu));
        }
        xtwx = d.X.transpose() * w.asDiagonal() * d.X;
        Eigen::LDLT<Eigen::MatrixXd> solver(xtwx);
        if (solver.info() != Eigen::Success || !solver.isPositive())
            throw NumericalError("binomial fit of \"" + fit.formula + "\": singular design");
        beta = solver.solve(d.X.transpose() * w.asDiagonal() * z);
        eta = d.X * beta + d.offset;
        double deviance = 0.0;
        loglik = 0.0;
        for (Eigen::Index i = 0; i < n; ++i) {
            const double mu = stats::inverse_link(link, eta[i]);
            const double y = d.y[i], m = d.trials[i];
            loglik += std::lgamma(m + 1) - std::lgamma(y + 1) - std::lgamma(m - y + 1) +
                      y * std::log(mu) + (m - y) * std::log1p(-mu);
            if (y > 0) deviance += 2 * y * std::log(y / (m * mu));
            if (y < m) deviance += 2 * (m - y) * std::log((m - y) / (m * (1 - mu)));
        }
        if (!std::isfinite(deviance))
            throw NumericalError("binomial fit of \"" + fit.formula + "\": non-finite deviance");
        if (std::abs(deviance - deviance_old) <= 1e-10 * (std::abs(deviance) + 0.1)) {
            fit.converged = true;
            break;
        }
        deviance_old = deviance;
    }
    // Covariance (XᵀWX)⁻¹ at the final β.
    Eigen::VectorXd w(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double mu = stats::inverse_link(link, eta[i]);
        const double dmu = stats::inverse_link_derivative(link, eta[i]);
        w[i] = d.trials[i] * dmu * dmu / (mu * (1.0 - mu));
    }
    xtwx = d.X.transpose() * w.asDiagonal() * d.X;
    fit.coefficients = beta;
    fit.covariance = xtwx.ldlt().solve(Eigen::MatrixXd::Identity(p, p));
    fit.standard_errors = fit.covariance.diagonal().cwiseSqrt();
    fit.log_likelihood = loglik;
    fit.aic = -2.0 * loglik + 2.0 * static_cast<double>(p);
    if (!fit.converged) fit.warnings.push_back("IRLS did not converge in 100 iterations");
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
        for (const auto& vc : m.variance_components)
            if (vc.group == g && vc.term == "(Intercept)") sd = vc.sd;
        fit.group_sd.push_back(sd);
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
    stats::DesignOptions options;
    options.also_required = groups;
    const stats::Design d = stats::build_design(formula, data, options);
    BinomialFit fit;
    fit.formula = formula;
    fit.link = link;
    fit.spec = d.spec;
    fit.names = d.column_names;
    fit.nobs = static_cast<int>(d.X.rows());
    if (groups.empty()) {
        irls_binomial(d, link, fit);
    } else {
        fit_grouped(d, data, link, groups, fit);
    }
    return fit;
}

}  // namespace safesite::arrival
