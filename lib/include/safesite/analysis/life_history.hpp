#pragma once
/// \file life_history.hpp
/// Life-history measures from the survival–growth part P and the reproduction part F.

#include <optional>

#include <Eigen/Core>

#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::analysis {

/// Measures from the fundamental operator \f$N = (I - P)^{-1}\f$ (Caswell 2001 §5.3;
/// Ellner, Childs & Rees 2016 §3.1–3.3):
/// - net reproductive rate \f$R_0\f$ = dominant eigenvalue of \f$F N\f$ (offspring per
///   individual over its life, counted in the states offspring are born into);
/// - generation time \f$T = \log R_0 / \log\lambda\f$ (years); empty when λ = 1 or R0 = 1
///   within 1e-12, where the ratio is 0/0;
/// - mean life expectancy \f$\eta_j = (\omega^\top N)_j / \omega_j\f$: the expected number of
///   censuses at which an individual now in state j is alive, the current one included
///   (years; subtract 1 for the years still to come). For ω = 1 these are the column sums
///   \f$e^\top N\f$.
struct LifeHistory {
    double net_reproductive_rate = 0.0;
    std::optional<double> generation_time;
    Eigen::VectorXd life_expectancy;
};

/// From a kernel operator (P and F as KernelOperator's parts; F is rank one, so
/// \f$R_0 = s^\top N u\f$ with F = u sᵀ). Dense LU on the (B·n + D)² matrix I − P: about
/// (2/3)(B n + D)³ flops.
///
/// Throws NumericalError when the spectral radius of P is ≥ 1 (individuals would live forever:
/// no finite N). The test is exact: for P ≥ 0, \f$y = (I - P^\top)^{-1}\omega\f$ exists with
/// y > 0 if and only if ρ(P) < 1 (Collatz–Wielandt bound; Berman & Plemmons 1994, M-matrices,
/// from memory).
LifeHistory life_history(const kernel::KernelOperator& op, double lambda);

/// From plain stage matrices P (survival–transition) and F (fertility), both D×D, ≥ 0.
/// Throws UsageError on bad shapes, NumericalError when ρ(P) ≥ 1 or FN has no real dominant
/// eigenvalue.
LifeHistory life_history(const Eigen::MatrixXd& P, const Eigen::MatrixXd& F, double lambda);

}  // namespace safesite::analysis
