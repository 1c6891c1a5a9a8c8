#include "stats/detail/laplace_engine.hpp"

#include <algorithm>
#include <cmath>

#include <Eigen/Cholesky>

namespace safesite::stats::detail {

namespace {
constexpr double kLog2Pi = 1.83787706640934548356;

// log|S| from an LLT factor: 2 Σ log L_ii.
double log_det_llt(const Eigen::LLT<Eigen::MatrixXd>& llt) {
    return 2.0 * llt.matrixLLT().diagonal().array().log().sum();
}
}  // namespace

double GaussianProfile::deviance(bool reml, int n, int p) const {
    // [Bates2015] eq. 34 (ML) and eq. 41 (REML), with σ² profiled out.
    const double m = reml ? n - p : n;
    return log_det_A + (reml ? log_det_S : 0.0) + m * (1.0 + kLog2Pi + std::log(r2 / m));
}

double GaussianProfile::deviance_at_sigma(bool reml, int n, int p, double sigma) const {
    const double m = reml ? n - p : n;
    const double s2 = sigma * sigma;
    return log_det_A + (reml ? log_det_S : 0.0) + m * (kLog2Pi + std::log(s2)) + r2 / s2;
}

double GaussianProfile::sigma2(bool reml, int n, int p) const { return r2 / (reml ? n - p : n); }

GaussianProfile gaussian_profile(RandomDesign& re, const Eigen::MatrixXd& X,
                                 const Eigen::VectorXd& y, const Eigen::VectorXd& theta) {
    GaussianProfile out;
    const Eigen::Index n = X.rows(), p = X.cols();
    re.set_theta(theta);
    const Eigen::VectorXd w = Eigen::VectorXd::Ones(n);
    if (!re.factorize(w)) return out;
    // Penalised least squares [Bates2015, eqs. 16-18] by block elimination:
    //   A u + B β = c,   B'u + X'X β = X'y,   A = Λ'Z'ZΛ + I, B = Λ'Z'X, c = Λ'Z'y.
    Eigen::MatrixXd rhs(re.q(), p + 1);
    rhs.leftCols(p) = re.times_t(w, X);
    rhs.col(p) = re.times_t(w, y);
    const Eigen::MatrixXd sol = re.solve(rhs);
    const auto B = rhs.leftCols(p);
    out.S = X.transpose() * X - B.transpose() * sol.leftCols(p);
    const Eigen::VectorXd rb = X.transpose() * y - B.transpose() * sol.col(p);
    Eigen::LLT<Eigen::MatrixXd> llt(out.S);
    if (llt.info() != Eigen::Success) return out;
    out.beta = llt.solve(rb);
    out.u = sol.col(p) - sol.leftCols(p) * out.beta;
    const Eigen::VectorXd resid = y - X * out.beta - re.times(out.u);
    out.r2 = resid.squaredNorm() + out.u.squaredNorm();
    out.log_det_A = re.log_det();
    out.log_det_S = log_det_llt(llt);
    out.ok = std::isfinite(out.r2) && out.r2 > 0.0;
    return out;
}

LaplaceEngine::LaplaceEngine(RandomDesign& re, const Eigen::MatrixXd& X,
                             const Eigen::VectorXd& offset, const ConditionalResponse& response)
    : m_re(re), m_X(X), m_offset(offset), m_resp(response) {
    m_u = Eigen::VectorXd::Zero(re.q());
    m_beta = Eigen::VectorXd::Zero(X.cols());
}

double LaplaceEngine::joint(const Eigen::VectorXd& theta) {
    m_re.set_theta(theta);
    return pirls(true);
}

double LaplaceEngine::conditional(const Eigen::VectorXd& theta, const Eigen::VectorXd& beta) {
    m_re.set_theta(theta);
    m_beta = beta;
    return pirls(false);
}

// Penalised IRLS [Bates2015, section 5.4]: Fisher-scoring steps on the penalised deviance
//   pdev(u, β) = −2 log p(y | η) + ‖u‖²,  η = offset + Xβ + ZΛu,
// each solving A u + B β = Λ'Z'W(z − offset) (and, with β, the second block row), with step
// halving whenever pdev would rise. At the mode the Laplace approximation is
//   −2 log L ≈ pdev(ũ, β) + log|A(ũ)|        [Bates2015, eq. 52; Breslow1993].
// Convergence: the last full step moved no coordinate by more than tol·max(1, |x|), with
// tol = 1e-7 for canonical links — PIRLS is then Newton's method, whose quadratic
// convergence leaves an error of order tol² — and tol = 1e-10 otherwise (Fisher scoring
// converges only linearly). Common practice; the outer finite differences need the
// criterion to about 1e-12.
double LaplaceEngine::pirls(bool with_beta) {
    const int p = static_cast<int>(m_X.cols());
    const int q = m_re.q();
    m_last_ok = true;
    Eigen::VectorXd eta;
    bool from_start = false;
    if (!m_started) {
        m_u.setZero();
        if (with_beta) {
            m_beta.setZero();
            eta = m_resp.start_eta();
            from_start = true;
        } else {
            eta = m_offset + m_X * m_beta;
        }
        m_started = true;
    } else {
        eta = m_offset + m_X * m_beta + m_re.times(m_u);
    }
    double pdev = m_resp.minus_two_log_lik(eta) + m_u.squaredNorm();
    bool converged = false;
    constexpr int kMaxIter = 100;
    const double tol = m_resp.canonical() ? 1e-7 : 1e-10;
    for (int it = 0; it < kMaxIter; ++it) {
        ++m_pirls_iterations;
        const WorkingValues wv = m_resp.working(eta);
        if (!m_re.factorize(wv.w)) {
            m_last_ok = false;
            return std::numeric_limits<double>::infinity();
        }
        Eigen::MatrixXd sol, B;
        Eigen::VectorXd zr = wv.z - m_offset;
        if (!with_beta) zr -= m_X * m_beta;
        if (with_beta) {
            Eigen::MatrixXd rhs(q, p + 1);
            rhs.leftCols(p) = m_re.times_t(wv.w, m_X);
            rhs.col(p) = m_re.times_t(wv.w, zr);
            sol = m_re.solve(rhs);
            B = rhs.leftCols(p);
            const Eigen::MatrixXd XtW = m_X.transpose() * wv.w.asDiagonal();
            m_S = XtW * m_X - B.transpose() * sol.leftCols(p);
        }
        if (converged) return pdev + m_re.log_det();
        Eigen::VectorXd u_t, beta_t = m_beta;
        if (with_beta) {
            const Eigen::MatrixXd XtW = m_X.transpose() * wv.w.asDiagonal();
            const Eigen::VectorXd rb = XtW * zr - B.transpose() * sol.col(p);
            Eigen::LLT<Eigen::MatrixXd> llt(m_S);
            if (llt.info() != Eigen::Success) {
                m_last_ok = false;
                return std::numeric_limits<double>::infinity();
            }
            beta_t = llt.solve(rb);
            u_t = sol.col(p) - sol.leftCols(p) * beta_t;
        } else {
            u_t = m_re.solve(m_re.times_t(wv.w, zr));
        }
        // Step halving on the penalised deviance.
        double t = 1.0;
        bool accepted = false;
        Eigen::VectorXd u_c, beta_c, eta_c;
        double pdev_c = pdev;
        for (int h = 0; h < 40; ++h, t *= 0.5) {
            u_c = m_u + t * (u_t - m_u);
            beta_c = m_beta + t * (beta_t - m_beta);
            eta_c = m_offset + m_X * beta_c + m_re.times(u_c);
            pdev_c = m_resp.minus_two_log_lik(eta_c) + u_c.squaredNorm();
            if (std::isfinite(pdev_c) &&
                (from_start || pdev_c <= pdev + 1e-12 * (1.0 + std::abs(pdev)))) {
                accepted = true;
                break;
            }
        }
        from_start = false;
        if (!accepted) {
            // No decrease along the Newton direction: the current point is the mode to
            // working precision. The factorisation at hand belongs to it.
            return pdev + m_re.log_det();
        }
        double step = 0.0, scale = 1.0;
        for (int j = 0; j < q; ++j) {
            step = std::max(step, std::abs(u_c[j] - m_u[j]));
            scale = std::max(scale, std::abs(u_c[j]));
        }
        for (int j = 0; j < p; ++j) {
            step = std::max(step, std::abs(beta_c[j] - m_beta[j]));
            scale = std::max(scale, std::abs(beta_c[j]));
        }
        converged = t == 1.0 && step < tol * scale;
        m_u = u_c;
        m_beta = beta_c;
        eta = eta_c;
        pdev = pdev_c;
    }
    m_last_ok = false;
    const WorkingValues wv = m_resp.working(eta);
    m_re.factorize(wv.w);
    return pdev + m_re.log_det();
}

}  // namespace safesite::stats::detail
