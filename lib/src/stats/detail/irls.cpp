// IRLS for generalized linear models.
//
// References (docs/references.md):
//  [1] McCullagh, P. & Nelder, J. A. (1989) Generalized Linear Models, 2nd ed., §2.5 (the
//      algorithm), §2.3 (deviance).
//  [2] Green, P. J. (1984) J. R. Stat. Soc. B 46:149–192 (IRLS as Fisher scoring).
//  [3] Golub, G. H. & Van Loan, C. F. (2013) Matrix Computations, 4th ed., §5.4.1 (QR with
//      column pivoting) and §5.2.8 (Gram–Schmidt with re-orthogonalisation).
//
// Each iteration [1]: with η = Xβ + o, μ = g⁻¹(η),
//   z = (η − o) + (y − μ) / (dμ/dη)              working response
//   W = w (dμ/dη)² / V(μ)                        working weights
//   β ← argmin ‖√W (z − Xβ)‖²                    solved by QR of √W X
// until |D_k − D_{k−1}| / (|D_k| + 0.1) < tol (the convergence rule of common practice).
#include "stats/detail/irls.hpp"

#include <cmath>
#include <limits>

#include <Eigen/QR>

namespace safesite::stats::detail {

namespace {

// y·log(y/μ) with the limit 0 at y = 0.
double ylogy(double y, double mu) { return y > 0.0 ? y * std::log(y / mu) : 0.0; }

double unit_deviance(Family family, double y, double mu, double theta) {
    switch (family) {
        case Family::binomial: return 2.0 * (ylogy(y, mu) + ylogy(1.0 - y, 1.0 - mu));
        case Family::poisson: return 2.0 * (ylogy(y, mu) - (y - mu));
        case Family::negbin:
            return 2.0 * (ylogy(y, mu) - (y + theta) * std::log((y + theta) / (mu + theta)));
        case Family::gaussian:
        case Family::gaussian_spread: return (y - mu) * (y - mu);
    }
    return 0.0;
}

// Response on the fitting scale (proportion for binomial) and effective weights.
void fitting_scale(const IrlsProblem& p, Eigen::VectorXd& y, Eigen::VectorXd& w) {
    if (p.family == Family::binomial) {
        y = p.y.cwiseQuotient(p.m);
        w = p.w.cwiseProduct(p.m);
    } else {
        y = p.y;
        w = p.w;
    }
}

double starting_mean(Family family, double y, double m) {
    switch (family) {
        case Family::binomial: return (m * y + 0.5) / (m + 1.0);  // y a proportion here
        case Family::poisson: return y + 0.1;
        case Family::negbin: return y + 1.0 / 6.0;
        case Family::gaussian:
        case Family::gaussian_spread: return y;
    }
    return y;
}

bool valid_eta(Link link, const Eigen::VectorXd& eta) {
    (void)link;
    return eta.allFinite();
}

}  // namespace

namespace {

// Σ weighted unit deviances with y and w already on the fitting scale.
double scaled_deviance(Family family, const Eigen::VectorXd& y, const Eigen::VectorXd& w,
                       const Eigen::VectorXd& mu, double theta) {
    double d = 0.0;
    for (Eigen::Index i = 0; i < y.size(); ++i)
        if (w[i] > 0.0) d += w[i] * unit_deviance(family, y[i], mu[i], theta);
    return d;
}

}  // namespace

double deviance(const IrlsProblem& p, const Eigen::VectorXd& mu) {
    Eigen::VectorXd y, w;
    fitting_scale(p, y, w);
    return scaled_deviance(p.family, y, w, mu, p.theta);
}

IrlsResult irls(const IrlsProblem& p, const Eigen::VectorXd& start, int max_iterations,
                double tolerance) {
    const Eigen::MatrixXd& X = *p.X;
    const Eigen::Index n = X.rows();
    const Eigen::Index q = X.cols();
    Eigen::VectorXd y, w;
    fitting_scale(p, y, w);
    auto mean_of = [&](const Eigen::VectorXd& eta, Eigen::VectorXd& mu) {
        for (Eigen::Index i = 0; i < n; ++i) mu[i] = inverse_link(p.link, eta[i]);
    };

    IrlsResult r;
    r.mu.resize(n);
    if (start.size() == q && q > 0) {
        r.beta = start;
        r.eta = X * start + p.offset;
    } else {
        r.beta = Eigen::VectorXd::Zero(q);
        r.eta.resize(n);
        for (Eigen::Index i = 0; i < n; ++i) {
            double mu0 = starting_mean(p.family, y[i], p.m[i]);
            if (p.link == Link::log) mu0 = std::max(mu0, 1e-8);
            r.eta[i] = link_function(p.link, mu0);
        }
    }
    mean_of(r.eta, r.mu);
    double dev = start.size() == q ? scaled_deviance(p.family, y, w, r.mu, p.theta)
                                   : std::numeric_limits<double>::infinity();
    r.last_step = Eigen::VectorXd::Zero(q);
    if (q == 0) {
        r.eta = p.offset;
        mean_of(r.eta, r.mu);
        r.deviance = scaled_deviance(p.family, y, w, r.mu, p.theta);
        r.converged = true;
        return r;
    }

    // Buffers reused across iterations (large vectors: no allocation inside the loop).
    Eigen::VectorXd z(n), sw(n), b(n), eta_new(n), mu_new(n);
    Eigen::VectorXd beta_new(q);
    Eigen::MatrixXd A = Eigen::MatrixXd::Zero(n, q);
    // In-place decomposition of A (Eigen's Ref form): no second n × q copy.
    Eigen::ColPivHouseholderQR<Eigen::Ref<Eigen::MatrixXd>> qr(A);
    for (int it = 1; it <= max_iterations; ++it) {
        r.iterations = it;
        for (Eigen::Index i = 0; i < n; ++i) {
            const double d = inverse_link_derivative(p.link, r.eta[i]);
            const double v = variance_function(p.family, r.mu[i], p.theta);
            z[i] = r.eta[i] - p.offset[i] + (y[i] - r.mu[i]) / d;
            sw[i] = w[i] > 0.0 ? std::sqrt(w[i] * d * d / v) : 0.0;
        }
        A.noalias() = sw.asDiagonal() * X;
        b = sw.cwiseProduct(z);
        qr.compute(A);  // overwrites A with the factors
        beta_new = qr.solve(b);
        eta_new.noalias() = X * beta_new;
        eta_new += p.offset;
        mean_of(eta_new, mu_new);
        double dev_new = valid_eta(p.link, eta_new)
                             ? scaled_deviance(p.family, y, w, mu_new, p.theta)
                             : std::numeric_limits<double>::infinity();
        // Step halving towards the previous β when the deviance is not finite or rises
        // (common practice; only possible after the first iteration).
        if (it > 1) {
            for (int h = 0;
                 h < 40 && (!std::isfinite(dev_new) || dev_new > dev * (1.0 + 1e-12) + 1e-300);
                 ++h) {
                beta_new = 0.5 * (beta_new + r.beta);
                eta_new.noalias() = X * beta_new;
                eta_new += p.offset;
                mean_of(eta_new, mu_new);
                dev_new = scaled_deviance(p.family, y, w, mu_new, p.theta);
            }
        }
        r.last_step = beta_new - r.beta;
        r.beta = beta_new;
        r.eta.swap(eta_new);
        r.mu.swap(mu_new);
        const double change = std::isfinite(dev)
                                  ? std::abs(dev_new - dev) / (std::abs(dev_new) + 0.1)
                                  : std::numeric_limits<double>::infinity();
        dev = dev_new;
        r.last_change = change;
        if (change < tolerance) {
            r.converged = true;
            break;
        }
    }
    r.deviance = dev;
    return r;
}

Eigen::MatrixXd unscaled_covariance(const IrlsProblem& p, const Eigen::VectorXd& eta) {
    const Eigen::MatrixXd& X = *p.X;
    const Eigen::Index n = X.rows();
    const Eigen::Index q = X.cols();
    Eigen::VectorXd yy, w;
    fitting_scale(p, yy, w);
    Eigen::VectorXd sw(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double d = inverse_link_derivative(p.link, eta[i]);
        const double mu = inverse_link(p.link, eta[i]);
        const double v = variance_function(p.family, mu, p.theta);
        sw[i] = w[i] > 0.0 ? std::sqrt(w[i] * d * d / v) : 0.0;
    }
    // (XᵀWX)⁻¹ = P R⁻¹ R⁻ᵀ Pᵀ from √W X P = Q R: no normal equations are formed.
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(sw.asDiagonal() * X);
    const Eigen::MatrixXd R = qr.matrixR().topLeftCorner(q, q).triangularView<Eigen::Upper>();
    const Eigen::MatrixXd Rinv =
        R.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(q, q));
    const Eigen::MatrixXd C = Rinv * Rinv.transpose();
    return qr.colsPermutation() * C * qr.colsPermutation().transpose();
}

std::vector<bool> aliased_columns(const Eigen::MatrixXd& X, const Eigen::VectorXd& w) {
    const Eigen::Index n = X.rows();
    const Eigen::Index p = X.cols();
    std::vector<bool> out(static_cast<std::size_t>(p), false);
    const Eigen::VectorXd sw = w.cwiseMax(0.0).cwiseSqrt();
    Eigen::MatrixXd Q(n, p);
    Eigen::Index r = 0;
    for (Eigen::Index j = 0; j < p; ++j) {
        Eigen::VectorXd v = sw.cwiseProduct(X.col(j));
        const double norm0 = v.norm();
        if (norm0 > 0.0) {
            for (int pass = 0; pass < 2; ++pass)
                if (r > 0) v -= Q.leftCols(r) * (Q.leftCols(r).transpose() * v);
        }
        const double norm1 = v.norm();
        if (!(norm0 > 0.0) || norm1 <= 1e-7 * norm0) {
            out[static_cast<std::size_t>(j)] = true;
        } else {
            Q.col(r++) = v / norm1;
        }
    }
    return out;
}

}  // namespace safesite::stats::detail
