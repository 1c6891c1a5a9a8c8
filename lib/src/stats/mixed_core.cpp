// Mixed-model fitting on plain arrays: the optimisation driver and the assembly of results.
//
// References (docs/references.md):
//  [1] Bates, Mächler, Bolker & Walker (2015) J Stat Softw 67(1) — profiled deviance,
//      relative covariance factor Λθ, penalised (IR)LS, Laplace approximation.
//  [2] Breslow & Clayton (1993) JASA 88:9 — Laplace approximation for GLMMs.
//  [3] Powell (2009) The BOBYQA algorithm, Cambridge DAMTP report NA2009/06.
#include "safesite/stats/mixed_model.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include <Eigen/Cholesky>
#include <Eigen/QR>

#include "stats/detail/conditional_response.hpp"
#include "stats/detail/laplace_engine.hpp"
#include "stats/detail/optimise.hpp"
#include "stats/detail/random_design.hpp"
#include "safesite/error.hpp"

namespace safesite::stats {

namespace {

using detail::RandomDesign;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

detail::CondLink to_cond(Link link) {
    switch (link) {
        case Link::logit: return detail::CondLink::logit;
        case Link::probit: return detail::CondLink::probit;
        case Link::cloglog: return detail::CondLink::cloglog;
        case Link::log: return detail::CondLink::log;
        case Link::identity: return detail::CondLink::identity;
    }
    return detail::CondLink::identity;
}

// SDs (and correlations) of all random terms from the scaled factor entries ψ (θ·σ for the
// Gaussian model, θ otherwise), in the order of the blocks: intercept, then slope.
struct TermSd {
    Eigen::VectorXd sd;
    Eigen::VectorXd corr;  // per term; NaN where not defined
};

TermSd term_sds(const RandomDesign& re, const Eigen::VectorXd& psi) {
    std::vector<double> sd, corr;
    for (const detail::RandomBlock& b : re.blocks()) {
        const double* t = psi.data() + b.theta_first;
        sd.push_back(std::abs(t[0]));
        corr.push_back(kNaN);
        if (b.theta_count == 2) {
            sd.push_back(std::abs(t[1]));
            corr.push_back(kNaN);
        } else if (b.theta_count == 3) {
            // Σ = L L' with L = [[l11, 0], [l21, l22]]: var_slope = l21² + l22²,
            // cov = l11·l21, corr = sign(l11)·l21 / sqrt(l21² + l22²).
            const double s = std::hypot(t[1], t[2]);
            sd.push_back(s);
            corr.push_back(s > 0.0 && t[0] != 0.0 ? std::copysign(1.0, t[0]) * t[1] / s : kNaN);
        }
    }
    TermSd out;
    out.sd = Eigen::Map<Eigen::VectorXd>(sd.data(), static_cast<Eigen::Index>(sd.size()));
    out.corr = Eigen::Map<Eigen::VectorXd>(corr.data(), static_cast<Eigen::Index>(corr.size()));
    return out;
}

// Standard errors of the term SDs by the delta method, given the covariance of the free
// entries of ψ (indices `free`). The Jacobian is taken by central differences of the
// closed-form map ψ → SD (smooth away from ψ = 0, where the SD has no SE anyway).
Eigen::VectorXd term_sd_se(const RandomDesign& re, const Eigen::VectorXd& psi,
                           const std::vector<int>& free, const Eigen::MatrixXd& cov_free) {
    const Eigen::Index k = term_sds(re, psi).sd.size();
    Eigen::MatrixXd J(k, static_cast<Eigen::Index>(free.size()));
    for (std::size_t c = 0; c < free.size(); ++c) {
        const double h = 1e-7 * std::max(1.0, std::abs(psi[free[c]]));
        Eigen::VectorXd a = psi, b = psi;
        a[free[c]] += h;
        b[free[c]] -= h;
        J.col(static_cast<Eigen::Index>(c)) = (term_sds(re, a).sd - term_sds(re, b).sd) / (2.0 * h);
    }
    return (J * cov_free * J.transpose()).diagonal().cwiseMax(0.0).cwiseSqrt();
}

// Boundary snapping. Brent never evaluates its end point and BOBYQA may stop a hair above a
// bound, so a diagonal θ below 1e-3 (an SD under 0.1 % of the residual SD, or of one unit on
// the link scale) is set to zero when that raises −2 log L by less than 1e-6 — a difference
// no test or information criterion can see (common practice; lme4 reports such fits as
// singular [1, section 5.2]).
template <class F>
double snap_to_boundary(const RandomDesign& re, Eigen::VectorXd& theta, double f_hat, F&& f) {
    for (int d : re.diagonal_theta()) {
        if (theta[d] == 0.0 || std::abs(theta[d]) >= 1e-3) continue;
        Eigen::VectorXd t = theta;
        t[d] = 0.0;
        const double f0 = f(t);
        if (f0 <= f_hat + 1e-6) {
            theta[d] = 0.0;
            f_hat = std::min(f_hat, f0);
        }
    }
    return f_hat;
}

std::vector<int> free_theta(const RandomDesign& re, const Eigen::VectorXd& theta) {
    std::vector<int> free;
    const auto& diag = re.diagonal_theta();
    for (int i = 0; i < re.n_theta(); ++i) {
        const bool is_diag = std::find(diag.begin(), diag.end(), i) != diag.end();
        if (!(is_diag && theta[i] == 0.0)) free.push_back(i);
    }
    return free;
}

// Finite-difference step for a variance parameter: 1e-3 relative, at least 1e-3·ref, and
// never crossing zero for a diagonal entry (common practice for observed information).
double theta_step(double value, double ref) {
    double h = 1e-3 * std::max(std::abs(value), 0.05 * ref);
    if (value != 0.0) h = std::min(h, 0.5 * std::abs(value));
    return h;
}

// Fill the per-level conditional modes b = Λu and conditional variances
// scale²·diag(Λ_j (A⁻¹)_jj Λ_j') from the factorisation held by `re`.
void fill_random_effects(MixedFit& fit, const RandomDesign& re,
                         const std::vector<GroupingFactor>& groups, const Eigen::VectorXd& u,
                         double scale2) {
    const Eigen::VectorXd b = re.lambda_times(u);
    // Diagonal 1×1 or 2×2 blocks of A⁻¹, one per level.
    std::vector<std::pair<int, int>> pairs;
    for (const detail::RandomBlock& bl : re.blocks())
        for (int lv = 0; lv < bl.levels; ++lv) {
            const int c = bl.first_col + lv * bl.width;
            pairs.emplace_back(c, c);
            if (bl.width == 2) {
                pairs.emplace_back(c + 1, c + 1);
                pairs.emplace_back(c, c + 1);
            }
        }
    const Eigen::VectorXd inv = re.inverse_entries(pairs);
    std::size_t next = 0;
    fit.random_effects.clear();
    for (std::size_t k = 0; k < re.blocks().size(); ++k) {
        const detail::RandomBlock& bl = re.blocks()[k];
        const GroupingFactor& g = groups[bl.group];
        GroupEffects ge;
        ge.group = g.name;
        ge.levels = g.level_names;
        ge.terms = {"(Intercept)"};
        if (bl.width == 2) ge.terms.push_back(g.slope_name);
        ge.modes.resize(bl.levels, bl.width);
        ge.conditional_variances.resize(bl.levels, bl.width);
        const Eigen::MatrixXd L = re.lambda_block(static_cast<int>(k));
        for (int lv = 0; lv < bl.levels; ++lv) {
            const int c = bl.first_col + lv * bl.width;
            Eigen::MatrixXd Ainv(bl.width, bl.width);
            Ainv(0, 0) = inv[static_cast<Eigen::Index>(next++)];
            if (bl.width == 2) {
                Ainv(1, 1) = inv[static_cast<Eigen::Index>(next++)];
                Ainv(1, 0) = Ainv(0, 1) = inv[static_cast<Eigen::Index>(next++)];
            }
            const Eigen::MatrixXd V = scale2 * L * Ainv * L.transpose();
            for (int t = 0; t < bl.width; ++t) {
                ge.modes(lv, t) = b[c + t];
                ge.conditional_variances(lv, t) = V(t, t);
            }
        }
        fit.random_effects.push_back(std::move(ge));
    }
}

// Variance-component rows and boundary warnings.
void fill_components(MixedFit& fit, const RandomDesign& re,
                     const std::vector<GroupingFactor>& groups, const Eigen::VectorXd& psi,
                     const Eigen::VectorXd& sd_se, const std::string& noise) {
    const TermSd ts = term_sds(re, psi);
    Eigen::Index t = 0;
    for (const detail::RandomBlock& b : re.blocks()) {
        const GroupingFactor& g = groups[b.group];
        for (int role = 0; role < b.width; ++role, ++t) {
            VarianceComponent vc;
            vc.group = g.name;
            vc.term = role == 0 ? "(Intercept)" : g.slope_name;
            vc.sd = ts.sd[t];
            vc.correlation = ts.corr[t];
            const int diag_index = b.theta_first + (role == 0 ? 0 : b.theta_count - 1);
            vc.boundary = psi[diag_index] == 0.0;
            vc.sd_se = vc.boundary ? kNaN : sd_se[t];
            if (vc.boundary && (role == 0 || b.theta_count == 2)) {
                vc.sd = 0.0;
                fit.warnings.push_back(
                    "boundary fit: the SD of " + vc.term + " by " + g.name +
                    " is estimated at zero; the data show no variation among the " + g.name +
                    " levels beyond the " + noise + ", so the SD is reported as 0 without a "
                    "standard error");
            } else if (vc.boundary) {
                // Correlated slope with l22 = 0: the slope is a multiple of the intercept.
                vc.sd_se = kNaN;
                fit.warnings.push_back(
                    "boundary fit: the correlation between the intercept and the " + vc.term +
                    " slope by " + g.name + " is estimated at " +
                    (vc.correlation < 0 ? std::string("-1") : std::string("+1")) +
                    "; consider independent slopes (correlated_slope = false)");
            }
            fit.variance_components.push_back(vc);
        }
    }
}

void fit_gaussian(MixedFit& fit, RandomDesign& re, const Eigen::MatrixXd& X,
                  const Eigen::VectorXd& y, const std::vector<GroupingFactor>& groups,
                  const MixedOptions& opt) {
    const int n = static_cast<int>(X.rows()), p = static_cast<int>(X.cols());
    const bool reml = opt.reml;
    auto deviance = [&](const Eigen::VectorXd& th) {
        const detail::GaussianProfile gp = detail::gaussian_profile(re, X, y, th);
        return gp.ok ? gp.deviance(reml, n, p) : kInf;
    };
    detail::OptimiseResult r;
    if (re.n_theta() == 1) {
        r = detail::minimise_brent(
            [&](double t) { return deviance(Eigen::VectorXd::Constant(1, t)); }, 10.0,
            opt.max_evaluations);
    } else {
        const auto start = re.theta_start();
        r = detail::minimise_bobyqa(
            deviance, Eigen::Map<const Eigen::VectorXd>(start.data(), re.n_theta()),
            re.theta_lower(), Eigen::VectorXd::Constant(re.n_theta(), 0.25), 1e-9, 1e-11,
            opt.max_evaluations);
    }
    Eigen::VectorXd theta = r.x;
    double f = snap_to_boundary(re, theta, r.f, deviance);
    const detail::GaussianProfile gp = detail::gaussian_profile(re, X, y, theta);
    if (!gp.ok) throw NumericalError("mixed model: the Gaussian criterion is not finite at the estimate");
    f = gp.deviance(reml, n, p);
    const double sigma = std::sqrt(gp.sigma2(reml, n, p));

    fit.theta = theta;
    fit.sigma = sigma;
    fit.fixed = gp.beta;
    fit.fixed_cov = sigma * sigma * gp.S.llt().solve(Eigen::MatrixXd::Identity(gp.S.rows(), gp.S.cols()));
    fit.fixed_se = fit.fixed_cov.diagonal().cwiseSqrt();
    fit.log_likelihood = -0.5 * f;
    fit.df = p + re.n_theta() + 1;
    fit.iterations = r.evaluations;
    fit.converged = r.converged;
    if (!r.converged) fit.warnings.push_back("no convergence: " + r.message + "; estimates may be unreliable");

    // Observed information for (ψ, σ) with ψ = σθ (the factor in response units):
    //   −2 log L(ψ, σ) = log|A| [+ log|R_X|²] + m·log(2πσ²) + r²(θ)/σ²,  θ = ψ/σ,
    // with β profiled (ML) or integrated out (REML); Cov ≈ 2 H⁻¹ [1, section 3.4].
    const std::vector<int> free = free_theta(re, theta);
    const int nf = static_cast<int>(free.size());
    Eigen::VectorXd par(nf + 1), h(nf + 1);
    for (int i = 0; i < nf; ++i) {
        par[i] = sigma * theta[free[i]];
        h[i] = theta_step(par[i], sigma);
    }
    par[nf] = sigma;
    h[nf] = 1e-3 * sigma;
    auto dev_sigma = [&](const Eigen::VectorXd& v) {
        Eigen::VectorXd th = theta;
        for (int i = 0; i < nf; ++i) th[free[i]] = v[i] / v[nf];
        const detail::GaussianProfile g = detail::gaussian_profile(re, X, y, th);
        return g.ok ? g.deviance_at_sigma(reml, n, p, v[nf]) : kInf;
    };
    const Eigen::MatrixXd H = detail::numeric_hessian(dev_sigma, par, dev_sigma(par), h);
    Eigen::VectorXd psi = sigma * theta;
    Eigen::VectorXd sd_se = Eigen::VectorXd::Constant(term_sds(re, psi).sd.size(), kNaN);
    double sigma_se = kNaN;
    Eigen::LLT<Eigen::MatrixXd> llt(H);
    if (llt.info() == Eigen::Success) {
        const Eigen::MatrixXd cov = 2.0 * llt.solve(Eigen::MatrixXd::Identity(nf + 1, nf + 1));
        sd_se = term_sd_se(re, psi, free, cov.topLeftCorner(nf, nf));
        sigma_se = std::sqrt(cov(nf, nf));
    } else {
        fit.warnings.push_back("the observed information of the variance parameters is not "
                               "positive definite; their standard errors are not available");
    }
    // The final criterion evaluation must be the one at θ̂ (its factorisation is used below).
    const detail::GaussianProfile last = detail::gaussian_profile(re, X, y, theta);
    fill_components(fit, re, groups, psi, sd_se, "residual noise");
    VarianceComponent res;
    res.group = "residual";
    res.sd = sigma;
    res.sd_se = sigma_se;
    res.correlation = kNaN;
    fit.variance_components.push_back(res);
    fill_random_effects(fit, re, groups, last.u, sigma * sigma);
}

void fit_laplace(MixedFit& fit, RandomDesign& re, const Eigen::MatrixXd& X,
                 const Eigen::VectorXd& y, const Eigen::VectorXd& trials,
                 const Eigen::VectorXd& offset, const std::vector<GroupingFactor>& groups,
                 const MixedOptions& opt) {
    const int p = static_cast<int>(X.cols());
    const int nt = re.n_theta();
    const detail::CondFamily cf =
        fit.family == Family::binomial ? detail::CondFamily::binomial : detail::CondFamily::poisson;
    const detail::ConditionalResponse resp(cf, to_cond(fit.link), y, trials);
    detail::LaplaceEngine engine(re, X, offset, resp);

    // Stage 1: θ only, with β at the joint conditional mode together with u (cheap, and a
    // good start for stage 2) [1, section 5.4].
    auto stage1 = [&](const Eigen::VectorXd& th) { return engine.joint(th); };
    detail::OptimiseResult r1;
    if (nt == 1) {
        r1 = detail::minimise_brent(
            [&](double t) { return stage1(Eigen::VectorXd::Constant(1, t)); }, 5.0,
            opt.max_evaluations, 14);
    } else {
        const auto start = re.theta_start();
        r1 = detail::minimise_bobyqa(stage1, Eigen::Map<const Eigen::VectorXd>(start.data(), nt),
                                     re.theta_lower(), Eigen::VectorXd::Constant(nt, 0.25), 1e-4,
                                     1e-6, opt.max_evaluations);
    }
    engine.joint(r1.x);
    const Eigen::VectorXd beta1 = engine.beta();
    Eigen::VectorXd se1(p);
    {
        Eigen::LLT<Eigen::MatrixXd> llt(engine.schur());
        if (llt.info() == Eigen::Success)
            se1 = llt.solve(Eigen::MatrixXd::Identity(p, p)).diagonal().cwiseSqrt();
        else
            se1 = beta1.cwiseAbs().cwiseMax(1.0);
    }

    // Stage 2: the Laplace criterion over (θ, β) jointly, so that β maximises the
    // approximate marginal likelihood rather than the joint density [1, section 5.4; 2].
    auto stage2 = [&](const Eigen::VectorXd& x) {
        return engine.conditional(x.head(nt), x.tail(p));
    };
    Eigen::VectorXd x0(nt + p), step(nt + p);
    x0 << r1.x, beta1;
    for (int i = 0; i < nt; ++i) step[i] = std::max(0.1 * std::abs(r1.x[i]), 0.05);
    step.tail(p) = 0.2 * se1;
    std::vector<double> lower = re.theta_lower();
    lower.resize(nt + p, -kInf);
    detail::OptimiseResult r2 =
        detail::minimise_bobyqa(stage2, x0, lower, step, 1e-8, 1e-10, opt.max_evaluations);
    Eigen::VectorXd theta = r2.x.head(nt);
    const Eigen::VectorXd beta = r2.x.tail(p);
    snap_to_boundary(re, theta, r2.f, [&](const Eigen::VectorXd& th) {
        return engine.conditional(th, beta);
    });

    // Observed information of (θ_free, β): Cov ≈ 2 H⁻¹ of the Laplace deviance.
    const std::vector<int> free = free_theta(re, theta);
    const int nf = static_cast<int>(free.size());
    Eigen::VectorXd par(nf + p), h(nf + p);
    for (int i = 0; i < nf; ++i) {
        par[i] = theta[free[i]];
        h[i] = theta_step(par[i], 1.0);
    }
    par.tail(p) = beta;
    h.tail(p) = 1e-2 * se1;
    auto dev_free = [&](const Eigen::VectorXd& v) {
        Eigen::VectorXd th = theta;
        for (int i = 0; i < nf; ++i) th[free[i]] = v[i];
        return engine.conditional(th, v.tail(p));
    };
    const double f_hat = dev_free(par);
    const Eigen::MatrixXd H = detail::numeric_hessian(dev_free, par, f_hat, h);
    Eigen::VectorXd sd_se = Eigen::VectorXd::Constant(term_sds(re, theta).sd.size(), kNaN);
    Eigen::LLT<Eigen::MatrixXd> llt(H);
    if (llt.info() == Eigen::Success) {
        const Eigen::MatrixXd cov = 2.0 * llt.solve(Eigen::MatrixXd::Identity(nf + p, nf + p));
        fit.fixed_cov = cov.bottomRightCorner(p, p);
        sd_se = term_sd_se(re, theta, free, cov.topLeftCorner(nf, nf));
    } else {
        engine.joint(theta);
        fit.fixed_cov = engine.schur().ldlt().solve(Eigen::MatrixXd::Identity(p, p));
        fit.warnings.push_back("the observed information is not positive definite; fixed-effect "
                               "standard errors come from the penalised IRLS system instead and "
                               "those of the SDs are not available");
    }
    // Final evaluation at the estimate: sets the conditional modes and the factorisation.
    const double f = engine.conditional(theta, beta);
    const bool pirls_ok = engine.last_converged();

    fit.theta = theta;
    fit.sigma = kNaN;
    fit.fixed = beta;
    fit.fixed_se = fit.fixed_cov.diagonal().cwiseSqrt();
    fit.log_likelihood = -0.5 * f;
    fit.df = p + nt;
    fit.iterations = r1.evaluations + r2.evaluations;
    fit.converged = r1.converged && r2.converged && pirls_ok;
    if (!r1.converged) fit.warnings.push_back("no convergence in the first stage: " + r1.message);
    if (!r2.converged)
        fit.warnings.push_back("no convergence: " + r2.message + "; estimates may be unreliable");
    if (!pirls_ok)
        fit.warnings.push_back("no convergence: penalised IRLS did not settle on the conditional "
                               "modes at the estimate");
    const std::string noise = fit.family == Family::binomial ? "binomial sampling noise"
                                                             : "Poisson sampling noise";
    fill_components(fit, re, groups, theta, sd_se, noise);
    fill_random_effects(fit, re, groups, engine.u(), 1.0);
}

}  // namespace

MixedFit fit_mixed_core(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                        const Eigen::VectorXd& trials, const Eigen::VectorXd& offset,
                        const std::vector<GroupingFactor>& groups, const MixedOptions& options,
                        const std::vector<std::string>& column_names) {
    const Eigen::Index n = X.rows(), p = X.cols();
    if (p < 1) throw UsageError("mixed model: the fixed-effect design has no column");
    if (n < 2) throw UsageError("mixed model: fewer than two rows");
    if (y.size() != n)
        throw UsageError("mixed model: " + std::to_string(y.size()) + " responses for " +
                         std::to_string(n) + " design rows");
    if (offset.size() != 0 && offset.size() != n)
        throw UsageError("mixed model: the offset has " + std::to_string(offset.size()) +
                         " values; expected " + std::to_string(n));
    if (!column_names.empty() && column_names.size() != static_cast<std::size_t>(p))
        throw UsageError("mixed model: " + std::to_string(column_names.size()) +
                         " column names for " + std::to_string(p) + " design columns");
    if (!X.allFinite() || !y.allFinite() || (offset.size() != 0 && !offset.allFinite()))
        throw UsageError("mixed model: the design, response or offset has non-finite values");

    MixedFit fit;
    fit.family = options.family;
    fit.link = options.link.value_or(canonical_link(options.family));
    switch (fit.family) {
        case Family::gaussian:
            if (fit.link != Link::identity)
                throw UsageError("Gaussian mixed models take the identity link");
            break;
        case Family::binomial:
            if (trials.size() != n)
                throw UsageError("binomial mixed model: " + std::to_string(trials.size()) +
                                 " trial counts for " + std::to_string(n) + " rows");
            break;
        case Family::poisson: break;
        default:
            throw UsageError("mixed models support the gaussian, binomial and poisson families, not " +
                             to_string(fit.family));
    }
    fit.reml = fit.family == Family::gaussian && options.reml;
    fit.nobs = static_cast<int>(n);
    if (column_names.empty()) {
        for (Eigen::Index j = 0; j < p; ++j) fit.fixed_names.push_back("x" + std::to_string(j + 1));
    } else {
        fit.fixed_names = column_names;
    }
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(X);
    if (qr.rank() < p)
        throw NumericalError("mixed model: the fixed-effect columns are linearly dependent (rank " +
                             std::to_string(qr.rank()) + " of " + std::to_string(p) + ")");

    RandomDesign re(groups, static_cast<std::size_t>(n), options.correlated_slope);
    const Eigen::VectorXd off = offset.size() == n ? offset : Eigen::VectorXd::Zero(n);
    if (fit.family == Family::gaussian) {
        const Eigen::VectorXd yo = y - off;
        fit_gaussian(fit, re, X, yo, groups, options);
    } else {
        fit_laplace(fit, re, X, y, trials, off, groups, options);
    }
    fit.aic = -2.0 * fit.log_likelihood + 2.0 * fit.df;
    return fit;
}

}  // namespace safesite::stats
