#pragma once
/// \file analysis_result.hpp
/// The results of `analyse` (run.hpp): one KernelResult per census year and for the pooled
/// kernel, scenarios, parameter sensitivities and break-even establishment. Plain values;
/// `to_tables` (tables.hpp) turns them into the long-form output tables of docs/formats.md.

#include <cstddef>
#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/pipeline/break_even.hpp"
#include "safesite/pipeline/prepared_model.hpp"

namespace safesite::pipeline {

/// λ of a kernel under one proportional change δ of juvenile survival.
struct PerturbationPoint {
    double change = 0.0;   ///< δ: juvenile survival s → min(1, (1 + δ) s)
    double lambda = 0.0;   ///< λ under the change
};

/// Life-cycle measures of one kernel (docs/methods/life-history.md; analysis/life_history.hpp):
/// per class and mesh node, and for a recruit born in each microsite at its recruit-size
/// distribution. Times in census intervals; seeds are the seeds produced (p(z) b(z) per year),
/// not recruits.
struct LifeCycleResult {
    /// Per class and node, class-major (B·n) like KernelResult::w: expected number of censuses
    /// alive, the current one included (1ᵀN per individual).
    Eigen::VectorXd life_expectancy;
    Eigen::VectorXd flowering_probability;  ///< probability of flowering before death
    Eigen::VectorXd first_flowering_age;    ///< mean intervals to first flowering (NaN: never)
    Eigen::VectorXd seeds_mean;             ///< mean lifetime seed production
    Eigen::VectorXd seeds_variance;         ///< its variance
    /// A recruit of microsite m (entry class, recruit-size distribution on the mesh).
    struct AtBirth {
        std::string microsite;
        double life_expectancy = 0.0;
        double flowering_probability = 0.0;
        double first_flowering_age = 0.0;
        double seeds_mean = 0.0;
        double seeds_variance = 0.0;
    };
    std::vector<AtBirth> at_birth;  ///< one per microsite with recruits on the mesh
};

/// The largest share of growth (or recruit-size) mass that falls outside the mesh, for one
/// class of one kernel (docs/methods/kernel.md, "Eviction").
struct EvictionPeak {
    std::size_t class_index = 0;  ///< continuous class (layout order)
    std::string part;             ///< "growth" or "recruit_size"
    /// Parent size (kernel scale) at which the growth share is largest, over the mesh nodes in
    /// the observed size range; NaN for recruit size (it has no parent size).
    double size = std::numeric_limits<double>::quiet_NaN();
    double share = 0.0;           ///< the share of mass off [L, U] (before survival)
    bool above = true;            ///< most of that mass lies above U (else below L)
};

/// One class of a reducible kernel: its strongly connected component, the component's role
/// and λ (analysis/reducibility.hpp).
struct ClassComponent {
    std::string class_name;        ///< "gravel", "gravel (first-year)", or a stage name
    std::size_t component = 0;     ///< component number, upstream first (1-based)
    std::string role;              ///< self_renewing | dependent | declining
    double lambda_component = 0.0; ///< spectral radius of the kernel restricted to it
};

/// A kernel whose class graph is not strongly connected: every class with its component.
struct ReducibleKernel {
    std::string kernel;   ///< census year label or "pooled"
    std::string setting;  ///< "baseline", "scenario: <name>", "juvenile survival x<f>",
                          ///< "break-even <form>, e_bare = <0|1>"
    double lambda_kernel = 0.0;    ///< spectral radius of the whole kernel
    double lambda_renewing = 0.0;  ///< λ of the self-renewing part (0: nothing renews)
    std::vector<ClassComponent> classes;
};

/// One kernel (a census year t → t+1, or "pooled") and what was computed on it.
struct KernelResult {
    static constexpr double nan = std::numeric_limits<double>::quiet_NaN();

    std::string label;               ///< year label t, or "pooled"
    double lambda = nan;             ///< dominant eigenvalue (per year)
    double r0 = nan;                 ///< net reproductive rate R0
    double generation_time = nan;    ///< T = log R0 / log λ, years
    std::size_t points = 0;          ///< mesh points n
    double lambda_refined = nan;     ///< λ with 2n points (mesh convergence); NaN if not run

    Eigen::VectorXd nodes;           ///< mesh nodes z_i (kernel scale)
    Eigen::VectorXd weights;         ///< quadrature weights h_i
    /// Stable structure: density per class and node, class-major (B·n), normalised so that
    /// Σ_k Σ_i h_i w_k(z_i) = 1.
    Eigen::VectorXd w;
    /// Reproductive value, class-major, normalised so that Σ_k Σ_i h_i v_k(z_i) w_k(z_i) = 1.
    Eigen::VectorXd v;

    std::vector<double> max_evicted_growth;  ///< per class: max over parents of evicted mass
    std::vector<double> evicted_recruits;    ///< per microsite: recruit-size mass off the mesh
    /// Per class: the largest growth share off the mesh over observed parent sizes; per
    /// microsite: the recruit-size share off the mesh (entered under the entry class).
    std::vector<EvictionPeak> eviction;
    /// The class graph is not strongly connected; `lambda` is then λ of the self-renewing
    /// part and w, v are those of its leading component (zero elsewhere).
    bool reducible = false;

