#pragma once
/// \file arrival_truth.hpp
/// The true arrival fractions of a truth file with seed experiments (`[arrival] method =
/// "experiments"` plus `[simulate.trapping]` and `[simulate.retention]`): the arrival chain of
/// design.md §4 run on the true parameters (docs/methods/simulation.md, "Seed experiments").

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/arrival/chain_parameters.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/experiment_truth_spec.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::sim {

/// The true chain parameters and their outcome, one entry per microsite in the order of
/// `[microsites] labels`.
struct ArrivalTruth {
    std::vector<std::string> microsites;
    std::size_t bare = 0;            ///< index of the bare-soil microsite
    std::string seed_type;           ///< the focal seed type (`[arrival] seed_type`)
    /// c_f for the neighbour forms; at `bare` the bare ground 1 − Σ c_f (not a chain
    /// parameter, shown for reading the table).
    std::vector<double> cover;
    /// τ_f of the focal seed type for the neighbour forms (see true_trapping()); NaN at `bare`.
    std::vector<double> trapping;
    /// h_m = hazard_per_day[m][focal seed type] of a typical station (frailty u = 0), per day.
    std::vector<double> hazard_per_day;
    double relanding = 0.0;          ///< ρ, `[arrival] relanding`
    double exposure_days = 0.0;      ///< T, `[arrival] exposure_days`
    std::vector<double> landing;     ///< ℓ_m, the landing split (sums to 1)
    /// a_m = p_m(T), NOT normalised: Σ a_m = 1 − lost ≤ 1 (arrival::arrival_fractions).
    std::vector<double> fractions;
    double lost = 0.0;               ///< 1 − Σ a_m
    /// The same parameters as the arrival module takes them (e.g. for
    /// pipeline::FixedModelOptions::chain, to build the true kernels).
    arrival::ChainParameters chain;
};

/// Number of size quantiles in true_trapping(): η is evaluated at the midpoint quantiles
/// Φ⁻¹((i − ½)/400), i = 1..400, of the log-size distribution.
inline constexpr int k_trapping_size_quantiles = 400;

/// True trapping probability of a neighbour form for one seed type, averaged over the form's
/// neighbours: over their log-normal sizes, log(size) ~ N(μ_f, σ_s²), AND over the neighbour
/// intercept b ~ N(0, σ_b²),
/// \f[ \tau_f = \mathrm{E}_{x, b}\!\left[\operatorname{logit}^{-1}(\beta_0 + \beta_s x +
///     \alpha_f + \gamma_k + b)\right] \approx \frac{1}{n}\sum_{i=1}^{n}
///     \mathrm{E}_b\!\left[\operatorname{logit}^{-1}(\eta_i + b)\right], \f]
/// with η_i at x_i = μ_f + σ_s Φ⁻¹((i − ½)/n), n = k_trapping_size_quantiles (midpoint rule
/// on the probability scale), the expectation over b by arrival::average_trapping (with
/// sd = σ_b). With σ_s = 0 every x_i = μ_f. The midpoint quantiles have a slightly smaller
/// spread than the normal distribution (their tails are cut at the 1/800 quantiles): measured
/// against a fine quadrature, the error in τ is below 5e-5 for |β_s σ_s| ≤ 2 and below 4e-6
/// for |β_s σ_s| ≤ 0.2, far below what trials of realistic size can resolve (checked in
/// tests/unit/sim).
///
/// This is the τ_f the fitted trapping model estimates (arrival::trapping_by_form averages
/// over the census neighbour sizes and the random intercepts in the same way).
/// \throws UsageError when `form` has no log_size_mean.
double true_trapping(const spec::TrappingTruthSpec& truth, const std::string& form,
                     const std::string& seed_type);

/// The true chain: τ_f = true_trapping(f, focal) for every neighbour form, h_m =
/// hazard_per_day[m][focal], cover, relanding and exposure days from `[arrival]`, and
/// a = arrival::arrival_fractions(...) (not normalised).
/// \throws SpecError (key `simulate`) when the model has no experiment truth.
ArrivalTruth true_arrival(const spec::ModelSpec& truth);

/// The truth as a table "truth-arrival", shaped like the `arrival_chain` output table of a run
/// (docs/formats.md): one row per microsite with columns microsite, cover, trapping (missing
/// for bare soil), hazard_per_day, landing, fraction, and a last row `lost` (cover, trapping
/// and hazard missing, landing 0, fraction 1 − Σ a_m; the fraction column sums to 1).
report::TidyTable truth_arrival_table(const ArrivalTruth& truth);

}  // namespace safesite::sim
