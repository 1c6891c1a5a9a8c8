// GlmFit methods (coefficient access, prediction with delta-method standard errors, residual
// spread) and fixed models with given coefficients.
#include <cmath>
#include <limits>

#include "safesite/stats/glm.hpp"
#include "stats/detail/design_detail.hpp"

namespace safesite::stats {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

std::string name_list(const std::vector<std::string>& names) {
    std::string s;
    for (const auto& n : names) {
        if (!s.empty()) s += ", ";
        s += n;
    }
    return s;
}

}  // namespace

double GlmFit::coefficient(const std::string& name) const {
    for (std::size_t j = 0; j < column_names.size(); ++j)
        if (column_names[j] == name) return coefficients[static_cast<Eigen::Index>(j)];
    throw UsageError("no coefficient '" + name + "'; the coefficients are: " +
                     name_list(column_names));
}

std::vector<CoefficientRow> GlmFit::coefficient_table() const {
    std::vector<CoefficientRow> out;
    for (std::size_t j = 0; j < column_names.size(); ++j) {
        const auto i = static_cast<Eigen::Index>(j);
        out.push_back({column_names[j], coefficients[i], std_errors[i], statistics[i], p_values[i]});
    }
    return out;
}

Eigen::VectorXd GlmFit::predict(const Table& newdata, Scale scale) const {
    return predict_with_se(newdata, scale).fit;
}

// η = Σ_{j not aliased} x_j β_j + o;  se(η)² = x_Kᵀ V_KK x_K over the kept columns K;
// μ = g⁻¹(η), se(μ) = |dμ/dη| se(η) (delta method).
Prediction GlmFit::predict_with_se(const Table& newdata, Scale scale) const {
    const auto rows = spec.complete_rows(newdata, false);
    const Eigen::MatrixXd X = spec.model_matrix(newdata, rows);
    const Eigen::VectorXd off = spec.offset(newdata, rows);
    std::vector<Eigen::Index> kept;
    for (Eigen::Index j = 0; j < X.cols(); ++j)
        if (!aliased[static_cast<std::size_t>(j)]) kept.push_back(j);
    const auto q = static_cast<Eigen::Index>(kept.size());
    Eigen::MatrixXd Xk(X.rows(), q);
    Eigen::VectorXd bk(q);
    Eigen::MatrixXd Vk(q, q);
    for (Eigen::Index a = 0; a < q; ++a) {
        Xk.col(a) = X.col(kept[static_cast<std::size_t>(a)]);
        bk[a] = coefficients[kept[static_cast<std::size_t>(a)]];
        for (Eigen::Index b = 0; b < q; ++b)
            Vk(a, b) = covariance(kept[static_cast<std::size_t>(a)], kept[static_cast<std::size_t>(b)]);
    }
    const Eigen::VectorXd eta = Xk * bk + off;
    const Eigen::VectorXd se_eta = ((Xk * Vk).cwiseProduct(Xk)).rowwise().sum().cwiseMax(0.0).cwiseSqrt();
    const auto n = static_cast<Eigen::Index>(newdata.rows());
    Prediction out{Eigen::VectorXd::Constant(n, k_nan), Eigen::VectorXd::Constant(n, k_nan)};
    for (std::size_t i = 0; i < rows.size(); ++i) {
        const auto r = static_cast<Eigen::Index>(rows[i]);
        const auto k = static_cast<Eigen::Index>(i);
        if (scale == Scale::link) {
            out.fit[r] = eta[k];
            out.se[r] = se_eta[k];
        } else {
            out.fit[r] = link == Link::identity ? eta[k] : inverse_link(link, eta[k]);
            out.se[r] = std::abs(inverse_link_derivative(link, eta[k])) * se_eta[k];
        }
    }
    return out;
}

