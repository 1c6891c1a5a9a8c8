#pragma once
/// \file prepared_model.hpp
/// Everything the analyses need after fitting (or after reading fixed parameters): the bound
/// vital rates of every kernel, the kernel layout and mesh settings, the recruitment
/// parameters, the arrival chain when there is one, the perturbations and the scenarios.
/// `fit` (fit.hpp) and `prepare_fixed` (fixed_model.hpp) produce it; `analyse` (run.hpp)
/// consumes it. Plain values only: no file is read after this point.

#include <cstddef>
#include <cstdint>
#include <limits>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/arrival/chain_parameters.hpp"
#include "safesite/census/size_transform.hpp"
#include "safesite/kernel/kernel_description.hpp"
#include "safesite/kernel/mesh.hpp"
#include "safesite/pipeline/establishment.hpp"
#include "safesite/pipeline/kernel_rates.hpp"

namespace safesite::pipeline {

/// The size mesh of every kernel (bounds already resolved from the data when not given).
struct MeshSettings {
    double lower = 0.0;    ///< L (kernel size scale), finite, L < U
    double upper = 1.0;    ///< U
    std::size_t points = 100;  ///< n ≥ 2
    kernel::QuadratureRule rule = kernel::QuadratureRule::midpoint;
    kernel::EvictionPolicy eviction = kernel::EvictionPolicy::boundary;
    /// Warn when growth or recruit-size mass off the mesh exceeds this share (≥ 0).
    double eviction_warning = 0.01;
    /// Range of the parent sizes seen in the census (kernel scale); NaN when there are no data
    /// (eviction is then judged over the whole mesh).
    double observed_lower = std::numeric_limits<double>::quiet_NaN();
    double observed_upper = std::numeric_limits<double>::quiet_NaN();
    /// The size transform, to state sizes in messages on the scale of the data.
    census::SizeTransform size_transform = census::SizeTransform::none;
};

/// One `[[scenario]]` as values: changes to the arrival chain (or direct fractions) and to
/// establishment.
struct ScenarioSettings {
    std::string name;
    arrival::ChainModifiers arrival;                    ///< cover, trapping odds, hazard, T, a
    std::map<std::string, double> establishment_factor; ///< e_m ← factor · e_m (factor ≥ 0)
};

/// Where the baseline arrival fractions come from.
enum class ArrivalSource {
    given,        ///< `[arrival] fractions` in the model file
    experiments,  ///< the arrival chain on fitted trapping and retention
};

/// The input of `analyse`.
struct PreparedModel {
    KernelLayout layout;                 ///< microsites, juvenile classes, year levels
    std::size_t bare = 0;                ///< index of the bare-soil microsite in layout
    MeshSettings mesh;
    std::vector<KernelRates> years;      ///< one per census transition t → t+1, in year order
    KernelRates pooled;                  ///< the pooled ("average year") kernel

    /// Baseline arrival fractions a (one per microsite, Σ ≤ 1).
    Eigen::VectorXd arrival;
    ArrivalSource arrival_source = ArrivalSource::given;
    /// The chain behind `arrival` when it comes from the experiments (needed for cover
    /// sensitivities and chain scenarios).
    std::optional<arrival::ChainParameters> chain;

    /// Establishment per year (same order as `years`) and pooled, one value per microsite.
    std::vector<Eigen::VectorXd> establishment_by_year;
    Eigen::VectorXd establishment_pooled;

    /// Proportional changes of juvenile survival, e.g. {−0.2, −0.1, 0, 0.1, 0.2} (each > −1).
    std::vector<double> survival_changes;
    std::vector<ScenarioSettings> scenarios;
    /// Compute the break-even bare-soil establishment for every neighbour form.
    bool break_even = true;
    /// Check mesh convergence by rebuilding every kernel with 2n points.
    bool mesh_check = true;
    /// Life-cycle measures of every kernel (flowering before death, age at first flowering,
    /// lifetime seed production): one more dense LU per kernel.
    bool life_cycle = true;
    /// Decompose each census year's λ − pooled λ by vital rate (symmetric substitution).
    bool decompose_years = true;
    /// Years simulated for the stochastic growth rate of the year kernels (0: not computed;
    /// needs two or more census years), and the seed of the year draws.
    std::size_t stochastic_years = 20000;
    std::uint64_t stochastic_seed = 1;

    std::vector<std::string> assumptions;  ///< stated assumptions, carried to the outputs
    std::vector<std::string> warnings;     ///< warnings met while preparing
};

}  // namespace safesite::pipeline
