#pragma once
/// \file fixed_model.hpp
/// Models whose vital rates are all given as fixed parameter values (`coefficients` in every
/// `[rates.*]` table): `safesite eval`, and the truth of a simulation. No data are read.
///
/// A truth file's year effects are additive shifts of the linear predictor, one per rate and
/// census year (the simulator draws them with SD `year_sd`); with the shifts of a simulation,
/// the kernels built here are the true year kernels that fitted kernels are compared with
/// (issue 4, "Checks").

#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "safesite/pipeline/prepared_model.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline {

/// rate name → census year label → additive shift of that rate's linear predictor (link
/// scale). A rate or year not listed has shift 0.
using YearShifts = std::map<std::string, std::map<std::string, double>>;

/// Options of prepare_fixed.
struct FixedModelOptions {
    /// Census year labels t of the year kernels (t → t+1), in order; empty: pooled only.
    std::vector<std::string> years;
    /// Year shifts of the linear predictors (a simulation's draws); the pooled kernel has none.
    YearShifts shifts;
    /// Mesh bounds to use instead of `[mesh] lower/upper` (e.g. those of a fit to simulated
    /// data, so that true and fitted kernels share a mesh).
    std::optional<std::pair<double, double>> mesh_bounds;
    /// The arrival chain of a model with `[arrival] method = "experiments"`: the baseline
    /// arrival fractions are the chain's (a simulation's true chain, or the chain fitted by
    /// fit_arrival). Ignored when the arrival fractions are given directly.
    std::optional<arrival::ChainParameters> chain;
};

/// The bound rates of one kernel of a fixed model: each rate's g⁻¹(Xβ + shift) with β from
/// `coefficients`, the Gaussian SD from `sd` or `spread_coefficients` (over the `spread`
/// column, default `size`). `year_levels` types the year factor of the predictions.
///
/// \throws SpecError (key `rates.<name>.coefficients`) when a rate is not fixed, when a
///         coefficient names no design column of the formula, or when a design column has
///         no coefficient; (key `rates.<name>.sd` / `spread_coefficients`) when the SD
///         parameters are missing.
KernelRates fixed_kernel_rates(const spec::ModelSpec& model, const std::string& label,
                               const std::map<std::string, double>& shift_by_rate,
                               const std::vector<std::string>& year_levels);

/// A PreparedModel from a fixed model: the year kernels of `options.years` (with their
/// shifts) and the pooled kernel (no shifts); arrival fractions as given, or those of
/// `options.chain` for `method = "experiments"`; establishment as given (`[establishment]
/// method = "fixed"`).
///
/// \throws SpecError when a rate is not fixed, when the arrival fractions (or, for
///         experiments, `options.chain`) or the establishment values are not given, or when
///         the mesh bounds are neither given in the file nor in `options` (key `mesh.lower`).
PreparedModel prepare_fixed(const spec::ModelSpec& model, const FixedModelOptions& options = {});

}  // namespace safesite::pipeline
