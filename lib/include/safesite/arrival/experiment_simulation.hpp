#pragma once
/// \file experiment_simulation.hpp
/// Invent trapping trials and retention checks from known parameters (for `safesite
/// simulate`, the demo, recovery tests and study design). docs/methods/arrival.md,
/// "Simulated experiments".
///
/// Reproducibility: every stream is std::mt19937_64 seeded through std::seed_seq from
/// (seed, replicate, stream id); the variates are drawn with our own transformations of the
/// raw 64-bit output (not the implementation-defined std:: distributions), so the same
/// arguments give byte-identical output with any standard library.

#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"

namespace safesite::arrival {

/// True trapping model on the logit scale:
/// \f[ \operatorname{logit} \tau = \beta_0 + \beta_s \log(\text{size}) + \alpha_\text{form}
///     + \gamma_\text{seed type} + b_\text{neighbour}, \qquad b \sim N(0, \sigma_b^2). \f]
struct TrappingTruth {
    double intercept = 0.0;                        ///< β0 (logit scale)
    double log_size_slope = 0.0;                   ///< β_s per unit of log(neighbour_size)
    std::map<std::string, double> form_effect;     ///< α per form; absent = 0
    std::map<std::string, double> seed_type_effect;///< γ per seed type; absent = 0
    double neighbour_sd = 0.0;                     ///< σ_b ≥ 0, SD of neighbour intercepts
};

/// τ for one neighbour (b = neighbour effect on the logit scale). Throws UsageError when
/// size ≤ 0.
double trapping_probability(const TrappingTruth& truth, const std::string& form,
                            const std::string& seed_type, double neighbour_size,
                            double neighbour_effect = 0.0);

/// A neighbour plant used in trapping trials.
struct Neighbour {
    std::string id;
    std::string form;
    double size = 1.0;  ///< raw scale, > 0
};

/// `per_form` neighbours of each form with log-normal sizes, log(size) ~ N(log_size_mean,
/// log_size_sd²); ids "<form>-<k>" (k from 1). Same arguments → same neighbours.
std::vector<Neighbour> simulate_neighbours(const std::vector<std::string>& forms, int per_form,
                                           double log_size_mean, double log_size_sd,
                                           std::uint64_t seed, std::uint64_t replicate = 0);

/// The design of a trapping experiment: every neighbour gets one trial per seed type.
struct TrappingDesign {
    std::vector<Neighbour> neighbours;
    std::vector<std::string> seed_types;
    std::int64_t launched = 20;  ///< seeds launched per trial, > 0
};

/// trapped ~ Binomial(launched, τ) for each neighbour × seed type, τ from `truth` with one
/// neighbour effect b ~ N(0, σ_b²) per neighbour (shared by its seed types). Rows in the
/// order neighbour, then seed type. Throws UsageError for an invalid design.
std::vector<TrappingTrial> simulate_trapping(const TrappingTruth& truth,
                                             const TrappingDesign& design, std::uint64_t seed,
                                             std::uint64_t replicate = 0);

/// True retention model: constant daily departure hazard per microsite × seed type, times a
/// station frailty exp(u), u ~ N(0, σ_u²), shared by the seeds at a station.
struct RetentionTruth {
    /// hazard_per_day[microsite][seed_type] ≥ 0 (per day).
    std::map<std::string, std::map<std::string, double>> hazard_per_day;
    double station_sd = 0.0;  ///< σ_u ≥ 0 (log-hazard scale)
};

/// The design of a retention experiment.
struct RetentionDesign {
    std::vector<std::string> microsites;
    std::vector<std::string> seed_types;
    int stations_per_microsite = 5;      ///< stations "<microsite>-s<k>", ≥ 1
    int seeds_per_station = 4;           ///< seeds of each type placed at each station, ≥ 1
    /// Check days of the regular schedule: starts at 0, strictly increasing.
    std::vector<double> schedule = {0, 1, 3, 7, 14, 28, 56};
    /// Check days of the irregular schedule (same rules), used for a share of the seeds.
    std::vector<double> irregular_schedule = {0, 2, 5, 10, 21, 42};
    double irregular_share = 0.2;        ///< 0 ≤ share ≤ 1 of seeds on the irregular schedule
};

/// Each seed departs at an exponential time D with rate h·exp(u) (continuous time); it is
/// present at check day d when D > d. Checks stop after the first absence (the rest of the
/// history is implied). Seed ids "<station>-<seed_type>-<k>". Throws UsageError for an invalid
/// design or a missing hazard.
std::vector<RetentionCheck> simulate_retention(const RetentionTruth& truth,
                                               const RetentionDesign& design, std::uint64_t seed,
                                               std::uint64_t replicate = 0);

}  // namespace safesite::arrival
