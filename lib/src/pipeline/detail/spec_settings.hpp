#pragma once
// Model-file values (spec::ModelSpec) → the pipeline's plain settings.

#include <string>
#include <utility>
#include <vector>

#include "safesite/pipeline/prepared_model.hpp"
#include "safesite/spec/model_spec.hpp"

namespace safesite::pipeline::detail {

/// Mesh settings: the given bounds, or `derived` (data range ± margin) for missing ones.
MeshSettings mesh_settings(const spec::MeshSpec& mesh, std::pair<double, double> derived);

/// Whether the model file needs data-derived mesh bounds.
inline bool needs_derived_bounds(const spec::MeshSpec& mesh) {
    return !mesh.lower || !mesh.upper;
}

/// The kernel layout: microsites, juvenile classes (first-year class when the census flags
/// seedlings and the juvenile rule is "seedling"), year levels. Throws SpecError (key
/// perturbation.juvenile) when the rule is "seedling" but the census has no seedling flag
/// and the file asks for a perturbation.
KernelLayout kernel_layout(const spec::ModelSpec& model, std::vector<std::string> year_levels);

/// A scenario of the model file as chain modifiers and establishment factors.
ScenarioSettings scenario_settings(const spec::ScenarioSpec& scenario,
                                   const spec::MicrositeSpec& microsites);

/// The assumptions every pipeline output states (docs/methods/pipeline.md).
std::vector<std::string> pipeline_assumptions(const spec::ModelSpec& model);

}  // namespace safesite::pipeline::detail
