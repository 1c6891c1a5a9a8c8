#pragma once
/// \file experiment_truth_spec.hpp
/// The truth of the seed experiments: the `[simulate.trapping]` and `[simulate.retention]`
/// tables of a truth model file (docs/formats.md, "Model file"; docs/methods/simulation.md).
/// Only `safesite simulate` reads them; they are allowed only with `[arrival] method =
/// "experiments"` and a cover table, and always come together.

#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "safesite/error.hpp"

namespace safesite::spec {

/// `[simulate.trapping]`: the true trapping model and the design of the trapping trials.
///
/// \f[ \operatorname{logit}\tau = \beta_0 + \beta_s \log(\text{neighbour\_size}) +
///     \alpha_\text{form} + \gamma_\text{seed type} + b, \qquad b \sim N(0, \sigma_b^2), \f]
/// one b per neighbour; the neighbours of form f have log(size) ~ N(μ_f, σ_s²).
struct TrappingTruthSpec {
    double intercept = 0.0;       ///< β0, logit scale
    double log_size_slope = 0.0;  ///< β_s per unit of log(neighbour_size) (raw size)
    /// α_f per non-bare microsite (logit scale); a form not listed has α_f = 0.
    std::map<std::string, double> form_effect;
    /// γ per seed type (logit scale); its keys are the seed types of both experiments
    /// (at least one; the map's order is the order of the trials).
    std::map<std::string, double> seed_type_effect;
    double neighbour_sd = 0.0;          ///< σ_b ≥ 0, SD of the neighbour intercepts
    int neighbours_per_form = 1;        ///< neighbours tried per form, ≥ 1
    /// μ_f, mean of log(neighbour size) (raw size) for every non-bare microsite.
    std::map<std::string, double> log_size_mean;
    double log_size_sd = 0.0;           ///< σ_s ≥ 0
    std::int64_t launched = 1;          ///< seeds per trial, ≥ 1

    /// The seed types (keys of seed_type_effect), in order.
    std::vector<std::string> seed_types() const {
        std::vector<std::string> out;
        for (const auto& [type, effect] : seed_type_effect) out.push_back(type);
        return out;
    }
};

/// `[simulate.retention]`: the true departure hazards and the design of the retention checks.
/// A seed of type k placed at a station in microsite m leaves at the constant daily hazard
/// h_{m,k} · exp(u), u ~ N(0, σ_u²) shared by the seeds of a station.
struct RetentionTruthSpec {
    /// h_{m,k} ≥ 0 per day, for every microsite m and every seed type k.
    std::map<std::string, std::map<std::string, double>> hazard_per_day;
    double station_sd = 0.0;          ///< σ_u ≥ 0, log-hazard scale (default 0)
    int stations_per_microsite = 1;   ///< ≥ 1
    int seeds_per_station = 1;        ///< seeds of each type per station, ≥ 1
    /// Check days of the regular schedule: starts at 0, ≥ 2 checks, strictly increasing.
    std::vector<double> schedule;
    /// Check days of the irregular schedule (same rules); needed when irregular_share > 0.
    std::vector<double> irregular_schedule;
    double irregular_share = 0.0;     ///< 0 ≤ share ≤ 1 of the seeds on the irregular schedule
};

/// Both tables of a truth file with seed experiments.
struct ExperimentTruthSpec {
    TrappingTruthSpec trapping;
    RetentionTruthSpec retention;
    SourceLocation at;  ///< the [simulate] table
};

}  // namespace safesite::spec
