#pragma once
/// \file census_simulation.hpp
/// An individual-based simulation of a census from a truth model file (every vital rate given
/// as fixed parameter values; docs/formats.md), for the demo, for recovery tests and for study
/// design (docs/methods/simulation.md).
///
/// Each census year t every tagged plant alive at t is recorded; it flowers with probability
/// p_m(z), a flowering plant sets b ~ NegBin(μ = b_m(z), θ) seeds (Poisson without θ), it
/// survives to t+1 with probability s_m(z) and grows to z' ~ N(μ_g(z), σ_g(z)²) on the kernel's
/// size scale. Each seed comes to rest in microsite m' with probability a_m' and establishes
/// with probability e_m'; each recruit is seen at the census of t+1 with a size drawn from
/// N(μ_c,m', σ_c,m'²) and is flagged seedling = 1 in that first row. Every rate's linear
/// predictor in year t is shifted by a year deviation δ_rate,t ~ N(0, year_sd²) drawn once per
/// rate and year (the truth of that year). Plants keep their plot and microsite for life.
/// There is no density dependence: with λ > 1 the census grows geometrically (see
/// SimulationOptions::max_new_per_plot).
///
/// With seed experiments in the truth (`[arrival] method = "experiments"` with
/// `[simulate.trapping]`, `[simulate.retention]`), a_m are the true chain's arrival fractions
/// (true_arrival() in arrival_truth.hpp; Σ a ≤ 1, the rest of the seeds lost), and the census
/// gets a `neighbour_size` column: for a plant under a neighbour form, the raw size of its
/// neighbour, drawn once from the form's log-normal (log_size_mean, log_size_sd) at tagging and
/// kept for life; empty on bare soil. Those draws have a stream of their own, so the census
/// draws are those of the same truth with the fractions given directly.

#include <cstddef>
#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::sim {

/// Settings of a simulated census.
struct SimulationOptions {
    std::size_t plants = 2000;  ///< tagged plants at the first census, ≥ 1
    int years = 10;             ///< census years, ≥ 2
    std::uint64_t seed = 1;     ///< every random stream derives from (seed, stream id)
    int first_year = 2015;      ///< label of the first census year
    int plots = 8;              ///< plots "P1".."Pk", ≥ 1; recruits stay in their parent's plot
    /// Untagged years simulated before the first census, from plants with recruit sizes, so that
    /// the first census has a size structure near the stable one (≥ 0). The population is held
    /// at `plants` during the burn-in by random thinning or resampling.
    int burn_in = 15;
    double notfound_rate = 0.02;      ///< P(an alive tagged plant is not found in a census)
    double missing_seed_rate = 0.05;  ///< P(a flowering plant's seeds are not counted)
    bool coordinates = true;          ///< write x, y (invented local metres within the plot)
    double plot_side_m = 10.0;        ///< side of a square plot, metres (> 0)
    /// The most recruits newly tagged per plot and year (0: no cap). A real census can tag only
    /// so many; when more recruits appear, a random subset of this size is tagged and the rest
    /// are not followed. A cap that bites biases establishment estimates downwards (the census
    /// no longer sees every recruit): the number of untagged recruits is reported.
    std::size_t max_new_per_plot = 0;
};

/// A simulated census and its truth.
struct CensusSimulation {
    /// The census in the long format of docs/formats.md (columns plant, year, plot, microsite,
    /// size, status, flowered, seeds, seedling, with seed experiments neighbour_size, and with
    /// coordinates x, y); name "census".
    report::TidyTable census;
    /// The drawn year deviations: columns rate, year, deviation, year_sd; name "truth-years".
    report::TidyTable truth_years;
    /// Census year labels, in order.
    std::vector<std::string> years;
    /// rate → year label → deviation δ (link scale), for every rate with a year_sd (the
    /// shifts of pipeline::FixedModelOptions, to build the true year kernels).
    std::map<std::string, std::map<std::string, double>> deviations;
    /// Per census year: tagged plants alive, recruits seen (tagged), recruits not tagged
    /// because of the cap.
    std::vector<std::size_t> alive;
    std::vector<std::size_t> recruits;
    std::vector<std::size_t> untagged;
};

/// Simulate a census from a truth model.
///
/// \throws SpecError when a rate is not fixed (key `rates.<name>.coefficients`), when the
///         seeds family is not poisson or negbin (key `rates.seeds.family`), when
///         establishment values are not given (key `establishment.values`), when the arrival
///         fractions are neither given nor implied by an experiment truth (key
///         `arrival.fractions`); UsageError for options out of range; NumericalError when the
///         census would exceed 5 million rows (λ far above 1: use a truth with λ near 1 or
///         `max_new_per_plot`).
CensusSimulation simulate_census(const spec::ModelSpec& truth, const SimulationOptions& options);

}  // namespace safesite::sim
