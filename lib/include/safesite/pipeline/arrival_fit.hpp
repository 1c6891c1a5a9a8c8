#pragma once
/// \file arrival_fit.hpp
/// The seed experiments inside a run (`[arrival] method = "experiments"`): read the trapping
/// trials and retention checks, fit the trapping model (binomial, logit) and the retention
/// model (binomial, complementary log-log, offset log Δ), average the trapping probability of
/// each growth form over the neighbours' sizes, and run the arrival chain for the focal seed
/// type (design.md §4; docs/methods/arrival.md and docs/methods/pipeline.md, "Arrival from
/// the seed experiments").

#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/arrival/binomial_fit.hpp"
#include "safesite/arrival/chain_parameters.hpp"
#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/retention_model.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// Where the neighbour sizes behind a form's τ_f come from.
enum class NeighbourSizeSource {
    census,  ///< the census column neighbour_size of the plant records under the form
    trials,  ///< the neighbours of the trapping trials (the census has no sizes for the form)
};

/// τ of one growth form for one seed type, averaged over neighbour sizes and the neighbour
/// random intercept (arrival::trapping_by_form).
struct FormTrapping {
    std::string form;
    std::string seed_type;
    double trapping = 0.0;                 ///< τ_f in [0, 1]
    std::size_t sizes = 0;                 ///< neighbour sizes averaged over
    NeighbourSizeSource source = NeighbourSizeSource::trials;
};

/// Both seed experiments as read (e.g. once for every bootstrap replicate).
struct ExperimentData {
    arrival::TrappingData trapping;
    arrival::RetentionData retention;
};

/// Read `[data] trapping` and `retention` of `model` with their column maps.
/// \throws SpecError when either path is missing; DataError as the arrival readers.
ExperimentData read_experiments(const spec::ModelSpec& model);

/// What the census contributes to the arrival chain.
struct ArrivalCensusInputs {
    /// Ground cover per microsite (bare entry 0) by the census rule (pipeline::census_cover);
    /// required when `[arrival] cover = "census"`, ignored otherwise.
    std::optional<Eigen::VectorXd> cover;
    /// Neighbour sizes (raw scale) per growth form from the census; a form absent or empty
    /// here takes the sizes of its trial neighbours.
    std::map<std::string, std::vector<double>> neighbour_sizes;
};

/// The fitted seed experiments and the chain they give.
struct ArrivalFit {
    std::string seed_type;             ///< the focal seed type ([arrival] seed_type)
    arrival::BinomialFit trapping;     ///< trapped / launched, logit link
    arrival::BinomialFit retention;    ///< left, cloglog link, offset log(interval_days)
    std::vector<FormTrapping> trapping_by_form;     ///< every form × seed type of the trials
    std::vector<arrival::HazardEstimate> hazards;   ///< every microsite × seed type, 95 % Wald
    bool cover_from_census = false;
    arrival::ChainParameters chain;    ///< cover, τ and h of the focal seed type, ρ, T
    arrival::ArrivalResult result;     ///< landing split ℓ, arrival fractions a, lost
    std::size_t trials = 0;            ///< trapping rows
    std::size_t neighbours = 0;        ///< distinct trial neighbours
    std::size_t seeds = 0;             ///< retention seeds
    std::size_t intervals = 0;         ///< at-risk intervals of the retention fit
    double last_check_day = 0.0;       ///< the latest check day of the retention data
    std::vector<std::string> warnings; ///< fitter diagnostics, prefixed by the model name
};

/// Fit both experiments of `model` (method = experiments) on the given data.
/// \throws SpecError naming `arrival.seed_type` when the focal seed type is missing from
///         either experiment, `arrival.cover` when cover = "census" but `census.cover` is
///         empty; DataError when a microsite has no retention data or a form no trapping
///         trials; stats::FormulaError (as SpecError with the formula key) for a formula that
///         does not fit the data; UsageError / NumericalError as the arrival module.
ArrivalFit fit_arrival(const spec::ModelSpec& model, const arrival::TrappingData& trapping,
                       const arrival::RetentionData& retention,
                       const ArrivalCensusInputs& census);

/// Read `[data] trapping` and `retention` (with their column maps) and fit as above.
/// \throws DataError for unreadable or invalid files (file, line, column), and as above.
ArrivalFit fit_arrival(const spec::ModelSpec& model, const ArrivalCensusInputs& census);

/// The run's arrival-fit tables (docs/formats.md): `trapping` (τ per form × seed type),
/// `hazards` (daily departure hazard per microsite × seed type with its interval),
/// `retention_curve` (R(t) = exp(−h t) per microsite × seed type at whole days 0..D, D the
/// larger of the last check day and T) and `arrival_chain` (per microsite: cover, τ, h,
/// landing split, arrival fraction).
std::vector<report::TidyTable> arrival_fit_tables(const ArrivalFit& fit);

}  // namespace safesite::pipeline
