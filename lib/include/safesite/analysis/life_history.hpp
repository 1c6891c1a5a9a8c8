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
/// Per-state rates for the life-cycle measures (each of length rows(); 0 for states that
/// cannot flower or reproduce, such as seed-bank stages).
struct LifeCycleRates {
    /// p_j ∈ [0, 1]: probability that an individual in state j flowers at this census.
    Eigen::VectorXd flowering;
    /// ρ1_j ≥ 0: expected reward (e.g. seeds) produced in one census interval in state j.
    Eigen::VectorXd reward;
    /// ρ2_j ≥ ρ1_j²: second moment of that reward (ρ1_j² when the reward is fixed by state).
    Eigen::VectorXd reward_square;
};

/// Life-cycle measures per state j of an individual (not per unit of density):
/// - flowering_probability B_j: probability of flowering at least once before death, with
///   flowering an absorbing "reproduced" state: \f$P_0 = P\,\mathrm{diag}(1 - p)\f$ (a plant
///   flowers at census t with probability p(z); one that does not survives and grows by P),
///   \f$B^\top = p^\top (I - P_0)^{-1}\f$ (Ellner, Childs & Rees 2016 §3.3; Caswell 2001 §5.3);
/// - first_flowering_age A_j: mean number of census intervals from now to the first flowering,
///   given that it happens (0 = flowers at the current census):
///   \f$A_j = [p^\top (N_0^2 - N_0)]_j / B_j\f$, NaN where B_j = 0;
/// - reward_mean and reward_second_moment: the first two moments of the reward accumulated
///   over the remaining life, the current census included (Markov chain with rewards,
///   Caswell 2001 ch. 5; derived in life_history.cpp):
///   \f$m_1^\top = \rho_1^\top N\f$,
///   \f$m_2^\top = (\rho_2 + 2\rho_1 \circ (m_1 - \rho_1))^\top N\f$.
///   The variance is m2 − m1². Assumes the reward in a year is independent of the fate
///   (survival, growth) given the state.
/// With mesh weights ω the per-individual chain is \f$\Omega P \Omega^{-1}\f$; every formula
/// above is applied to it (equivalently: solve with Pᵀ on ω∘f, divide by ω).
struct LifeCycle {
    Eigen::VectorXd flowering_probability;
    Eigen::VectorXd first_flowering_age;
    Eigen::VectorXd reward_mean;
    Eigen::VectorXd reward_second_moment;
};

struct LifeHistory {
    double net_reproductive_rate = 0.0;
    std::optional<double> generation_time;
    Eigen::VectorXd life_expectancy;
    /// Present when LifeCycleRates were given.
    std::optional<LifeCycle> cycle;
};

/// The measures of a cohort born with the distribution π over states (π ≥ 0, Σ π = 1; e.g.
/// the recruit-size distribution of one microsite, as numbers per state): averages over π,
/// the age at first flowering weighted by the flowering probability, and the variance of the
/// lifetime reward by the law of total variance, Σ π m2 − (Σ π m1)².
struct CohortLifeCycle {
    double life_expectancy = 0.0;        ///< censuses alive, the birth census included
    double flowering_probability = 0.0;  ///< probability of flowering before death
    double first_flowering_age = 0.0;    ///< mean age (census intervals) at first flowering
                                         ///< given flowering; NaN when it never flowers
    double reward_mean = 0.0;            ///< mean lifetime reward
    double reward_variance = 0.0;        ///< variance of the lifetime reward
};

/// From a kernel operator (P and F as KernelOperator's parts; F is rank one, so
/// \f$R_0 = s^\top N u\f$ with F = u sᵀ). Dense LU on the (B·n + D)² matrix I − P: about
/// (2/3)(B n + D)³ flops.
///
/// Throws NumericalError when the spectral radius of P is ≥ 1 (individuals would live forever:
/// no finite N). The test is exact: for P ≥ 0, \f$y = (I - P^\top)^{-1}\omega\f$ exists with
/// y > 0 if and only if ρ(P) < 1 (Collatz–Wielandt bound; Berman & Plemmons 1994, M-matrices,
/// from memory).
/// With `rates`, also the LifeCycle measures: one more dense LU (of I − P0) and four solves
/// that reuse the LU of I − P.
LifeHistory life_history(const kernel::KernelOperator& op, double lambda,
                         const LifeCycleRates* rates = nullptr);

/// From plain stage matrices P (survival–transition) and F (fertility), both D×D, ≥ 0.
/// Throws UsageError on bad shapes, NumericalError when ρ(P) ≥ 1 or FN has no real dominant
/// eigenvalue. With `rates`, also the LifeCycle measures (ω = 1). Rates of the wrong length,
/// probabilities outside [0, 1], negative rewards or ρ2 < ρ1² (beyond rounding) are a
/// UsageError.
LifeHistory life_history(const Eigen::MatrixXd& P, const Eigen::MatrixXd& F, double lambda,
                         const LifeCycleRates* rates = nullptr);

/// The cohort measures of `history` (which must hold a LifeCycle) for the birth distribution
/// `birth` (length of the state, ≥ 0, summing to 1 within 1e-9). Throws UsageError otherwise.
CohortLifeCycle cohort_life_cycle(const LifeHistory& history, const Eigen::VectorXd& birth);

}  // namespace safesite::analysis
