#pragma once
/// \file arrival_chain.hpp
/// The seed arrival chain (design.md §4, docs/methods/arrival.md): a continuous-time Markov
/// chain over the states {microsite 0..M−1, lost}.
///
/// A seed starts in the landing split, p(0) = (ℓ, 0). Lying in microsite m it departs at the
/// daily hazard h_m; a departing seed lands again within the stand with probability ρ,
/// re-entering the landing split (possibly back into m itself), and is lost otherwise. Lost
/// is absorbing. The generator (rates per day, rows sum to 0) is
/// \f[ Q_{m m'} = h_m\,\rho\,\ell_{m'} - h_m\,\delta_{m m'}, \qquad
///     Q_{m,\text{lost}} = h_m (1-\rho), \qquad Q_{\text{lost},\cdot} = 0, \f]
/// so a self-transition m → m (depart and re-land in m) leaves the state unchanged and the
/// effective exit rate from m is h_m(1 − ρ ℓ_m). After the exposure period T,
/// \f[ p(T) = p(0)\,\exp(Q T) \f]
/// (row vector; matrix exponential by scaling and squaring with Padé approximants, Higham
/// 2005, via Eigen's MatrixFunctions; Moler & Van Loan 2003 review the alternatives).
///
/// The arrival fractions are the microsite part of p(T), NOT normalised:
/// a_m = share of the seeds produced that are lying in microsite m when germination starts;
/// Σ a_m = 1 − p_lost(T) ≤ 1. Lost seeds produce nothing. The kernel multiplies seeds produced
/// by a_m · e_m (design.md §3).

#include <cstddef>

#include <Eigen/Core>

#include "safesite/arrival/chain_parameters.hpp"

namespace safesite::arrival {

/// Outcome of the chain for one parameter set.
struct ArrivalResult {
    /// Landing split ℓ = microsite part of p(0), length M, sums to 1.
    Eigen::VectorXd landing;
    /// Arrival fractions a_m = p_m(T), length M, each in [0, 1], Σ a_m ≤ 1 (not normalised).
    Eigen::VectorXd fractions;
    /// Share of the seeds lost by time T: p_lost(T) = 1 − Σ a_m (to rounding, ≤ 1e-12).
    double lost = 0.0;
};

/// Run the chain: p(T) = p(0) exp(QT). Validates `params` (UsageError); throws NumericalError
/// if the matrix exponential returns non-finite values.
ArrivalResult arrival_fractions(const ChainParameters& params);

/// The generator Q, (M+1)×(M+1), rates per day; state M is "lost". Validates `params`.
Eigen::MatrixXd generator(const ChainParameters& params);

/// Partial derivatives of the arrival fractions a (length M) with respect to each chain
/// parameter, at `params`. Column j of a matrix is ∂a/∂θ_j for the parameter of microsite j.
///
/// Computed exactly (to rounding) from
/// \f[ \frac{\partial p(T)}{\partial\theta} = \frac{\partial p(0)}{\partial\theta} e^{QT}
///     + p(0)\, L\!\left(QT,\ T\,\frac{\partial Q}{\partial\theta}\right), \f]
/// where L(A, E) is the Fréchet derivative of the matrix exponential, read off the upper-right
/// block of exp([[A, E], [0, A]]) (Higham 2008, Functions of Matrices, SIAM, Theorem 3.6 / eq.
/// 10.15 — from memory; checked in tests against central differences).
struct ArrivalDerivatives {
    /// ∂a/∂c_f, M×M; the column of the bare microsite is 0 (its cover is not a parameter).
    Eigen::MatrixXd d_cover;
    /// ∂a/∂τ_f, M×M; the column of the bare microsite is 0.
    Eigen::MatrixXd d_trapping;
    /// ∂a/∂h_m (per unit of hazard per day), M×M.
    Eigen::MatrixXd d_hazard_per_day;
    /// ∂a/∂ρ, length M.
    Eigen::VectorXd d_relanding;
    /// ∂a/∂T (per day), length M: the microsite part of p(T) Q.
    Eigen::VectorXd d_exposure_days;
};

/// All partial derivatives of a at `params` (see ArrivalDerivatives). The derivative with
/// respect to a cover or trapping value is one-sided in effect where the parameter sits on a
/// bound (e.g. Σ c_f = 1): the formula is the derivative of the smooth extension. Validates
/// `params` (UsageError); throws NumericalError on non-finite values.
ArrivalDerivatives arrival_derivatives(const ChainParameters& params);

/// Arrival fractions under a scenario: when `modifiers.fractions` is given, those values
/// (lost = 1 − Σ); when `modifiers.fraction_shares` is given, the shares normalised and
/// scaled to the retained total Σ a_m of `params` (the baseline); otherwise the chain run on
/// apply_modifiers(params, modifiers). In the direct cases `landing` is left empty.
/// Giving both `fractions` and `fraction_shares` is a UsageError, as are unknown labels,
/// negative values and Σ fractions > 1 (+1e-9).
ArrivalResult scenario_arrival(const ChainParameters& params, const ChainModifiers& modifiers);

}  // namespace safesite::arrival
