// Life-history measures from the fundamental operator N = (I − P)^{-1}.
// References: [1] Caswell (2001) §5.3 (fundamental matrix, life expectancy) and §5.3.4 (R0 as
// the dominant eigenvalue of F N); [2] Ellner, Childs & Rees (2016) §3.1–3.3 (the same for
// IPMs; generation time T = log R0 / log λ).
#include "safesite/analysis/life_history.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdio>
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

std::optional<double> generation_time(double r0, double lambda) {
    if (!(r0 > 0.0) || !(lambda > 0.0)) return std::nullopt;
    const double lr = std::log(r0), ll = std::log(lambda);
    if (std::abs(ll) < 1e-12 || std::abs(lr) < 1e-12) return std::nullopt;
    return lr / ll;
}

}  // namespace

LifeHistory life_history(const kernel::KernelOperator& op, double lambda) {
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
    return out;
}

LifeHistory life_history(const Eigen::MatrixXd& P, const Eigen::MatrixXd& F, double lambda) {
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
    return out;
}

}  // namespace safesite::analysis
