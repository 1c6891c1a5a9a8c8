#include "pipeline/detail/spec_settings.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "safesite/error.hpp"

namespace safesite::pipeline::detail {

MeshSettings mesh_settings(const spec::MeshSpec& mesh, std::pair<double, double> derived) {
    MeshSettings out;
    out.lower = mesh.lower ? *mesh.lower : derived.first;
    out.upper = mesh.upper ? *mesh.upper : derived.second;
    out.points = mesh.points;
    out.eviction_warning = mesh.eviction_warning;
    out.rule = mesh.rule == spec::QuadratureRule::midpoint ? kernel::QuadratureRule::midpoint
                                                           : kernel::QuadratureRule::gauss_legendre;
    out.eviction = mesh.eviction == spec::EvictionPolicy::boundary
                       ? kernel::EvictionPolicy::boundary
                       : kernel::EvictionPolicy::discard;
    if (!(out.lower < out.upper))
        throw SpecError({"", 0, 0, "mesh.lower"},
                        "mesh lower bound " + std::to_string(out.lower) +
                            " is not below the upper bound " + std::to_string(out.upper));
    return out;
}

KernelLayout kernel_layout(const spec::ModelSpec& model, std::vector<std::string> year_levels) {
    KernelLayout layout;
    layout.microsites = model.microsites.labels;
    layout.year_levels = std::move(year_levels);
    layout.juvenile_size_below = std::numeric_limits<double>::quiet_NaN();
    const auto& p = model.perturbation;
    const bool asked = std::find(model.keys.begin(), model.keys.end(),
                                 "perturbation.juvenile") != model.keys.end();
    if (p.juvenile == spec::JuvenileRule::seedling) {
        if (model.census.seedling_flag) {
            layout.juvenile = JuvenileMode::seedling_class;
        } else if (asked) {
            throw SpecError({model.file.string(), 0, 0, "perturbation.juvenile"},
                            "juvenile = \"seedling\" needs a census that flags seedlings "
                            "([census] seedling_flag = true); use juvenile = \"size\" with "
                            "juvenile_size_below");
        } else {
            layout.juvenile = JuvenileMode::size_threshold;
        }
    } else {
        layout.juvenile = JuvenileMode::size_threshold;
        if (p.juvenile_size_below) layout.juvenile_size_below = *p.juvenile_size_below;
    }
    return layout;
}

ScenarioSettings scenario_settings(const spec::ScenarioSpec& scenario,
                                   const spec::MicrositeSpec& microsites) {
    ScenarioSettings out;
    out.name = scenario.name;
    if (scenario.fractions) {
        for (std::size_t m = 0; m < microsites.labels.size(); ++m)
            out.arrival.fractions[microsites.labels[m]] = scenario.fractions->at(m);
    }
    out.arrival.fraction_shares = scenario.fraction_shares;
    out.arrival.cover_factor = scenario.cover_factor;
    out.arrival.trapping_odds_factor = scenario.trapping_odds_factor;
    out.arrival.hazard_factor = scenario.hazard_factor;
    out.arrival.exposure_days = scenario.exposure_days;
    out.arrival.relanding = scenario.relanding;
    out.establishment_factor = scenario.establishment_factor;
    return out;
}

std::vector<std::string> pipeline_assumptions(const spec::ModelSpec& model) {
    std::vector<std::string> out{
        "Pre-breeding census: seeds produced in census year t give recruits seen at census "
        "t+1; a plant's seed output does not depend on its survival to t+1.",
        "Plants never change microsite; recruits stay in the microsite their seed arrived in.",
        "Consecutive census years only: transitions across a gap in the census are not used.",
        "Kernels describe population-level rates: random plot or plant effects are left out "
        "of every kernel; the pooled kernel is the pooled regression (year none or fixed) or "
        "the fixed effects of the mixed model (year random), not an average of year kernels.",
    };
    if (model.establishment.method == spec::EstablishmentMethod::census)
        out.push_back(
            "Closed population for seeds: every recruit seen at t+1 comes from a seed produced "
            "in the stand at t (no seed immigration, no seed bank); establishment = recruits / "
            "(seeds produced × arrival fraction).");
    if (model.arrival.method == spec::ArrivalMethod::experiments)
        out.push_back(
            "Seed arrival from the experiments (focal seed type \"" + model.arrival.seed_type +
            "\"): daily departure hazards are constant over the exposure period and taken at a "
            "typical station; trapping is averaged over neighbour sizes; the arrival fractions "
            "enter the kernels at their point estimates.");
    if (model.arrival.method == spec::ArrivalMethod::experiments && model.arrival.cover_from_census)
        out.push_back(
            "Ground cover of each neighbour form is taken as the share of census plant records "
            "standing in it (cover = \"census\").");
    return out;
}

}  // namespace safesite::pipeline::detail
