// Fitting GLMs: data checks, aliasing, IRLS, the dispersion parameters of the negative
// binomial (θ) and of the Gaussian spread model (γ), inference and warnings.
//
// References (docs/references.md):
//  [1] McCullagh, P. & Nelder, J. A. (1989) Generalized Linear Models, 2nd ed.
//  [2] Lawless, J. F. (1987) Can. J. Stat. 15:209–225 — negative binomial regression, ML for
//      the dispersion alternating with β.
//  [3] Aitkin, M. (1987) Appl. Stat. 36:332–339 — joint modelling of mean and variance
//      (log-linear variance model fitted by alternating scoring).
//  [4] Albert, A. & Anderson, J. A. (1984) Biometrika 71:1–10 — (quasi-)complete separation
//      in logistic regression: the MLE does not exist.
#include "safesite/stats/glm.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <Eigen/Dense>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <boost/math/special_functions/digamma.hpp>
#include <boost/math/special_functions/gamma.hpp>
#include <boost/math/special_functions/trigamma.hpp>

#include "core/number_text.hpp"
#include "safesite/stats/design.hpp"
#include "stats/detail/design_detail.hpp"
#include "stats/detail/irls.hpp"

namespace safesite::stats {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();
constexpr double k_theta_max = 1e8;

std::string fmt(double v) { return core::number_text(v, 4); }

// Log-likelihood of the fitted means (μ a proportion for binomial).
double log_likelihood(const detail::IrlsProblem& p, const Eigen::VectorXd& mu,
                      const Eigen::VectorXd* sigma) {
    using boost::math::lgamma;
    double ll = 0.0;
    const Eigen::Index n = p.y.size();
    if (p.family == Family::gaussian) {
        // Profile over σ²: σ̂² = D/n_w (ML), n_w the rows with positive weight [1, §8.3].
        double dev = 0.0, sum_log_w = 0.0;
        double nw = 0.0;
        for (Eigen::Index i = 0; i < n; ++i) {
            if (p.w[i] <= 0.0) continue;
            dev += p.w[i] * (p.y[i] - mu[i]) * (p.y[i] - mu[i]);
            sum_log_w += std::log(p.w[i]);
            nw += 1.0;
        }
        return -0.5 * (nw * (std::log(2.0 * M_PI * dev / nw) + 1.0) - sum_log_w);
    }
    for (Eigen::Index i = 0; i < n; ++i) {
        const double w = p.w[i];
        if (w <= 0.0) continue;
        const double y = p.y[i];
        const double m = mu[i];
        double li = 0.0;
        switch (p.family) {
            case Family::binomial: {
                const double t = p.m[i];
                li = lgamma(t + 1.0) - lgamma(y + 1.0) - lgamma(t - y + 1.0);
                if (y > 0) li += y * std::log(m);
                if (t - y > 0) li += (t - y) * std::log1p(-m);
                break;
            }
            case Family::poisson:
                li = (y > 0 ? y * std::log(m) : 0.0) - m - lgamma(y + 1.0);
                break;
            case Family::negbin: {
                const double th = p.theta;
                li = lgamma(y + th) - lgamma(th) - lgamma(y + 1.0) +
                     th * std::log(th / (th + m)) + (y > 0 ? y * std::log(m / (th + m)) : 0.0);
                break;
            }
            case Family::gaussian_spread: {
                const double s = (*sigma)[i];
                const double r = (y - m) / s;
                li = -0.5 * std::log(2.0 * M_PI) - std::log(s) - 0.5 * r * r;
                break;
            }
            case Family::gaussian: break;
        }
        ll += w * li;
    }
    return ll;
}

// θ by maximum likelihood for fixed means [2]: Newton's method on t = log θ with the score
//   s(θ) = Σ w [ψ(y+θ) − ψ(θ) + log θ + 1 − log(θ+μ) − (y+θ)/(θ+μ)]
// and its derivative
//   h(θ) = Σ w [ψ'(y+θ) − ψ'(θ) + 1/θ − 2/(θ+μ) + (y+θ)/(θ+μ)²];
// d/dt = θ s, d²/dt² = θ² h + θ s. Returns θ̂ and the observed information −h(θ̂).
struct ThetaResult {
    double theta;
    double information;
    bool at_bound;
};

ThetaResult theta_ml(const Eigen::VectorXd& y, const Eigen::VectorXd& mu, const Eigen::VectorXd& w,
                     double theta0) {
    using boost::math::digamma;
    using boost::math::trigamma;
    // The ψ(y+θ) and ψ'(y+θ) terms depend on y only through its value: they are summed over
    // the distinct counts with their total weights (counts take few distinct values).
    std::vector<double> values;
    std::vector<double> weight_of;
    {
        std::vector<std::pair<double, double>> yw;
        for (Eigen::Index i = 0; i < y.size(); ++i)
            if (w[i] > 0.0) yw.emplace_back(y[i], w[i]);
        std::sort(yw.begin(), yw.end());
        for (const auto& [v, ww] : yw) {
            if (values.empty() || values.back() != v) {
                values.push_back(v);
                weight_of.push_back(0.0);
            }
            weight_of.back() += ww;
        }
    }
    auto score_hess = [&](double th, double& s, double& h) {
        s = 0.0;
        h = 0.0;
        const double dg = digamma(th), tg = trigamma(th), lt = std::log(th);
        for (std::size_t k = 0; k < values.size(); ++k) {
            s += weight_of[k] * (digamma(values[k] + th) - dg + lt + 1.0);
            h += weight_of[k] * (trigamma(values[k] + th) - tg + 1.0 / th);
        }
        for (Eigen::Index i = 0; i < y.size(); ++i) {
            if (w[i] <= 0.0) continue;
            const double a = th + mu[i];
            s -= w[i] * (std::log(a) + (y[i] + th) / a);
            h += w[i] * (-2.0 / a + (y[i] + th) / (a * a));
        }
    };
    double t = std::log(std::clamp(theta0, 1e-6, k_theta_max));
    double s = 0.0, h = 0.0;
    for (int it = 0; it < 200; ++it) {
        const double th = std::exp(t);
        score_hess(th, s, h);
        const double g = th * s;
        const double H = th * th * h + th * s;
        double step = H < 0.0 ? -g / H : (g > 0 ? 1.0 : -1.0);
        step = std::clamp(step, -2.0, 2.0);
        t += step;
        if (t > std::log(k_theta_max)) {
            t = std::log(k_theta_max);
            score_hess(k_theta_max, s, h);
            if (s > 0.0) return {k_theta_max, -h, true};
        }
        if (std::abs(step) < 1e-12) break;
    }
    const double th = std::exp(t);
    score_hess(th, s, h);
    return {th, -h, false};
}

struct Core {
    detail::IrlsResult irls;
    Eigen::MatrixXd unscaled;           // (XᵀWX)⁻¹ on the kept columns
    double theta = 0.0, theta_info = 0.0;
    bool theta_bound = false;
    Eigen::Vector2d gamma{0.0, 0.0};
    Eigen::Matrix2d gamma_cov = Eigen::Matrix2d::Zero();
    Eigen::VectorXd sigma;              // gaussian_spread: σᵢ
    double loglik = 0.0;
    int iterations = 0;
    bool converged = false;
    std::vector<std::string> notes;
};

// Fit the model on kept columns X (may have zero columns): IRLS, with the outer θ or γ loop.
Core fit_core(detail::IrlsProblem p, const Eigen::VectorXd& z_spread, const GlmOptions& opt,
              std::optional<double> fixed_theta) {
    Core c;
    const Eigen::Index n = p.y.size();
    if (p.family == Family::negbin) {
        // Start from a Poisson fit and the moment estimate θ₀ = n / Σ w (y/μ − 1)².
        detail::IrlsProblem pois = p;
        pois.family = Family::poisson;
        auto r = detail::irls(pois, Eigen::VectorXd(), opt.max_iterations, opt.tolerance);
        c.iterations += r.iterations;
        double theta = 1.0;
        if (fixed_theta) {
            theta = *fixed_theta;
        } else {
            double ss = 0.0, nw = 0.0;
            for (Eigen::Index i = 0; i < n; ++i) {
                if (p.w[i] <= 0.0) continue;
                ss += p.w[i] * std::pow(p.y[i] / r.mu[i] - 1.0, 2);
                nw += p.w[i];
            }
            theta = ss > 0.0 ? nw / ss : k_theta_max;
            const auto t = theta_ml(p.y, r.mu, p.w, theta);
            theta = t.theta;
        }
        bool done = false;
        for (int outer = 0; outer < opt.max_iterations; ++outer) {
            p.theta = theta;
            const double dev_before = r.deviance;
            r = detail::irls(p, r.beta, opt.max_iterations, opt.tolerance);
            c.iterations += r.iterations;
            if (fixed_theta) {
                done = r.converged;
                break;
            }
            const auto t = theta_ml(p.y, r.mu, p.w, theta);
            const double change = std::abs(t.theta - theta) / theta;
            theta = t.theta;
            c.theta_info = t.information;
            c.theta_bound = t.at_bound;
            if (change < std::sqrt(opt.tolerance) * 1e-2 &&
                std::abs(r.deviance - dev_before) / (std::abs(r.deviance) + 0.1) < opt.tolerance &&
                r.converged) {
                done = true;
                break;
            }
        }
        p.theta = theta;
        if (!fixed_theta) {
            // Final β at the final θ.
            r = detail::irls(p, r.beta, opt.max_iterations, opt.tolerance);
            c.iterations += r.iterations;
            c.theta_info = theta_ml(p.y, r.mu, p.w, theta).information;
        }
        c.theta = theta;
        c.irls = r;
        c.converged = done && r.converged;
        if (!done) c.notes.push_back("the estimate of theta did not settle");
    } else if (p.family == Family::gaussian_spread) {
        // Alternating scoring [3]: β by weighted least squares with weights w/σᵢ², then γ by
        // Fisher scoring for log σᵢ = γ0 + γ1 zᵢ with fixed residuals rᵢ:
        //   score U = Σ w (rᵢ²/σᵢ² − 1) (1, zᵢ)ᵀ,  expected information I = 2 Σ w (1, zᵢ)(1, zᵢ)ᵀ.
        Eigen::MatrixXd Z(n, 2);
        Z.col(0).setOnes();
        Z.col(1) = z_spread;
        const Eigen::VectorXd w0 = p.w;
        detail::IrlsProblem q = p;
        q.family = Family::gaussian;
        auto r = detail::irls(q, Eigen::VectorXd(), opt.max_iterations, opt.tolerance);
        c.iterations += r.iterations;
        double wsum = 0.0, rss = 0.0;
        for (Eigen::Index i = 0; i < n; ++i) {
            wsum += w0[i];
            rss += w0[i] * std::pow(p.y[i] - r.mu[i], 2);
        }
        Eigen::Vector2d gamma(0.5 * std::log(std::max(rss / wsum, 1e-300)), 0.0);
        Eigen::Matrix2d info = Eigen::Matrix2d::Zero();
        double ll_old = -std::numeric_limits<double>::infinity();
        bool done = false;
        Eigen::VectorXd sigma(n);
        for (int outer = 0; outer < opt.max_iterations; ++outer) {
            const Eigen::VectorXd resid = p.y - r.mu;
            Eigen::Vector2d step;
            for (int it = 0; it < 100; ++it) {
                sigma = (Z * gamma).array().exp().matrix();
                Eigen::Vector2d U = Eigen::Vector2d::Zero();
                info.setZero();
                for (Eigen::Index i = 0; i < n; ++i) {
                    const double u = resid[i] * resid[i] / (sigma[i] * sigma[i]) - 1.0;
                    U += w0[i] * u * Z.row(i).transpose();
                    info += 2.0 * w0[i] * Z.row(i).transpose() * Z.row(i);
                }
                step = info.ldlt().solve(U);
                gamma += step;
                if (step.cwiseAbs().maxCoeff() < 1e-12) break;
            }
            sigma = (Z * gamma).array().exp().matrix();
            q.w = w0.cwiseQuotient(sigma.cwiseAbs2());
            r = detail::irls(q, r.beta, opt.max_iterations, opt.tolerance);
            c.iterations += r.iterations;
            p.w = w0;
            const double ll = log_likelihood(p, r.mu, &sigma);
            if (std::abs(ll - ll_old) / (std::abs(ll) + 0.1) < opt.tolerance) {
                done = true;
                break;
            }
            ll_old = ll;
        }
        c.gamma = gamma;
        c.gamma_cov = info.inverse();
        c.sigma = sigma;
        c.irls = r;
        c.converged = done && r.converged;
        if (!done) c.notes.push_back("the spread parameters did not settle");
        c.loglik = log_likelihood(p, r.mu, &sigma);
        // β's covariance from the weights w/σ² (β and γ are orthogonal in the expected
        // information of the normal location–scale model [3]).
        if (q.X->cols() > 0) c.unscaled = detail::unscaled_covariance(q, r.eta);
        return c;
    } else {
        c.irls = detail::irls(p, Eigen::VectorXd(), opt.max_iterations, opt.tolerance);
        c.iterations = c.irls.iterations;
        c.converged = c.irls.converged;
    }
    if (p.X->cols() > 0) c.unscaled = detail::unscaled_covariance(p, c.irls.eta);
    c.loglik = log_likelihood(p, c.irls.mu, nullptr);
    return c;
}

// Quasi-complete separation check for binomial fits [4]: a direction d with
//   x_i·d ≥ 0 where y_i = m_i, x_i·d ≤ 0 where y_i = 0, x_i·d = 0 where 0 < y_i < m_i,
// and x_i·d ≠ 0 somewhere, makes the likelihood increase without bound along d. When the
// MLE does not exist, IRLS moves along such a direction: the last step and β̂ itself are
// tested (tolerance 1e-3 of the largest |x_i·d|, common practice).
std::vector<std::size_t> separation_columns(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                            const Eigen::VectorXd& m, const Eigen::VectorXd& w,
                                            const Eigen::VectorXd& d) {
    if (d.size() == 0 || !(d.norm() > 0.0)) return {};
    const Eigen::VectorXd s = X * d;
    double scale = 0.0;
    for (Eigen::Index i = 0; i < s.size(); ++i)
        if (w[i] > 0.0) scale = std::max(scale, std::abs(s[i]));
    if (!(scale > 0.0)) return {};
    const double tol = 1e-3 * scale;
    for (Eigen::Index i = 0; i < s.size(); ++i) {
        if (w[i] <= 0.0) continue;
        if (y[i] >= m[i]) {
            if (s[i] < -tol) return {};
        } else if (y[i] <= 0.0) {
            if (s[i] > tol) return {};
        } else if (std::abs(s[i]) > tol) {
            return {};
        }
    }
    std::vector<std::size_t> cols;
    const double dmax = d.cwiseAbs().maxCoeff();
    for (Eigen::Index j = 0; j < d.size(); ++j)
        if (std::abs(d[j]) > 1e-3 * dmax) cols.push_back(static_cast<std::size_t>(j));
    return cols;
}

void check_response(const Design& d, Family family, const std::string& key) {
    SourceLocation where;
    where.key = key;
    for (Eigen::Index i = 0; i < d.y.size(); ++i) {
        const std::string row = "row " + std::to_string(d.rows[static_cast<std::size_t>(i)] + 1);
        const double y = d.y[i];
        if (!std::isfinite(y)) throw DataError(where, row + ": the response is not finite");
        switch (family) {
            case Family::binomial: {
                const double m = d.trials[i];
                if (!(m > 0.0) || !std::isfinite(m))
                    throw DataError(where, row + ": trials must be > 0, found " + fmt(m));
                if (y < 0.0 || y > m)
                    throw DataError(where, row + ": successes must lie in [0, trials]; found " +
                                               fmt(y) + " of " + fmt(m));
                break;
            }
            case Family::poisson:
            case Family::negbin:
                if (y < 0.0) throw DataError(where, row + ": counts must be ≥ 0, found " + fmt(y));
                break;
            default: break;
        }
    }
}

}  // namespace