    Eigen::VectorXd arrival;          ///< a used
    Eigen::VectorXd establishment;    ///< e used

    /// Kernel-level elasticities (Caswell 2001; Easterling et al. 2000) summed over each block:
    /// one entry per (to group, from group, part) with a non-zero share of λ; groups are the
    /// continuous classes then the discrete stages; part is "survival_growth" or
    /// "reproduction". The shares sum to 1 over all entries.
    struct BlockElasticity {
        std::string to;
        std::string from;
        std::string part;
        double elasticity = 0.0;
    };
    std::vector<BlockElasticity> block_elasticities;

    std::vector<PerturbationPoint> perturbation;  ///< juvenile survival changes
    double juvenile_sensitivity = nan;  ///< dλ/dε for s_J → s_J + ε
    double juvenile_elasticity = nan;   ///< (1/λ) dλ/dδ for s_J → (1 + δ) s_J

    /// With PreparedModel::life_cycle.
    std::optional<LifeCycleResult> life_cycle;
};

/// One scenario's arrival, establishment and λ (pooled and per year).
struct ScenarioResult {
    std::string name;
    Eigen::VectorXd arrival;               ///< a under the scenario
    double lost = 0.0;                     ///< 1 − Σ a
    Eigen::VectorXd establishment_pooled;  ///< e of the pooled kernel under the scenario
    double lambda_pooled = 0.0;
    double delta_pooled = 0.0;             ///< λ_scenario − λ_baseline (pooled)
    std::vector<double> lambda_years;      ///< per census year (order of PreparedModel::years)
    std::vector<double> delta_years;
};

/// One component of a census year's departure from the pooled λ (docs/methods/pipeline.md,
/// "Year-to-year decomposition"): the symmetric one-at-a-time substitution
/// C_r = ½[(λ(pooled with r of the year) − λ_pooled) + (λ_year − λ(year with r pooled))].
struct YearContribution {
    std::string year;       ///< census year label t
    std::string component;  ///< survival | growth | flowering | seeds | recruit_size |
                            ///< establishment | interaction (the remainder)
    double contribution = 0.0;  ///< C_r; Σ over components (interaction included) = Δλ
    double delta_lambda = 0.0;  ///< λ_year − λ_pooled
};

/// Sensitivity and elasticity of the pooled λ to one parameter.
struct ParameterSensitivity {
    std::string parameter;     ///< arrival | establishment | cover | hazard | juvenile_survival
    std::string target;        ///< microsite or growth-form label ("" for juvenile survival)
    double value = 0.0;        ///< the parameter's value θ
    double sensitivity = 0.0;  ///< dλ/dθ
    double elasticity = 0.0;   ///< (θ/λ) dλ/dθ
};

/// Break-even bare-soil establishment for one neighbour form (break_even.hpp).
struct BreakEvenResult {
    std::string form;              ///< neighbour form f, or "all" (every form's seeds moved)
    double arrival_form = 0.0;     ///< a_f moved to bare soil
    double establishment_bare = 0.0;  ///< current ê_bare
    double lambda_baseline = 0.0;  ///< pooled λ0
    BreakEven solution;            ///< e* and status
};

/// Everything `analyse` computes.
/// The stochastic growth rate of the census years' kernels drawn at random, each year equally
/// likely and independently (analysis/stochastic_growth.hpp).
struct StochasticResult {
    std::size_t kernels = 0;     ///< year kernels drawn from
    std::size_t years = 0;       ///< simulated years averaged over
    double log_lambda = 0.0;     ///< log λ_s
    double lambda = 0.0;         ///< λ_s
    double std_error = 0.0;      ///< batch-means standard error of log λ_s
    std::uint64_t seed = 0;      ///< seed of the year draws
};

struct AnalysisResult {
    KernelLayout layout;
    std::size_t bare = 0;
    ArrivalSource arrival_source = ArrivalSource::given;
    std::vector<KernelResult> kernels;  ///< census years in order, then "pooled" last
    std::vector<ScenarioResult> scenarios;
    std::vector<ParameterSensitivity> sensitivities;
    std::vector<BreakEvenResult> break_even;
    /// Year-to-year decomposition of λ_year − λ_pooled by vital rate (PreparedModel::
    /// decompose_years), census years in order, components in the order of YearContribution.
    std::vector<YearContribution> year_contributions;
    /// With two or more year kernels and PreparedModel::stochastic_years > 0.
    std::optional<StochasticResult> stochastic;
    /// Every reducible kernel met: baseline kernels, scenarios, juvenile-survival changes and
    /// the ends of the break-even search (e_bare = 0 and 1).
    std::vector<ReducibleKernel> reducible;
    std::vector<std::string> assumptions;
    std::vector<std::string> warnings;

    /// The pooled kernel's result (the last one).
    const KernelResult& pooled() const { return kernels.back(); }
};

}  // namespace safesite::pipeline
