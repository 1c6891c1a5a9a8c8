#pragma once
/// \file seed_experiments.hpp
/// Simulated seed experiments from a truth file (`[simulate.trapping]`,
/// `[simulate.retention]`; docs/methods/simulation.md, "Seed experiments"): trapping trials
/// and retention checks in the formats of docs/formats.md, and the true arrival chain.

#include <cstdint>
#include <vector>

#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/sim/arrival_truth.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::sim {

/// The simulated experiments and their truth.
struct SeedExperiments {
    /// One trial per neighbour × seed type: `neighbours_per_form` neighbours of each non-bare
    /// form ("<form>-<k>") with log-normal sizes (recorded to 4 significant digits, as a field
    /// team would; τ uses the recorded size), `launched` seeds each.
    std::vector<arrival::TrappingTrial> trapping;
    /// One row per seed per check: `stations_per_microsite` stations in every microsite,
    /// `seeds_per_station` seeds of every seed type each (arrival::simulate_retention).
    std::vector<arrival::RetentionCheck> retention;
    ArrivalTruth truth;                ///< true_arrival(model)
    report::TidyTable truth_arrival;   ///< truth_arrival_table(truth), name "truth-arrival"
    /// Every hazard of the truth: columns microsite, seed_type, hazard_per_day; name
    /// "truth-hazards".
    report::TidyTable truth_hazards;
    /// τ of every form × seed type (averaged as true_trapping()): columns form, seed_type,
    /// trapping; name "truth-trapping".
    report::TidyTable truth_trapping;
};

/// Simulate both experiments of a truth file. Random streams are derived from (seed, stream
/// ids of their own), separate from those of simulate_census: the same seed gives identical
/// output, and adding experiments to a truth changes none of the census draws.
/// \throws SpecError (key `simulate`) when the model has no experiment truth; UsageError as
///         arrival::simulate_trapping / simulate_retention for an invalid design.
SeedExperiments simulate_experiments(const spec::ModelSpec& truth, std::uint64_t seed);

}  // namespace safesite::sim
