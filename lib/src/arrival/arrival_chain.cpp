// The seed arrival chain: p(T) = p(0) exp(QT) and its parameter derivatives.
//
// References (docs/references.md):
//   [1] Moler, C. & Van Loan, C. (2003) SIAM Review 45:3–49 — ways to compute exp(A).
//   [2] Higham, N. J. (2005) SIAM J. Matrix Anal. Appl. 26:1179–1193 — scaling and squaring
//       with Padé approximants (the algorithm behind Eigen's MatrixFunctions exp()).
//   [3] Higham, N. J. (2008) Functions of Matrices, SIAM — the Fréchet derivative of exp read
//       off a 2n×2n block exponential (from memory: Theorem 3.6 and section 10.6).
#include "safesite/arrival/arrival_chain.hpp"

#include <algorithm>
#include <cmath>
#include <string>

#include <unsupported/Eigen/MatrixFunctions>

#include "safesite/error.hpp"

namespace safesite::arrival {
namespace {

using Eigen::Index;
using Eigen::MatrixXd;
using Eigen::RowVectorXd;
using Eigen::VectorXd;

MatrixXd checked_exp(const MatrixXd& a) {
    MatrixXd e = a.exp();
    if (!e.allFinite())
        throw NumericalError("arrival chain: the matrix exponential exp(QT) is not finite");
    return e;
}

// The generator over {microsites 0..M−1, lost = M}, given the landing split.
MatrixXd build_generator(const ChainParameters& p, const VectorXd& split) {
    const Index m = split.size();
    MatrixXd q = MatrixXd::Zero(m + 1, m + 1);
    for (Index i = 0; i < m; ++i) {
        const double h = p.hazard_per_day[i];
        // Depart at rate h; re-land with probability ρ into the landing split (including m
        // itself: the diagonal gets +hρℓ_m − h), else lost.
        q.row(i).head(m) = h * p.relanding * split.transpose();
        q(i, i) -= h;
        q(i, m) = h * (1.0 - p.relanding);
    }
    return q;
}

// p0 · L(A, E) where L is the Fréchet derivative of exp at A in direction E:
// exp([[A, E], [0, A]]) = [[e^A, L(A, E)], [0, e^A]]   [3].
RowVectorXd frechet_applied(const RowVectorXd& p0, const MatrixXd& a, const MatrixXd& e) {
    const Index n = a.rows();
    MatrixXd big = MatrixXd::Zero(2 * n, 2 * n);
    big.topLeftCorner(n, n) = a;
    big.topRightCorner(n, n) = e;
    big.bottomRightCorner(n, n) = a;
    const MatrixXd eb = checked_exp(big);
    return p0 * eb.topRightCorner(n, n);
}

}  // namespace

MatrixXd generator(const ChainParameters& params) {
    const VectorXd split = landing_split(params);  // validates
    return build_generator(params, split);
}

ArrivalResult arrival_fractions(const ChainParameters& params) {
    const VectorXd split = landing_split(params);  // validates
    const Index m = split.size();
    const MatrixXd q = build_generator(params, split);
    RowVectorXd p0 = RowVectorXd::Zero(m + 1);
    p0.head(m) = split.transpose();
    // p(T) = p(0) exp(QT)   [1, 2]
    const RowVectorXd pt = p0 * checked_exp(q * params.exposure_days);
    ArrivalResult out;
    out.landing = split;
    // Rounding can leave tiny negatives (order 1e-17) where a probability is ~0; clamp so the
    // result is a valid probability vector.
    out.fractions = pt.head(m).transpose().cwiseMax(0.0);
    out.lost = std::max(0.0, pt[m]);
    return out;
}

ArrivalDerivatives arrival_derivatives(const ChainParameters& params) {
    const VectorXd split = landing_split(params);  // validates
    const Index m = split.size();
    const Index bare = static_cast<Index>(params.bare);
    const double t = params.exposure_days;
    const double rho = params.relanding;
    const VectorXd& h = params.hazard_per_day;
    const MatrixXd q = build_generator(params, split);
    const MatrixXd qt = q * t;
    const MatrixXd eqt = checked_exp(qt);
    RowVectorXd p0 = RowVectorXd::Zero(m + 1);
    p0.head(m) = split.transpose();

    // ∂p(T)/∂θ = ∂p0/∂θ · e^{QT} + p0 · L(QT, T ∂Q/∂θ).
    auto derivative = [&](const RowVectorXd& dp0, const MatrixXd& dq) -> VectorXd {
        RowVectorXd dp = dp0 * eqt;
        if (t > 0.0 && !dq.isZero(0.0)) dp += frechet_applied(p0, qt, t * dq);
        return dp.head(m).transpose();
    };
    // A change dℓ of the landing split moves p0 by (dℓ, 0) and the generator's microsite block
    // by ρ·h_i·dℓ_j (row i, column j).
    auto split_direction = [&](const VectorXd& dsplit) -> VectorXd {
        RowVectorXd dp0 = RowVectorXd::Zero(m + 1);
        dp0.head(m) = dsplit.transpose();
        MatrixXd dq = MatrixXd::Zero(m + 1, m + 1);
        dq.topLeftCorner(m, m) = rho * h * dsplit.transpose();
        return derivative(dp0, dq);
    };

    ArrivalDerivatives d;
    d.d_cover = MatrixXd::Zero(m, m);
    d.d_trapping = MatrixXd::Zero(m, m);
    d.d_hazard_per_day = MatrixXd::Zero(m, m);
    for (Index f = 0; f < m; ++f) {
        if (f == bare) continue;
        // ℓ_f = c_f τ_f and ℓ_bare = 1 − Σ c τ: ∂ℓ/∂c_f = τ_f (e_f − e_bare),
        // ∂ℓ/∂τ_f = c_f (e_f − e_bare).
        VectorXd unit = VectorXd::Zero(m);
        unit[f] = 1.0;
        unit[bare] = -1.0;
        d.d_cover.col(f) = split_direction(params.trapping[f] * unit);
        d.d_trapping.col(f) = split_direction(params.cover[f] * unit);
    }
    const RowVectorXd no_dp0 = RowVectorXd::Zero(m + 1);
    for (Index i = 0; i < m; ++i) {
        // Row i of Q is h_i·(ρℓᵀ − e_iᵀ, 1 − ρ): its derivative in h_i drops the factor h_i.
        MatrixXd dq = MatrixXd::Zero(m + 1, m + 1);
        dq.row(i).head(m) = rho * split.transpose();
        dq(i, i) -= 1.0;
        dq(i, m) = 1.0 - rho;
        d.d_hazard_per_day.col(i) = derivative(no_dp0, dq);
    }
    {
        // ∂Q/∂ρ: row i is h_i·(ℓᵀ, −1).
        MatrixXd dq = MatrixXd::Zero(m + 1, m + 1);
        dq.topLeftCorner(m, m) = h * split.transpose();
        dq.col(m).head(m) = -h;
        d.d_relanding = derivative(no_dp0, dq);
    }
    // dp(T)/dT = p(T) Q (Kolmogorov forward equation).
    d.d_exposure_days = (p0 * eqt * q).head(m).transpose();
    return d;
}

ArrivalResult scenario_arrival(const ChainParameters& params, const ChainModifiers& mod) {
    if (!mod.fractions.empty() && !mod.fraction_shares.empty())
        throw UsageError("arrival scenario: give either fractions or fraction shares, not both");
    if (mod.fractions.empty() && mod.fraction_shares.empty())
        return arrival_fractions(apply_modifiers(params, mod));

    validate(params);
    const Index m = static_cast<Index>(params.microsites.size());
    const bool shares = !mod.fraction_shares.empty();
    const auto& given = shares ? mod.fraction_shares : mod.fractions;
    VectorXd values = VectorXd::Zero(m);
    for (const auto& [label, x] : given) {
        const Index i = static_cast<Index>(microsite_index(params, label));
        if (!(x >= 0.0 && std::isfinite(x)) || (!shares && x > 1.0))
            throw UsageError("arrival scenario: " +
                             std::string(shares ? "fraction share" : "arrival fraction") +
                             " of \"" + label + "\" = " + std::to_string(x) + "; expected " +
                             (shares ? "a finite value ≥ 0" : "a value in [0, 1]"));
        values[i] = x;
    }
    const double sum = values.sum();
    ArrivalResult out;
    if (shares) {
        if (!(sum > 0.0))
            throw UsageError("arrival scenario: fraction shares are all 0");
        const double retained = arrival_fractions(params).fractions.sum();
        out.fractions = values * (retained / sum);
    } else {
        // Direct fractions may sum to less than 1 (the rest lost); 1e-9 allows for decimals
        // written to a few places in a model file (common practice).
        if (sum > 1.0 + 1e-9)
            throw UsageError("arrival scenario: arrival fractions sum to " + std::to_string(sum) +
                             "; expected at most 1");
        out.fractions = values;
    }
    out.lost = std::max(0.0, 1.0 - out.fractions.sum());
    return out;
}

}  // namespace safesite::arrival
