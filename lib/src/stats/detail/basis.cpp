// Orthogonal polynomials and natural cubic splines for design matrices.
//
// References (docs/references.md):
//  [1] Forsythe, G. E. (1957) J. SIAM 5:74–88 — orthogonal polynomials on a discrete point set
//      by a three-term recurrence.
//  [2] Hastie, Tibshirani & Friedman (2009) The Elements of Statistical Learning, 2nd ed.,
//      §5.2.1, eqs. 5.4–5.5 — a basis of natural cubic splines.
//  [3] Hyndman, R. J. & Fan, Y. (1996) Am. Stat. 50:361–365 — sample quantiles (type 7).
#include "stats/detail/basis.hpp"

#include <algorithm>
#include <cmath>

namespace safesite::stats::detail {

// Monic orthogonal polynomials with respect to the discrete measure on the training x [1]:
//   p_{-1} = 0, p_0 = 1,
//   p_j(x) = (x − α_j) p_{j−1}(x) − (N_j / N_{j−1}) p_{j−2}(x),
//   N_0 = 1, N_j = Σ_i p_{j−1}(x_i)²,  α_j = Σ_i x_i p_{j−1}(x_i)² / N_j.
// Design column j is p_j(x) / √N_{j+1}, which is orthonormal on the training rows and is
// evaluated at new x from the stored (α, N) alone.
bool orthpoly_learn(const Eigen::VectorXd& x, int degree, std::vector<double>& alpha,
                    std::vector<double>& norm2) {
    const Eigen::Index n = x.size();
    alpha.assign(static_cast<std::size_t>(degree), 0.0);
    norm2.assign(static_cast<std::size_t>(degree) + 2, 0.0);
    norm2[0] = 1.0;
    Eigen::VectorXd prev = Eigen::VectorXd::Zero(n);
    Eigen::VectorXd cur = Eigen::VectorXd::Ones(n);
    norm2[1] = static_cast<double>(n);
    const double scale = std::max(1.0, x.cwiseAbs().maxCoeff());
    for (int j = 1; j <= degree; ++j) {
        const double a = (x.array() * cur.array().square()).sum() / norm2[j];
        alpha[j - 1] = a;
        Eigen::VectorXd nxt = (x.array() - a) * cur.array() - (norm2[j] / norm2[j - 1]) * prev.array();
        prev.swap(cur);
        cur.swap(nxt);
        norm2[j + 1] = cur.squaredNorm();
        // A polynomial of degree j vanishes on fewer than j + 1 distinct points: its norm is
        // then rounding noise relative to the scale of x^j.
        if (!(norm2[j + 1] > 1e-20 * static_cast<double>(n) * std::pow(scale, 2.0 * j)))
            return false;
    }
    return true;
}

Eigen::MatrixXd orthpoly_basis(const Eigen::VectorXd& x, const std::vector<double>& alpha,
                               const std::vector<double>& norm2) {
    const Eigen::Index n = x.size();
    const int degree = static_cast<int>(alpha.size());
    Eigen::MatrixXd out(n, degree);
    Eigen::VectorXd prev = Eigen::VectorXd::Zero(n);
    Eigen::VectorXd cur = Eigen::VectorXd::Ones(n);
    for (int j = 1; j <= degree; ++j) {
        Eigen::VectorXd nxt =
            (x.array() - alpha[j - 1]) * cur.array() - (norm2[j] / norm2[j - 1]) * prev.array();
        prev.swap(cur);
        cur.swap(nxt);
        out.col(j - 1) = cur / std::sqrt(norm2[j + 1]);
    }
    return out;
}

double quantile_type7(std::vector<double> v, double p) {
    std::sort(v.begin(), v.end());
    const double h = (static_cast<double>(v.size()) - 1.0) * p;
    const auto lo = static_cast<std::size_t>(std::floor(h));
    if (lo + 1 >= v.size()) return v.back();
    return v[lo] + (h - static_cast<double>(lo)) * (v[lo + 1] - v[lo]);
}

// Natural cubic spline basis of [2] with knots ξ_1 < … < ξ_K (ξ_1, ξ_K the boundary knots,
// K = df + 1), on the rescaled u = (x − ξ_1)/(ξ_K − ξ_1) ∈ [0, 1] for conditioning (a natural
// spline in u is one in x):
//   N_1(u) = u,   N_{k+1}(u) = d_k(u) − d_{K−1}(u),  k = 1..K−2,
//   d_k(u) = [(u − κ_k)_+³ − (u − κ_K)_+³] / (κ_K − κ_k).
// Each N is cubic between knots, linear beyond the boundary knots (second and third
// derivatives vanish there), so the fit extrapolates linearly outside the training range.
Eigen::MatrixXd nspline_basis(const Eigen::VectorXd& x, double lower, double upper,
                              const std::vector<double>& interior) {
    const Eigen::Index n = x.size();
    std::vector<double> kappa;
    kappa.push_back(0.0);
    const double width = upper - lower;
    for (double k : interior) kappa.push_back((k - lower) / width);
    kappa.push_back(1.0);
    const std::size_t K = kappa.size();
    Eigen::MatrixXd out(n, static_cast<Eigen::Index>(K - 1));
    auto cube_plus = [](double v) { return v > 0.0 ? v * v * v : 0.0; };
    for (Eigen::Index i = 0; i < n; ++i) {
        const double u = (x[i] - lower) / width;
        out(i, 0) = u;
        const double tail = cube_plus(u - kappa[K - 1]);
        auto d = [&](std::size_t k) { return (cube_plus(u - kappa[k]) - tail) / (kappa[K - 1] - kappa[k]); };
        const double d_last = d(K - 2);
        for (std::size_t k = 0; k + 2 < K; ++k) out(i, static_cast<Eigen::Index>(k) + 1) = d(k) - d_last;
    }
    return out;
}

}  // namespace safesite::stats::detail
