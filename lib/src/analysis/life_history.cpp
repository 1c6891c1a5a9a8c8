// Life-history measures from the fundamental operator N = (I − P)^{-1}.
// References: [1] Caswell (2001) §5.3 (fundamental matrix, life expectancy) and §5.3.4 (R0 as
// the dominant eigenvalue of F N); [2] Ellner, Childs & Rees (2016) §3.1–3.3 (the same for
// IPMs; generation time T = log R0 / log λ); [3] Ellner, Childs & Rees (2016) §3.3 (probability
// of reproducing: flowering as an absorbing state, P0 = P diag(1 − p)); [4] Caswell (2001)
// ch. 5 (Markov chains with rewards; the moment recursion below is derived here, not copied).
#include "safesite/analysis/life_history.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdio>
#include <limits>
#include <string>

#include <Eigen/Eigenvalues>
#include <Eigen/LU>

#include "core/number_text.hpp"
#include "safesite/error.hpp"

namespace safesite::analysis {

namespace {

std::string number(double x) { return core::number_text(x, 6); }

// LU of I − P, life expectancy η = (I − Pᵀ)^{-1} ω / ω, and the ρ(P) < 1 check on y.
Eigen::PartialPivLU<Eigen::MatrixXd> fundamental(const Eigen::MatrixXd& P,
                                                 const Eigen::VectorXd& omega,
                                                 Eigen::VectorXd& expectancy) {
    const Eigen::Index N = P.rows();
    const Eigen::MatrixXd I_minus_P = Eigen::MatrixXd::Identity(N, N) - P;
    Eigen::PartialPivLU<Eigen::MatrixXd> lu(I_minus_P);
    // y = (I − P)^{-T} ω: solve with the transpose through the same factorisation.
    const Eigen::VectorXd y = lu.transpose().solve(omega);
    // ρ(P) < 1 ⇔ y > 0 for P ≥ 0 and ω > 0 (see life_history.hpp). A singular I − P gives
    // non-finite or wrong-signed y, which this catches as well.
    for (Eigen::Index j = 0; j < N; ++j) {
        if (!std::isfinite(y[j]) || !(y[j] > 0.0))
            throw NumericalError(
                "life history: the survival-growth part P has spectral radius >= 1 (state " +
                std::to_string(j) + " would live forever: expected lifetime " + number(y[j]) +
                "); no fundamental operator (I - P)^-1");
    }
    // Residual check of the solve (common practice: catch a nearly singular I − P).
    const double res = (I_minus_P.transpose() * y - omega).norm();
    if (!(res <= 1e-8 * omega.norm() * std::max(1.0, y.cwiseAbs().maxCoeff())))
        throw NumericalError("life history: I - P is numerically singular (residual " +
                             number(res) + ")");
    expectancy = y.cwiseQuotient(omega);
    return lu;
}

void check_rates(const LifeCycleRates& r, Eigen::Index n) {
    if (r.flowering.size() != n || r.reward.size() != n || r.reward_square.size() != n)
        throw UsageError("life_history: the life-cycle rates need one value per state (" +
                         std::to_string(n) + ")");
    for (Eigen::Index j = 0; j < n; ++j) {
        const double p = r.flowering[j], r1 = r.reward[j], r2 = r.reward_square[j];
        if (!(p >= 0.0 && p <= 1.0))
            throw UsageError("life_history: flowering probability " + number(p) +
                             " of state " + std::to_string(j) + " is not in [0, 1]");
        if (!(r1 >= 0.0) || !std::isfinite(r1) || !std::isfinite(r2) ||
            r2 < r1 * r1 * (1.0 - 1e-12))
            throw UsageError("life_history: reward moments of state " + std::to_string(j) +
                             " must be finite with 0 <= mean and mean^2 <= second moment");
    }
}

// The life-cycle measures per individual. ω: state weights; lu: LU of I − P (reused).
// Per-individual chain Q = Ω P Ω^{-1} (Ω = diag ω), so (I − Q)^{-1} = Ω N Ω^{-1} and a row
// vector fᵀ(I − Q)^{-1} is, as a column, Ω^{-1} Nᵀ Ω f: solve (I − P)ᵀ y = ω∘f, divide by ω.
//
// Lifetime reward R from state j (current census included), Y_0 the reward of this census,
// R' the reward after the transition (0 when dead), Y_0 independent of the fate given j:
//   m1(j) = ρ1(j) + Σ_i Q_ij m1(i)                      ⇒ m1ᵀ = ρ1ᵀ (I − Q)^{-1}
//   m2(j) = E[(Y_0 + R')²] = ρ2(j) + 2 ρ1(j) E[R'|j] + E[R'²|j],
//   E[R'|j] = (m1ᵀQ)_j = m1(j) − ρ1(j),  E[R'²|j] = (m2ᵀQ)_j
//                                                      ⇒ m2ᵀ = (ρ2 + 2 ρ1∘(m1 − ρ1))ᵀ (I − Q)^{-1}.
// Check: constant survival s, constant reward r: m1 = r/(1 − s), m2 = r²(1 + s)/(1 − s)²,
// variance r² s/(1 − s)² = r² Var(geometric lifetime) (tests/unit/analysis).
//
// First flowering: Q0 = Ω P0 Ω^{-1} with P0 = P diag(1 − p); f_a = pᵀ Q0^a e_j is the
// probability of flowering first at age a (a = 0: at the current census).
//   B = Σ_a f_a = pᵀ (I − Q0)^{-1} e_j,
//   Σ_a a f_a = pᵀ Q0 (I − Q0)^{-2} e_j = pᵀ [(I − Q0)^{-2} − (I − Q0)^{-1}] e_j
// (Σ_a a X^a = X (I − X)^{-2} and X = I − (I − X)), so A = Σ a f_a / B.
LifeCycle life_cycle(const Eigen::MatrixXd& P, const Eigen::VectorXd& omega,
                     const Eigen::PartialPivLU<Eigen::MatrixXd>& lu, const LifeCycleRates& r) {
    const Eigen::Index n = P.rows();
    check_rates(r, n);
    auto backward = [&omega](const auto& factor, const Eigen::VectorXd& f) {
        return Eigen::VectorXd(factor.transpose().solve(omega.cwiseProduct(f)))
            .cwiseQuotient(omega)
            .eval();
    };
    LifeCycle out;
    out.reward_mean = backward(lu, r.reward);
    const Eigen::VectorXd g =
        r.reward_square + 2.0 * r.reward.cwiseProduct(out.reward_mean - r.reward);
    out.reward_second_moment = backward(lu, g);

    // The one extra factorisation: I − P0 with P0 = P diag(1 − p), i.e. column j scaled.
    Eigen::MatrixXd I_minus_P0 = -(P * (Eigen::VectorXd::Ones(n) - r.flowering).asDiagonal());
    I_minus_P0.diagonal().array() += 1.0;
    // In-place LU (Eigen's Ref specialisation): no second copy of the (B·n + D)² matrix.
    const Eigen::PartialPivLU<Eigen::Ref<Eigen::MatrixXd>> lu0(I_minus_P0);
    out.flowering_probability = backward(lu0, r.flowering);
    // Σ_a a f_a = [pᵀ N0 N0]_j − B_j: apply the backward solve twice.
    const Eigen::VectorXd twice = backward(lu0, out.flowering_probability);
    out.first_flowering_age.resize(n);
    for (Eigen::Index j = 0; j < n; ++j) {
        const double b = out.flowering_probability[j];
        out.first_flowering_age[j] =
            b > 0.0 ? std::max(0.0, (twice[j] - b) / b) : std::numeric_limits<double>::quiet_NaN();
    }
    if (!out.reward_mean.allFinite() || !out.reward_second_moment.allFinite() ||
        !out.flowering_probability.allFinite())
        throw NumericalError("life history: the life-cycle solves gave non-finite values");
    return out;
}

std::optional<double> generation_time(double r0, double lambda) {
    if (!(r0 > 0.0) || !(lambda > 0.0)) return std::nullopt;
    const double lr = std::log(r0), ll = std::log(lambda);
    if (std::abs(ll) < 1e-12 || std::abs(lr) < 1e-12) return std::nullopt;
    return lr / ll;
}

}  // namespace

LifeHistory life_history(const kernel::KernelOperator& op, double lambda,
                         const LifeCycleRates* rates) {
    if (!(lambda > 0.0) || !std::isfinite(lambda))
        throw UsageError("life_history: lambda must be positive and finite, got " +
                         number(lambda));
    LifeHistory out;
    const Eigen::MatrixXd P = op.to_dense(kernel::KernelPart::survival_growth);
    const auto lu = fundamental(P, op.state_weights(), out.life_expectancy);
    // F = u sᵀ, so F N = u (sᵀ N) has the single non-zero eigenvalue sᵀ N u.
    const Eigen::VectorXd u = op.offspring_per_seed();
    const Eigen::VectorXd s = op.seeds_per_individual();
    out.net_reproductive_rate = s.dot(lu.solve(u));
    out.generation_time = generation_time(out.net_reproductive_rate, lambda);
    if (rates) out.cycle = life_cycle(P, op.state_weights(), lu, *rates);
    return out;
}

LifeHistory life_history(const Eigen::MatrixXd& P, const Eigen::MatrixXd& F, double lambda,
                         const LifeCycleRates* rates) {
    if (P.rows() == 0 || P.rows() != P.cols() || F.rows() != P.rows() || F.cols() != P.cols())
        throw UsageError("life_history: P and F must be square matrices of the same size");
    if (!(lambda > 0.0) || !std::isfinite(lambda))
        throw UsageError("life_history: lambda must be positive and finite, got " +
                         number(lambda));
    if (!P.allFinite() || !F.allFinite() || P.minCoeff() < 0.0 || F.minCoeff() < 0.0)
        throw UsageError("life_history: P and F must be finite and non-negative");
    LifeHistory out;
    const auto lu = fundamental(P, Eigen::VectorXd::Ones(P.rows()), out.life_expectancy);
    const Eigen::MatrixXd R = F * lu.inverse();
    Eigen::EigenSolver<Eigen::MatrixXd> es(R, false);
    const Eigen::VectorXcd values = es.eigenvalues();
    Eigen::Index lead = 0;
    for (Eigen::Index i = 1; i < values.size(); ++i)
        if (std::abs(values[i]) > std::abs(values[lead])) lead = i;
    if (std::abs(values[lead].imag()) > 1e-10 * std::abs(values[lead]) ||
        values[lead].real() < 0.0)
        throw NumericalError("life history: F N has no real non-negative dominant eigenvalue");
    out.net_reproductive_rate = values[lead].real();
    out.generation_time = generation_time(out.net_reproductive_rate, lambda);
    if (rates) out.cycle = life_cycle(P, Eigen::VectorXd::Ones(P.rows()), lu, *rates);
    return out;
}

CohortLifeCycle cohort_life_cycle(const LifeHistory& history, const Eigen::VectorXd& birth) {
    if (!history.cycle)
        throw UsageError("cohort_life_cycle: the life history has no life-cycle measures");
    const LifeCycle& c = *history.cycle;
    if (birth.size() != history.life_expectancy.size() || !birth.allFinite() ||
        (birth.size() > 0 && birth.minCoeff() < 0.0) || std::abs(birth.sum() - 1.0) > 1e-9)
        throw UsageError("cohort_life_cycle: the birth distribution must have one value >= 0 "
                         "per state and sum to 1");
    CohortLifeCycle out;
    out.life_expectancy = birth.dot(history.life_expectancy);
    out.flowering_probability = birth.dot(c.flowering_probability);
    // E[age | flowers] = Σ_j π_j B_j A_j / Σ_j π_j B_j (states with B_j = 0 carry no weight).
    double weighted = 0.0;
    for (Eigen::Index j = 0; j < birth.size(); ++j)
        if (birth[j] > 0.0 && c.flowering_probability[j] > 0.0)
            weighted += birth[j] * c.flowering_probability[j] * c.first_flowering_age[j];
    out.first_flowering_age = out.flowering_probability > 0.0
                                  ? weighted / out.flowering_probability
                                  : std::numeric_limits<double>::quiet_NaN();
    out.reward_mean = birth.dot(c.reward_mean);
    // Law of total variance over the birth state: E[m2] − (E[m1])².
    out.reward_variance =
        std::max(0.0, birth.dot(c.reward_second_moment) - out.reward_mean * out.reward_mean);
    return out;
}

}  // namespace safesite::analysis
