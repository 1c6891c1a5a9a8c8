#include "safesite/pipeline/fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <set>
#include <string>

#include "core/number_text.hpp"
#include "pipeline/detail/rate_fit.hpp"
#include "pipeline/detail/spec_settings.hpp"
#include "safesite/census/transition_data.hpp"
#include "safesite/error.hpp"
#include "safesite/pipeline/arrival_fit.hpp"
#include "safesite/pipeline/check.hpp"
#include "safesite/spec/mesh_memory.hpp"
#include "safesite/pipeline/data_rules.hpp"
#include "safesite/pipeline/fixed_model.hpp"
#include "safesite/pipeline/tables.hpp"
#include "safesite/stats/family.hpp"

namespace safesite::pipeline {

namespace {

// Rows of a table where a numeric 0/1 column equals 1.
stats::Table rows_where_one(const stats::Table& t, const std::string& column) {
    std::vector<std::size_t> rows;
    const auto& x = t.numeric(column);
    for (std::size_t i = 0; i < x.size(); ++i)
        if (x[i] == 1.0) rows.push_back(i);
    return t.select_rows(rows);
}

// The flowering plants alive in census year `label` whose seeds were not counted (rows of the
// census `plants` table): what the seed model of that year's kernel predicts for.
stats::Table uncounted_flowering(const stats::Table& plants, const std::string& label) {
    std::vector<std::size_t> rows;
    const auto& year = plants.categorical("year").values;
    const auto& flowered = plants.numeric("flowered");
    const auto& seeds = plants.numeric("seeds");
    for (std::size_t i = 0; i < plants.rows(); ++i)
        if (year[i] == label && flowered[i] == 1.0 && std::isnan(seeds[i])) rows.push_back(i);
    return plants.select_rows(rows);
}

Eigen::VectorXd given_arrival(const spec::ModelSpec& model) {
    const auto n = static_cast<Eigen::Index>(model.microsites.labels.size());
    if (static_cast<Eigen::Index>(model.arrival.fractions.size()) != n)
        throw SpecError({model.file.string(), model.arrival.at.line, 0, "arrival.fractions"},
                        "arrival fractions must be given for every microsite");
    return Eigen::Map<const Eigen::VectorXd>(model.arrival.fractions.data(), n);
}

// Two-sided normal p-value of a Wald z: erfc(|z| / √2).
double wald_p(double z) {
    return std::isfinite(z) ? std::erfc(std::abs(z) / std::sqrt(2.0)) : CoefficientRow::nan;
}

// The trapping and retention regressions as rate summaries and coefficient rows.
void add_arrival_rows(const ArrivalFit& a, FitResult& out) {
    const std::pair<const char*, const arrival::BinomialFit*> fits[] = {
        {"trapping", &a.trapping}, {"retention", &a.retention}};
    for (const auto& [name, fit] : fits) {
        out.rates.push_back({name, "binomial", stats::to_string(fit->link), fit->formula, "none",
                             false,
                             static_cast<std::size_t>(fit->nobs)});
        for (std::size_t j = 0; j < fit->names.size(); ++j) {
            CoefficientRow r{name, "all", "none", "fitted", fit->names[j]};
            const auto i = static_cast<Eigen::Index>(j);
            r.estimate = fit->coefficients[i];
            r.std_error = fit->standard_errors[i];
            r.statistic = r.estimate / r.std_error;
            r.p_value = wald_p(r.statistic);
            out.coefficients.push_back(r);
        }
        for (std::size_t g = 0; g < fit->groups.size(); ++g) {
            CoefficientRow r{name, "all", "none", "fitted", "sd(" + fit->groups[g] + ")"};
            r.estimate = fit->group_sd[g];
            // The SD's own standard error (empty when not available: a boundary fit).
            if (g < fit->group_sd_se.size()) r.std_error = fit->group_sd_se[g];
            out.coefficients.push_back(r);
        }
    }
}

// The range of the parent sizes seen in the census (sizes at t of the transitions).
void observed_range(const census::TransitionData& td, MeshSettings& mesh) {
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    for (double x : td.transitions.numeric("size"))
        if (std::isfinite(x)) {
            lo = std::min(lo, x);
            hi = std::max(hi, x);
        }
    if (std::isfinite(lo)) {
        mesh.observed_lower = lo;
        mesh.observed_upper = hi;
    }
}

// No observed size (at t, at t + 1, of a recruit) may lie outside a mesh bound the model file
// gives: such plants would be moved to the mesh edge or lost (docs/errors.md, "sizes outside
// the mesh"). Derived bounds always hold every observed size. Checked before any fitting.
void check_sizes_inside(const spec::ModelSpec& model, const census::TransitionData& td) {
    if (model.mesh.allow_sizes_outside) return;
    const double lower = model.mesh.lower.value_or(-std::numeric_limits<double>::infinity());
    const double upper = model.mesh.upper.value_or(std::numeric_limits<double>::infinity());
    struct Side {
        bool upper;
        std::size_t records = 0;
        std::set<std::string> plants;
        double extreme = 0.0;
    };
    Side below{false, 0, {}, std::numeric_limits<double>::infinity()};
    Side above{true, 0, {}, -std::numeric_limits<double>::infinity()};
    auto scan = [&](const stats::Table& t, const char* column) {
        if (t.rows() == 0) return;
        const auto& x = t.numeric(column);
        const std::vector<std::string>* plant =
            t.has("plant") ? &t.categorical("plant").values : nullptr;
        for (std::size_t i = 0; i < x.size(); ++i) {
            if (!std::isfinite(x[i])) continue;
            Side* side = x[i] < lower ? &below : x[i] > upper ? &above : nullptr;
            if (!side) continue;
            ++side->records;
            side->plants.insert(plant ? (*plant)[i] : std::string(column) + std::to_string(i));
            side->extreme = side->upper ? std::max(side->extreme, x[i])
                                        : std::min(side->extreme, x[i]);
        }
    };
    scan(td.transitions, "size");
    scan(td.transitions, "size_next");
    scan(td.recruits, "size");
    for (const Side* side : {&above, &below}) {
        if (side->records == 0) continue;
        const auto t = model.size_transform;
        const double bound = side->upper ? upper : lower;
        auto data_scale = [&](double z) { return core::number_text(census::invert(t, z), 6); };
        const std::string key = side->upper ? "mesh.upper" : "mesh.lower";
        SourceLocation at = side->upper ? model.mesh.upper_at : model.mesh.lower_at;
        at.file = model.file.string();
        at.key = key;
        throw SpecError(
            at, "'" + key + "' = " + core::number_text(bound, 6) + " leaves out observed sizes: " +
                    std::to_string(side->records) + " size record(s) of " +
                    std::to_string(side->plants.size()) + " plant(s) lie " +
                    (side->upper ? "above" : "below") + " it (the most extreme " +
                    core::number_text(side->extreme, 6) + " on the kernel scale, " +
                    data_scale(side->extreme) + " on the scale of the data); " +
                    (side->upper ? "raise" : "lower") + " '" + key + "' beyond " +
                    core::number_text(side->extreme, 6) +
                    ", leave it out to derive it from the data, or set [mesh] "
                    "allow_sizes_outside = true to keep the mesh");
    }
}

}  // namespace

FitResult fit_given(const spec::ModelSpec& model) {
    FitResult out;
    FixedModelOptions options;
    if (model.arrival.method == spec::ArrivalMethod::experiments) {
        // No census: cover must be given, τ is averaged over the trial neighbours' sizes.
        out.arrival = fit_arrival(model, ArrivalCensusInputs{});
        for (const auto& w : out.arrival->warnings) out.warnings.push_back(w);
        options.chain = out.arrival->chain;
    }
    out.model = prepare_fixed(model, options);
    out.model.warnings = out.warnings;
    for (const auto& name : spec::rate_names()) {
        const auto& rate = model.rate(name);
        out.rates.push_back({name, rate.family, rate.link, rate.formula,
                             spec::to_string(rate.year), true, 0});
        const auto rows = detail::given_rows(rate);
        out.coefficients.insert(out.coefficients.end(), rows.begin(), rows.end());
    }
    if (out.arrival) add_arrival_rows(*out.arrival, out);
    out.establishment_given = true;
    return out;
}

FitResult fit(const spec::ModelSpec& model) {
    if (!model.data.census) {
        if (!model.all_rates_fixed())
            throw SpecError({model.file.string(), 0, 0, "data.census"},
                            "fitting needs a census ([data] census), or fixed coefficients for "
                            "every rate");
        return fit_given(model);
    }
    const census::Census c = census::load_census(*model.data.census, spec::to_census_options(model));
    if (model.arrival.method == spec::ArrivalMethod::experiments) {
        // Read the experiments first, so that a bad file or formula stops before any fitting.
        const ExperimentData e = read_experiments(model);
        return fit(model, c, &e);
    }
    return fit(model, c);
}

FitResult fit(const spec::ModelSpec& model, const census::Census& c,
              const ExperimentData* experiments) {
    FitResult out;
    for (const auto& issue : c.report().issues())
        if (issue.severity == census::Severity::warning)
            out.warnings.push_back("census: " + issue.message + " (" +
                                   std::to_string(issue.count) + ")");
    const census::TransitionData td = census::build_transitions(c);
    resolve_formulas(model, td);  // every column and level, before any fitting
    if (experiments)
        resolve_arrival_formulas(model, experiments->trapping, experiments->retention);
    spec::require_mesh_memory(model, td.transitions.categorical("year").levels.size() + 1);
    if (td.transitions.rows() == 0)
        throw DataError({c.file(), 0, 0, "year"},
                        "the census has no transitions between consecutive census years");
    check_sizes_inside(model, td);
    const std::vector<std::string> years = td.transitions.categorical("year").levels;
    const KernelLayout layout = detail::kernel_layout(model, years);

    // Every rate on its rows.
    std::vector<detail::RateOutcome> outcomes;
    for (const auto& name : spec::rate_names()) {
        const spec::RateSpec& rate = model.rate(name);
        stats::Table data;
        if (name == "growth")
            data = rows_where_one(td.transitions, "survived");
        else if (name == "seeds")
            data = rows_where_one(td.plants, "flowered");
        else if (name == "flowering")
            data = td.plants;
        else if (name == "recruit_size")
            data = td.recruits;
        else
            data = td.transitions;
        if (!rate.is_fixed() && data.rows() == 0)
            throw DataError({c.file(), 0, 0, name},
                            "no census rows to fit the " + name + " model on");
        outcomes.push_back(detail::fit_rate(rate, data, layout));
        auto& o = outcomes.back();
        out.rates.push_back(o.summary);
        out.coefficients.insert(out.coefficients.end(), o.coefficients.begin(),
                                o.coefficients.end());
        out.comparison.insert(out.comparison.end(), o.comparison.begin(), o.comparison.end());
        out.warnings.insert(out.warnings.end(), o.warnings.begin(), o.warnings.end());
    }
    auto kernel_rates = [&](const std::string& label, bool pooled) {
        KernelRates r;
        r.label = label;
        BoundRate* slots[] = {&r.survival, &r.growth, &r.flowering, &r.seeds, &r.recruit_size};
        for (std::size_t k = 0; k < outcomes.size(); ++k)
            *slots[k] = pooled ? outcomes[k].pooled : outcomes[k].for_year(label);
        return r;
    };

    PreparedModel& m = out.model;
    m.layout = layout;
    m.bare = model.microsites.bare_index;
    for (const auto& y : years) m.years.push_back(kernel_rates(y, false));
    m.pooled = kernel_rates("pooled", true);

    const auto derived = detail::needs_derived_bounds(model.mesh)
                             ? derive_mesh_bounds(td.transitions, td.recruits, model.mesh.margin)
                             : std::pair<double, double>{0.0, 0.0};
    m.mesh = detail::mesh_settings(model.mesh, derived);
    m.mesh.size_transform = model.size_transform;
    observed_range(td, m.mesh);

    // Arrival fractions.
    if (model.arrival.method == spec::ArrivalMethod::fractions) {
        m.arrival = given_arrival(model);
        m.arrival_source = ArrivalSource::given;
    } else {
        ArrivalCensusInputs inputs;
        if (model.arrival.cover_from_census)
            inputs.cover = census_cover(td.transitions, layout.microsites, m.bare);
        inputs.neighbour_sizes = c.neighbour_sizes_by_microsite();
        out.arrival = experiments ? fit_arrival(model, experiments->trapping,
                                                experiments->retention, inputs)
                                  : fit_arrival(model, inputs);
        add_arrival_rows(*out.arrival, out);
        for (const auto& w : out.arrival->warnings) out.warnings.push_back(w);
        m.arrival = out.arrival->result.fractions;
        m.chain = out.arrival->chain;
        m.arrival_source = ArrivalSource::experiments;
    }

    // Establishment.
    const auto n_sites = static_cast<Eigen::Index>(layout.microsites.size());
    if (model.establishment.method == spec::EstablishmentMethod::fixed) {
        out.establishment_given = true;
        m.establishment_pooled =
            Eigen::Map<const Eigen::VectorXd>(model.establishment.values.data(), n_sites);
        m.establishment_by_year.assign(years.size(), m.establishment_pooled);
    } else {
        std::vector<SeedsAndRecruits> data;
        for (const auto& y : c.summary().per_year) {
            const std::string label = std::to_string(y.year);
            const auto it = std::find(years.begin(), years.end(), label);
            if (it == years.end()) continue;
            SeedsAndRecruits s;
            s.year = label;
            s.seeds_counted = static_cast<double>(y.seeds_counted);
            if (y.flowering_without_count > 0) {
                // Flowering plants without a count: the seed model of that year's kernel.
                const stats::Table t = uncounted_flowering(td.plants, label);
                const auto k = static_cast<std::size_t>(it - years.begin());
                s.seeds_predicted = m.years[k].seeds.mean(t).sum();
            }
            for (std::size_t r : y.recruits_by_microsite) s.recruits.push_back(static_cast<double>(r));
            data.push_back(std::move(s));
        }
        out.establishment = estimate_establishment(data, layout.microsites, m.arrival);
        for (const auto& w : out.establishment.warnings) out.warnings.push_back(w);
        m.establishment_pooled = out.establishment.pooled;
        for (const auto& y : years) m.establishment_by_year.push_back(out.establishment.for_year(y));
    }

    m.survival_changes = model.perturbation.survival_changes;
    m.stochastic_seed = model.uncertainty.seed;
    for (const auto& s : model.scenarios)
        m.scenarios.push_back(detail::scenario_settings(s, model.microsites));
    m.assumptions = detail::pipeline_assumptions(model);
    m.warnings = out.warnings;
    return out;
}

std::vector<report::TidyTable> fit_tables(const FitResult& result) {
    auto num = [](double x) { return std::isnan(x) ? report::missing() : report::number(x); };
    report::TidyTable coef{"coefficients",
                           {"rate", "model", "year_handling", "source", "term", "estimate",
                            "std_error", "statistic", "p_value"},
                           {}};
    for (const auto& r : result.coefficients)
        coef.rows.push_back({report::text(r.rate), report::text(r.model),
                             report::text(r.year_handling), report::text(r.source),
                             report::text(r.term), num(r.estimate), num(r.std_error),
                             num(r.statistic), num(r.p_value)});
    report::TidyTable cmp{"model_comparison",
                          {"rate", "model", "formula", "aic", "delta_aic", "weight", "chosen",
                           "parameters", "log_likelihood"},
                          {}};
    for (const auto& r : result.comparison)
        cmp.rows.push_back({report::text(r.rate), report::text(r.model), report::text(r.formula),
                            num(r.aic), num(r.delta_aic), num(r.weight),
                            report::integer(r.chosen ? 1 : 0), report::integer(r.parameters),
                            num(r.log_likelihood)});
    std::vector<report::TidyTable> out{coef, cmp};
    if (!result.establishment_given) {
        out.push_back(establishment_table(result.establishment));
    } else {
        // Given values: one pooled row per microsite, source "given".
        report::TidyTable est = establishment_table(EstablishmentEstimate{});
        const auto& layout = result.model.layout;
        for (std::size_t m = 0; m < layout.microsites.size(); ++m) {
            const auto mi = static_cast<Eigen::Index>(m);
            const double a = mi < result.model.arrival.size() ? result.model.arrival[mi] : NAN;
            est.rows.push_back({report::text("pooled"), report::text(layout.microsites[m]),
                                report::missing(), num(a), report::missing(),
                                num(result.model.establishment_pooled[mi]),
                                report::text("given")});
        }
        out.push_back(est);
    }
    if (result.arrival)
        for (auto& t : arrival_fit_tables(*result.arrival)) out.push_back(std::move(t));
    return out;
}

}  // namespace safesite::pipeline