double GlmFit::sd_at(double x) const {
    if (family == Family::gaussian) return sigma;
    if (family == Family::gaussian_spread) return std::exp(spread[0] + spread[1] * x);
    throw UsageError("a residual SD exists for the gaussian families only, not '" +
                     to_string(family) + "'");
}

Eigen::VectorXd GlmFit::sd(const Table& newdata) const {
    const auto n = static_cast<Eigen::Index>(newdata.rows());
    if (family == Family::gaussian) return Eigen::VectorXd::Constant(n, sigma);
    if (family != Family::gaussian_spread) (void)sd_at(0.0);  // throws
    std::vector<std::size_t> all(newdata.rows());
    for (std::size_t i = 0; i < all.size(); ++i) all[i] = i;
    for (const auto& c : spread_x.columns())
        if (!newdata.is_numeric(c))
            throw UsageError("the spread needs the numeric column '" + c + "'; the columns are: " +
                             name_list(newdata.names()));
    const Eigen::VectorXd x = detail::evaluate(spread_x, newdata, all, "spread");
    return (spread[0] + spread[1] * x.array()).exp().matrix();
}

GlmFit fixed_glm(const std::string& formula, const std::map<std::string, double>& coefficients,
                 Family family, std::optional<Link> link, const Table& level_template,
                 const FixedExtras& extras) {
    GlmFit fit;
    fit.family = family;
    fit.link = link.value_or(canonical_link(family));
    check_link(family, fit.link);
    const Formula f = parse_formula(formula);
    const DesignSpec probe = DesignSpec::learn_types(f, level_template);
    const auto rows = probe.complete_rows(level_template, false);
    fit.spec = DesignSpec::learn(f, level_template, rows);
    fit.column_names = fit.spec.column_names();
    const auto p = static_cast<Eigen::Index>(fit.column_names.size());

    for (const auto& [name, value] : coefficients) {
        (void)value;
        bool known = false;
        for (const auto& c : fit.column_names) known = known || c == name;
        if (!known) {
            SourceLocation where;
            where.key = name;
            throw SpecError(where, "formula '" + formula + "' has no column '" + name +
                                       "'; the coefficients are: " + name_list(fit.column_names));
        }
    }
    fit.coefficients.resize(p);
    for (Eigen::Index j = 0; j < p; ++j) {
        const auto& name = fit.column_names[static_cast<std::size_t>(j)];
        auto it = coefficients.find(name);
        if (it == coefficients.end()) {
            SourceLocation where;
            where.key = name;
            throw SpecError(where, "formula '" + formula + "' needs a coefficient '" + name +
                                       "'; the coefficients are: " + name_list(fit.column_names));
        }
        fit.coefficients[j] = it->second;
    }
    fit.aliased.assign(static_cast<std::size_t>(p), false);
    fit.std_errors = Eigen::VectorXd::Zero(p);
    fit.statistics = Eigen::VectorXd::Constant(p, k_nan);
    fit.p_values = Eigen::VectorXd::Constant(p, k_nan);
    fit.covariance = Eigen::MatrixXd::Zero(p, p);
    fit.rank = static_cast<int>(p);
    fit.converged = true;
    fit.fixed = true;
    fit.t_statistics = family == Family::gaussian;
    switch (family) {
        case Family::gaussian:
            if (!extras.sigma || !(*extras.sigma > 0.0))
                throw UsageError("a fixed gaussian model needs sigma > 0");
            fit.sigma = *extras.sigma;
            break;
        case Family::gaussian_spread:
            if (!extras.spread) throw UsageError("a fixed gaussian-spread model needs gamma0, gamma1");
            fit.spread = *extras.spread;
            fit.spread_x = parse_numeric_expression(extras.spread_column, "spread");
            break;
        case Family::negbin:
            if (!extras.theta || !(*extras.theta > 0.0))
                throw UsageError("a fixed negbin model needs theta > 0");
            fit.theta = *extras.theta;
            break;
        default: break;
    }
    return fit;
}

}  // namespace safesite::stats
