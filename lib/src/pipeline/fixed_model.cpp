#include "safesite/pipeline/fixed_model.hpp"

#include <algorithm>
#include <array>

#include "pipeline/detail/bound_rates.hpp"
#include "pipeline/detail/rate_fit.hpp"
#include "pipeline/detail/spec_settings.hpp"
#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/error.hpp"
#include "safesite/stats/glm.hpp"
#include "safesite/stats/family.hpp"
#include "safesite/stats/formula.hpp"

namespace safesite::pipeline {

namespace {

SourceLocation key_at(const spec::RateSpec& rate, const std::string& key) {
    SourceLocation at = rate.at;
    at.key = "rates." + rate.name + "." + key;
    return at;
}

// A table with every column a vital-rate formula may read, to learn the design (factor
// levels) of a fixed regression: the kernel covariates plus the responses.
stats::Table level_template(const KernelLayout& layout) {
    Eigen::VectorXd sizes(3);
    sizes << 0.0, 1.0, 2.0;
    stats::Table t = covariate_table(layout, sizes, 0, false,
                                     layout.year_levels.empty() ? "pooled"
                                                                : layout.year_levels.front());
    t.add_numeric("size_next", {0.0, 1.0, 2.0});
    t.add_numeric("survived", {0.0, 1.0, 1.0});
    t.add_numeric("flowered", {0.0, 1.0, 1.0});
    t.add_numeric("seeds", {0.0, 1.0, 2.0});
    return t;
}

}  // namespace

namespace detail {

BoundRate fixed_rate(const spec::RateSpec& rate, const KernelLayout& layout,
                     double shift_of_year, const std::string& label) {
    const stats::Table templ = level_template(layout);
    if (!rate.is_fixed())
        throw SpecError(key_at(rate, "coefficients"),
                        "rate '" + rate.name + "' has no fixed coefficients");
    const auto family = stats::parse_family(rate.family);
    const auto link = stats::parse_link(rate.link);
    if (!family || !link)
        throw SpecError(key_at(rate, "family"), "unknown family or link for rate " + rate.name);
    stats::FixedExtras extras;
    extras.sigma = rate.sd;
    if (rate.spread_coefficients.size() == 2)
        extras.spread = std::array<double, 2>{rate.spread_coefficients[0],
                                              rate.spread_coefficients[1]};
    extras.theta = rate.theta;
    extras.spread_column = rate.spread.value_or("size");
    stats::GlmFit fit;
    try {
        fit = stats::fixed_glm(rate.formula, *rate.coefficients, *family, *link, templ, extras);
    } catch (const SpecError& e) {
        // Re-anchor the coefficient error at the rate's table in the model file.
        throw SpecError(key_at(rate, "coefficients"), e.reason());
    } catch (const UsageError& e) {
        throw SpecError(key_at(rate, *family == stats::Family::gaussian_spread
                                         ? "spread_coefficients"
                                         : (*family == stats::Family::negbin ? "theta" : "sd")),
                        e.what());
    }
    std::map<std::string, double> shift;
    if (shift_of_year != 0.0) shift[label] = shift_of_year;
    return detail::glm_rate(fit, std::move(shift));
}

}  // namespace detail

KernelRates fixed_kernel_rates(const spec::ModelSpec& model, const std::string& label,
                               const std::map<std::string, double>& shift_by_rate,
                               const std::vector<std::string>& year_levels) {
    const KernelLayout layout = detail::kernel_layout(model, year_levels);
    auto shift = [&](const char* rate) {
        const auto it = shift_by_rate.find(rate);
        return it == shift_by_rate.end() ? 0.0 : it->second;
    };
    auto bind = [&](const char* rate) {
        return detail::fixed_rate(model.rate(rate), layout, shift(rate), label);
    };
    KernelRates r;
    r.label = label;
    r.survival = bind("survival");
    r.growth = bind("growth");
    r.flowering = bind("flowering");
    r.seeds = bind("seeds");
    r.recruit_size = bind("recruit_size");
    return r;
}

PreparedModel prepare_fixed(const spec::ModelSpec& model, const FixedModelOptions& options) {
    PreparedModel out;
    out.layout = detail::kernel_layout(model, options.years);
    out.bare = model.microsites.bare_index;

    std::pair<double, double> bounds;
    if (options.mesh_bounds) {
        bounds = *options.mesh_bounds;
    } else if (model.mesh.lower && model.mesh.upper) {
        bounds = {*model.mesh.lower, *model.mesh.upper};
    } else {
        throw SpecError({model.file.string(), 0, 0, "mesh.lower"},
                        "a model without census data needs [mesh] lower and upper");
    }
    spec::MeshSpec mesh = model.mesh;
    mesh.lower = bounds.first;
    mesh.upper = bounds.second;
    out.mesh = detail::mesh_settings(mesh, bounds);
    out.mesh.size_transform = model.size_transform;

    for (const auto& year : options.years) {
        const auto shifts_of = [&](const std::string& y) {
            std::map<std::string, double> s;
            for (const auto& [rate, by_year] : options.shifts) {
                const auto it = by_year.find(y);
                if (it != by_year.end()) s[rate] = it->second;
            }
            return s;
        };
        out.years.push_back(fixed_kernel_rates(model, year, shifts_of(year), options.years));
    }
    out.pooled = fixed_kernel_rates(model, "pooled", {}, options.years);

    const auto n_sites = static_cast<Eigen::Index>(model.microsites.labels.size());
    if (model.arrival.method == spec::ArrivalMethod::experiments) {
        if (!options.chain)
            throw SpecError({model.file.string(), model.arrival.at.line, 0, "arrival.method"},
                            "arrival from the seed experiments needs their fit (or the true "
                            "chain of a simulation)");
        if (options.chain->microsites != model.microsites.labels)
            throw UsageError("prepare_fixed: the chain's microsites differ from the model's");
        out.chain = options.chain;
        out.arrival = arrival::arrival_fractions(*options.chain).fractions;
        out.arrival_source = ArrivalSource::experiments;
    } else {
        if (static_cast<Eigen::Index>(model.arrival.fractions.size()) != n_sites)
            throw SpecError({model.file.string(), model.arrival.at.line, 0, "arrival.fractions"},
                            "a model without data needs the arrival fractions given directly");
        out.arrival = Eigen::Map<const Eigen::VectorXd>(model.arrival.fractions.data(), n_sites);
        out.arrival_source = ArrivalSource::given;
    }

    if (model.establishment.method != spec::EstablishmentMethod::fixed ||
        static_cast<Eigen::Index>(model.establishment.values.size()) != n_sites)
        throw SpecError({model.file.string(), 0, 0, "establishment.method"},
                        "a model without census data needs [establishment] method = \"fixed\" "
                        "with values");
    out.establishment_pooled =
        Eigen::Map<const Eigen::VectorXd>(model.establishment.values.data(), n_sites);
    out.establishment_by_year.assign(options.years.size(), out.establishment_pooled);

    out.survival_changes = model.perturbation.survival_changes;
    out.stochastic_seed = model.uncertainty.seed;
    for (const auto& s : model.scenarios)
        out.scenarios.push_back(detail::scenario_settings(s, model.microsites));
    out.assumptions = detail::pipeline_assumptions(model);
    return out;
}

}  // namespace safesite::pipeline
