#pragma once
/// \file chain_parameters.hpp
/// The parameters of the seed arrival chain (design.md §4, docs/methods/arrival.md) and the
/// scenario modifiers that change them.
///
/// Microsites are indexed 0..M−1; one of them is bare soil, every other one is a neighbour
/// growth form f (a seed under a cushion plant is in microsite "cushion").
///
/// Landing split (where a released or re-landing seed comes to rest first):
/// \f[ \ell_f = c_f\,\tau_f \quad (f \ne \text{bare}), \qquad
///     \ell_\text{bare} = 1 - \sum_{f \ne \text{bare}} c_f\,\tau_f . \f]
/// A seed meets form f with probability c_f (the ground cover of f) and is trapped there with
/// probability τ_f; a seed that meets no neighbour, or meets one and is not trapped, lies on
/// bare soil. Hence ℓ sums to 1 and ℓ_bare ≥ 1 − Σ c_f (the bare ground) (Harper 1977 for
/// safe sites; the trapping rule is our own modelling choice, documented in
/// docs/methods/arrival.md).

#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::arrival {

/// Everything the arrival chain needs, as plain values. Vectors have one entry per microsite,
/// in the order of `microsites`.
struct ChainParameters {
    /// Microsite labels, M ≥ 1, distinct and non-empty.
    std::vector<std::string> microsites;
    /// Index of the bare-soil microsite in `microsites` (0 ≤ bare < M).
    std::size_t bare = 0;
    /// Ground cover c_f of each neighbour form, a proportion of ground area: 0 ≤ c_f ≤ 1 and
    /// Σ_{f≠bare} c_f ≤ 1. The entry at `bare` is ignored (bare ground is 1 − Σ c_f).
    Eigen::VectorXd cover;
    /// Trapping probability τ_f of each neighbour form for the focal seed type, already
    /// averaged over the neighbours' sizes (see average_trapping()): 0 ≤ τ_f ≤ 1. The entry at
    /// `bare` is ignored.
    Eigen::VectorXd trapping;
    /// Daily departure hazard h_m of a seed lying in microsite m, per day: 0 ≤ h_m < ∞.
    Eigen::VectorXd hazard_per_day;
    /// Probability ρ that a departing seed lands again within the stand (else it is lost):
    /// 0 ≤ ρ ≤ 1.
    double relanding = 0.0;
    /// Exposure period T from release to germination, in days (snow-free days): 0 ≤ T < ∞.
    double exposure_days = 0.0;
};

/// Assemble ChainParameters from labelled values, as the model file and the fitted models give
/// them: `cover` and `trapping` need every non-bare microsite (a bare entry is an error),
/// `hazard_per_day` every microsite. Throws UsageError naming a missing or unknown label, and
/// as validate().
ChainParameters make_chain_parameters(const std::vector<std::string>& microsites,
                                      const std::string& bare,
                                      const std::map<std::string, double>& cover,
                                      const std::map<std::string, double>& trapping,
                                      const std::map<std::string, double>& hazard_per_day,
                                      double relanding, double exposure_days);

/// Check every precondition of ChainParameters (sizes, ranges, Σ cover ≤ 1 + 1e-12).
/// Throws UsageError naming the parameter and the microsite label.
void validate(const ChainParameters& params);

/// Index of a microsite label. Throws UsageError listing the labels when absent.
std::size_t microsite_index(const ChainParameters& params, const std::string& label);

/// The landing split ℓ (length M, sums to 1), see the file comment. Validates first.
Eigen::VectorXd landing_split(const ChainParameters& params);

/// Scenario changes to the chain (all optional; absent = unchanged). Keys are microsite labels.
struct ChainModifiers {
    /// c_f ← factor · c_f (factor ≥ 0); the result must keep Σ c_f ≤ 1.
    std::map<std::string, double> cover_factor;
    /// Trapping odds τ/(1−τ) ← factor · τ/(1−τ) (factor ≥ 0), i.e. τ ← kτ / (1 − τ + kτ);
    /// τ = 1 stays 1 unless the factor is 0.
    std::map<std::string, double> trapping_odds_factor;
    /// h_m ← factor · h_m (factor ≥ 0), for any microsite including bare soil.
    std::map<std::string, double> hazard_factor;
    /// Replaces the exposure period T (days, ≥ 0).
    std::optional<double> exposure_days;
    /// Replaces the re-landing probability ρ (0 ≤ ρ ≤ 1).
    std::optional<double> relanding;
    /// Arrival fractions given directly, bypassing the chain: a_m as given (each in [0, 1],
    /// Σ ≤ 1, the rest lost; microsites not named get 0).
    std::map<std::string, double> fractions;
    /// Arrival fractions given as relative shares (≥ 0, not all 0): normalised to sum 1 and
    /// multiplied by the baseline's retained total Σ a_m, so a scenario such as "every seed on
    /// bare soil" moves seeds between microsites without changing how many are lost.
    std::map<std::string, double> fraction_shares;
};

/// The chain parameters with the cover, trapping-odds, hazard, exposure and re-landing
/// modifiers applied (the `fractions`/`fraction_shares` entries are ignored here; see
/// scenario_arrival() in arrival_chain.hpp). Throws UsageError for an unknown label, a
/// negative factor, or a result that breaks a precondition (e.g. Σ c_f > 1).
ChainParameters apply_modifiers(const ChainParameters& params, const ChainModifiers& modifiers);

}  // namespace safesite::arrival