GlmFit fit_glm(const std::string& formula, const Table& data, const GlmOptions& options) {
    return fit_glm(parse_formula(formula), data, options);
}

GlmFit fit_glm(const Formula& formula, const Table& data, const GlmOptions& opt) {
    const Link link = opt.link.value_or(canonical_link(opt.family));
    check_link(opt.family, link);
    if (opt.max_iterations < 1) throw UsageError("max_iterations must be ≥ 1");
    if (!(opt.tolerance > 0.0)) throw UsageError("tolerance must be > 0");
    if (!formula.has_response) throw UsageError("formula '" + formula.text + "' has no response");
    if (formula.response.ratio && opt.family != Family::binomial)
        throw UsageError("formula '" + formula.text +
                         "': a successes / trials response needs the binomial family");
    if (!opt.prior_weights.empty() && opt.prior_weights.size() != data.rows())
        throw UsageError("prior weights: " + std::to_string(opt.prior_weights.size()) +
                         " values for a table of " + std::to_string(data.rows()) + " rows");
    for (double w : opt.prior_weights)
        if (!(w >= 0.0) || !std::isfinite(w)) throw UsageError("prior weights must be finite and ≥ 0");

    DesignOptions dopt;
    dopt.also_required = opt.also_required;
    NumExpr spread_x;
    if (opt.family == Family::gaussian_spread) {
        spread_x = parse_numeric_expression(opt.spread_column, "spread");
        for (const auto& c : spread_x.columns()) {
            if (!data.is_numeric(c)) {
                std::string list;
                for (const auto& nme : data.names()) list += (list.empty() ? "" : ", ") + nme;
                throw UsageError("the spread needs the numeric column '" + c +
                                 "'; the columns are: " + list);
            }
            dopt.also_required.push_back(c);
        }
    }
    const Design d = build_design(formula, data, dopt);
    const std::string key = formula.key.empty() ? formula.text : formula.key;
    check_response(d, opt.family, formula.response.text());

    const Eigen::Index n = d.X.rows();
    const Eigen::Index p = d.X.cols();
    Eigen::VectorXd w = Eigen::VectorXd::Ones(n);
    if (!opt.prior_weights.empty())
        for (Eigen::Index i = 0; i < n; ++i) w[i] = opt.prior_weights[d.rows[static_cast<std::size_t>(i)]];

    GlmFit fit;
    fit.family = opt.family;
    fit.link = link;
    fit.spec = d.spec;
    fit.column_names = d.column_names;
    fit.n_used = static_cast<std::size_t>(n);
    fit.n_dropped = d.dropped;
    fit.spread_x = spread_x;
    fit.t_statistics = opt.family == Family::gaussian;

    // Aliased columns: later columns that are combinations of earlier ones are left out.
    const Eigen::VectorXd wm = opt.family == Family::binomial ? w.cwiseProduct(d.trials) : w;
    fit.aliased = detail::aliased_columns(d.X, wm);
    std::vector<Eigen::Index> kept;
    std::string aliased_names;
    for (Eigen::Index j = 0; j < p; ++j) {
        if (fit.aliased[static_cast<std::size_t>(j)])
            aliased_names += (aliased_names.empty() ? "'" : ", '") + d.column_names[static_cast<std::size_t>(j)] + "'";
        else
            kept.push_back(j);
    }
    const auto q = static_cast<Eigen::Index>(kept.size());
    Eigen::MatrixXd Xk(n, q);
    for (Eigen::Index j = 0; j < q; ++j) Xk.col(j) = d.X.col(kept[static_cast<std::size_t>(j)]);
    if (!aliased_names.empty())
        fit.warnings.push_back("rank deficient: column(s) " + aliased_names +
                               " are linear combinations of earlier columns (aliased); their "
                               "coefficients cannot be estimated, are reported as NaN and are "
                               "left out of predictions");
    double wpos = 0.0;
    for (Eigen::Index i = 0; i < n; ++i) wpos += w[i] > 0.0 ? 1.0 : 0.0;
    if (wpos <= static_cast<double>(q))
        throw UsageError("formula '" + formula.text + "': " + std::to_string(static_cast<long>(wpos)) +
                         " rows with positive weight for " + std::to_string(q) + " coefficients");

    detail::IrlsProblem prob;
    prob.X = &Xk;
    prob.y = d.y;
    prob.m = d.trials;
    prob.w = w;
    prob.offset = d.offset;
    prob.family = opt.family;
    prob.link = link;
    Eigen::VectorXd zs;
    if (opt.family == Family::gaussian_spread) zs = detail::evaluate(spread_x, data, d.rows, key);

    Core c = fit_core(prob, zs, opt, std::nullopt);
    if (!std::isfinite(c.irls.deviance))
        throw NumericalError("formula '" + formula.text + "': the deviance is not finite");
    fit.iterations = c.iterations;
    fit.converged = c.converged;
    fit.deviance = c.irls.deviance;
    fit.loglik = c.loglik;
    fit.rank = static_cast<int>(q);
    fit.df_residual = wpos - static_cast<double>(q);
    fit.theta = c.theta;
    fit.theta_se = opt.family == Family::negbin && c.theta_info > 0.0 ? 1.0 / std::sqrt(c.theta_info) : 0.0;

    // Dispersion: estimated for gaussian (σ² = Σ w r² / df), 1 otherwise.
    double phi = 1.0;
    if (opt.family == Family::gaussian) {
        phi = fit.df_residual > 0.0 ? c.irls.deviance / fit.df_residual : k_nan;
        fit.sigma = std::sqrt(phi);
    }
    if (opt.family == Family::gaussian_spread) {
        fit.deviance = -2.0 * c.loglik;
        fit.spread = {c.gamma[0], c.gamma[1]};
        fit.spread_se = {std::sqrt(c.gamma_cov(0, 0)), std::sqrt(c.gamma_cov(1, 1))};
    }
    fit.n_parameters = fit.rank + (opt.family == Family::gaussian || opt.family == Family::negbin ? 1 : 0) +
                       (opt.family == Family::gaussian_spread ? 2 : 0);
    fit.aic = -2.0 * fit.loglik + 2.0 * fit.n_parameters;

    fit.coefficients = Eigen::VectorXd::Constant(p, k_nan);
    fit.std_errors = Eigen::VectorXd::Constant(p, k_nan);
    fit.statistics = Eigen::VectorXd::Constant(p, k_nan);
    fit.p_values = Eigen::VectorXd::Constant(p, k_nan);
    fit.covariance = Eigen::MatrixXd::Constant(p, p, k_nan);
    const boost::math::normal_distribution<double> normal(0.0, 1.0);
    for (Eigen::Index a = 0; a < q; ++a) {
        const Eigen::Index ja = kept[static_cast<std::size_t>(a)];
        fit.coefficients[ja] = c.irls.beta[a];
        for (Eigen::Index b = 0; b < q; ++b)
            fit.covariance(ja, kept[static_cast<std::size_t>(b)]) = phi * c.unscaled(a, b);
        const double se = std::sqrt(phi * c.unscaled(a, a));
        fit.std_errors[ja] = se;
        const double stat = c.irls.beta[a] / se;
        fit.statistics[ja] = stat;
        if (!std::isfinite(stat)) continue;
        if (fit.t_statistics) {
            if (fit.df_residual > 0.0) {
                const boost::math::students_t_distribution<double> t(fit.df_residual);
                fit.p_values[ja] = 2.0 * boost::math::cdf(boost::math::complement(t, std::abs(stat)));
            }
        } else {
            fit.p_values[ja] = 2.0 * boost::math::cdf(boost::math::complement(normal, std::abs(stat)));
        }
    }

    // Null model: intercept only (with the offsets), or the offsets alone without intercept.
    // With an intercept and no offsets its MLE is the weighted mean of y (proportion of
    // successes for binomial), whatever the link: closed form, no refit [1, §2.3].
    const bool no_offset = d.offset.cwiseAbs().maxCoeff() == 0.0;
    if (formula.intercept && no_offset && opt.family != Family::gaussian_spread) {
        detail::IrlsProblem p0 = prob;
        p0.theta = c.theta;
        const Eigen::VectorXd wm0 = opt.family == Family::binomial ? w.cwiseProduct(d.trials) : w;
        const double mean = w.dot(d.y) / wm0.sum();
        fit.null_deviance = detail::deviance(p0, Eigen::VectorXd::Constant(n, mean));
        fit.df_null = wpos - 1.0;
    } else {
        Eigen::MatrixXd X0 = formula.intercept ? Eigen::MatrixXd::Ones(n, 1) : Eigen::MatrixXd(n, 0);
        detail::IrlsProblem p0 = prob;
        p0.X = &X0;
        Core c0 = fit_core(p0, zs, opt, opt.family == Family::negbin ? std::optional<double>(c.theta)
                                                                    : std::nullopt);
        if (opt.family == Family::negbin) {
            p0.theta = c.theta;
            c0.irls.deviance = detail::deviance(p0, c0.irls.mu);
        }
        fit.null_deviance = opt.family == Family::gaussian_spread ? -2.0 * c0.loglik : c0.irls.deviance;
        fit.df_null = wpos - (formula.intercept ? 1.0 : 0.0);
    }

    // Warnings in plain words.
    if (!fit.converged)
        fit.warnings.push_back("the fit did not converge in " + std::to_string(opt.max_iterations) +
                               " iterations (last relative deviance change " +
                               fmt(c.irls.last_change) + "); the estimates may be unreliable" +
                               (c.notes.empty() ? "" : ": " + c.notes.front()));
    if (opt.family == Family::negbin && c.theta_bound)
        fit.warnings.push_back("theta reached its upper bound " + fmt(k_theta_max) +
                               ": the counts show no overdispersion; a Poisson model fits as well");
    if (opt.family == Family::binomial) {
        const double eps = 10.0 * std::numeric_limits<double>::epsilon();
        std::size_t boundary = 0;
        for (Eigen::Index i = 0; i < n; ++i)
            if (w[i] > 0.0 && (c.irls.mu[i] < eps || c.irls.mu[i] > 1.0 - eps)) ++boundary;
        if (boundary > 0) {
            fit.warnings.push_back("fitted probabilities of 0 or 1 in " + std::to_string(boundary) +
                                   " row(s)");
            auto cols = separation_columns(Xk, d.y, d.trials, w, c.irls.last_step);
            if (cols.empty()) cols = separation_columns(Xk, d.y, d.trials, w, c.irls.beta);
            if (!cols.empty()) {
                fit.separation = true;
                std::string names;
                for (auto j : cols)
                    names += (names.empty() ? "'" : ", '") +
                             d.column_names[static_cast<std::size_t>(kept[j])] + "'";
                fit.warnings.push_back(
                    "perfect or quasi-complete separation: a combination of the columns " + names +
                    " predicts the 0/1 outcomes exactly, so the maximum-likelihood estimates do not "
                    "exist (the coefficients grow without bound); the estimates and standard "
                    "errors shown are not meaningful. Simplify the model or merge levels");
            }
        }
    }
    return fit;
}

}  // namespace safesite::stats
