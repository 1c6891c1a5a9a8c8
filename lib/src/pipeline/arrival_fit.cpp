#include "safesite/pipeline/arrival_fit.hpp"

#include <algorithm>
#include <cmath>
#include <set>
#include <utility>

#include "safesite/arrival/trapping_model.hpp"
#include "safesite/error.hpp"
#include "safesite/stats/formula.hpp"

namespace safesite::pipeline {

namespace {

SourceLocation arrival_key(const spec::ModelSpec& model, const std::string& key) {
    return {model.file.string(), model.arrival.at.line, 0, "arrival." + key};
}

// Distinct values of a member over a range, sorted.
template <class Rows, class Get>
std::vector<std::string> distinct(const Rows& rows, Get get) {
    std::set<std::string> s;
    for (const auto& r : rows) s.insert(get(r));
    return {s.begin(), s.end()};
}

// Run a fit; a formula that does not fit the experiment's columns becomes a located model-file
// error on the formula key.
template <class Fit>
arrival::BinomialFit fit_formula(const spec::ModelSpec& model, const std::string& key, Fit fit) {
    try {
        return fit();
    } catch (const stats::FormulaError& e) {
        throw SpecError(arrival_key(model, key), e.reason());
    }
}

void require_seed_type(const spec::ModelSpec& model, const std::vector<std::string>& types,
                       const std::string& experiment, const std::string& file) {
    if (std::find(types.begin(), types.end(), model.arrival.seed_type) != types.end()) return;
    std::string list;
    for (const auto& t : types) list += (list.empty() ? "\"" : ", \"") + t + "\"";
    throw SpecError(arrival_key(model, "seed_type"),
                    "the focal seed type \"" + model.arrival.seed_type + "\" has no " +
                        experiment + " in " + file + "; the seed types there are " + list);
}

}  // namespace

ArrivalFit fit_arrival(const spec::ModelSpec& model, const arrival::TrappingData& trapping,
                       const arrival::RetentionData& retention,
                       const ArrivalCensusInputs& census) {
    const spec::ArrivalSpec& spec = model.arrival;
    if (spec.method != spec::ArrivalMethod::experiments)
        throw UsageError("fit_arrival: [arrival] method is not \"experiments\"");
    const std::vector<std::string>& sites = model.microsites.labels;
    const std::size_t bare = model.microsites.bare_index;
    std::vector<std::string> forms;
    for (std::size_t m = 0; m < sites.size(); ++m)
        if (m != bare) forms.push_back(sites[m]);

    ArrivalFit out;
    out.seed_type = spec.seed_type;
    out.cover_from_census = spec.cover_from_census;

    // Trapping: the model, then τ per form × seed type over the neighbours' sizes.
    out.trials = trapping.trials.size();
    if (out.trials == 0) throw DataError({trapping.file, 0, 0, ""}, "no trapping trials");
    std::map<std::string, std::vector<double>> trial_sizes;  // one size per trial neighbour
    {
        std::set<std::string> seen;
        for (const auto& t : trapping.trials)
            if (seen.insert(t.neighbour).second) trial_sizes[t.form].push_back(t.neighbour_size);
        out.neighbours = seen.size();
    }
    for (const auto& f : forms)
        if (trial_sizes[f].empty())
            throw DataError({trapping.file, 0, 0, "form"},
                            "no trapping trials with a neighbour of form \"" + f +
                                "\"; every neighbour microsite needs trials to estimate its "
                                "trapping probability");
    const std::vector<std::string> trap_types =
        distinct(trapping.trials, [](const arrival::TrappingTrial& t) { return t.seed_type; });
    require_seed_type(model, trap_types, "trapping trials", trapping.file);
    out.trapping = fit_formula(model, "trapping_formula", [&] {
        return arrival::fit_trapping(arrival::trapping_table(trapping.trials, forms),
                                     spec.trapping_formula, spec.trapping_groups);
    });
    std::map<std::string, std::vector<double>> sizes;
    std::map<std::string, NeighbourSizeSource> source;
    for (const auto& f : forms) {
        const auto it = census.neighbour_sizes.find(f);
        const bool from_census = it != census.neighbour_sizes.end() && !it->second.empty();
        sizes[f] = from_census ? it->second : trial_sizes[f];
        source[f] = from_census ? NeighbourSizeSource::census : NeighbourSizeSource::trials;
    }
    std::map<std::string, double> tau_focal;
    for (const auto& type : trap_types) {
        std::map<std::string, double> by_form;
        try {
            by_form = arrival::trapping_by_form(out.trapping, type, sizes);
        } catch (const stats::FormulaError& e) {
            throw SpecError(arrival_key(model, "trapping_formula"),
                            e.reason() + " (τ is predicted from neighbour_size, form and "
                                         "seed_type only)");
        }
        for (const auto& f : forms)
            out.trapping_by_form.push_back(
                {f, type, by_form.at(f), sizes[f].size(), source[f]});
        if (type == spec.seed_type) tau_focal = by_form;
    }

    // Retention: intervals, the grouped-time hazard model, h per microsite × seed type.
    out.seeds = distinct(retention.checks, [](const arrival::RetentionCheck& c) {
                    return c.seed;
                }).size();
    const std::vector<arrival::RetentionInterval> intervals =
        arrival::retention_intervals(retention.checks);
    out.intervals = intervals.size();
    if (out.intervals == 0)
        throw DataError({retention.file, 0, 0, ""},
                        "no retention intervals (every seed needs a check after day 0)");
    for (const auto& c : retention.checks) out.last_check_day = std::max(out.last_check_day, c.day);
    for (const auto& m : sites) {
        const bool any = std::any_of(intervals.begin(), intervals.end(),
                                     [&](const arrival::RetentionInterval& i) {
                                         return i.microsite == m;
                                     });
        if (!any)
            throw DataError({retention.file, 0, 0, "microsite"},
                            "no retention checks in microsite \"" + m +
                                "\"; every microsite needs seeds to estimate its departure "
                                "hazard");
    }
    const std::vector<std::string> ret_types =
        distinct(retention.checks, [](const arrival::RetentionCheck& c) { return c.seed_type; });
    require_seed_type(model, ret_types, "retention checks", retention.file);
    out.retention = fit_formula(model, "retention_formula", [&] {
        return arrival::fit_retention(arrival::interval_table(intervals, sites),
                                      spec.retention_formula, spec.retention_groups);
    });
    try {
        out.hazards = arrival::hazard_table(out.retention, sites, ret_types);
    } catch (const stats::FormulaError& e) {
        throw SpecError(arrival_key(model, "retention_formula"),
                        e.reason() + " (hazards are predicted from microsite, seed_type and "
                                     "interval_days only)");
    }
    std::map<std::string, double> hazard_focal;
    for (const auto& h : out.hazards)
        if (h.seed_type == spec.seed_type) hazard_focal[h.microsite] = h.hazard_per_day;

    // Cover, then the chain.
    std::map<std::string, double> cover;
    if (spec.cover_from_census) {
        if (!census.cover)
            throw SpecError(arrival_key(model, "cover"),
                            "cover = \"census\" needs the census ([data] census)");
        for (std::size_t m = 0; m < sites.size(); ++m)
            if (m != bare) cover[sites[m]] = (*census.cover)[static_cast<Eigen::Index>(m)];
    } else {
        cover = spec.cover;
    }
    out.chain = arrival::make_chain_parameters(sites, sites[bare], cover, tau_focal, hazard_focal,
                                               spec.relanding, spec.exposure_days);
    out.result = arrival::arrival_fractions(out.chain);

    auto note = [&](const std::string& what, const arrival::BinomialFit& fit) {
        if (!fit.converged) out.warnings.push_back(what + " model: the fit did not converge");
        for (const auto& w : fit.warnings) out.warnings.push_back(what + " model: " + w);
    };
    note("trapping", out.trapping);
    note("retention", out.retention);
    return out;
}

ExperimentData read_experiments(const spec::ModelSpec& model) {
    if (!model.data.trapping || !model.data.retention)
        throw SpecError({model.file.string(), model.arrival.at.line, 0, "data.trapping"},
                        "arrival.method = \"experiments\" needs data.trapping and "
                        "data.retention");
    std::vector<std::string> forms;
    for (std::size_t m = 0; m < model.microsites.labels.size(); ++m)
        if (m != model.microsites.bare_index) forms.push_back(model.microsites.labels[m]);
    return {arrival::read_trapping(*model.data.trapping, forms, model.data.trapping_columns),
            arrival::read_retention(*model.data.retention, model.microsites.labels,
                                    model.data.retention_columns)};
}

ArrivalFit fit_arrival(const spec::ModelSpec& model, const ArrivalCensusInputs& census) {
    const ExperimentData data = read_experiments(model);
    return fit_arrival(model, data.trapping, data.retention, census);
}

std::vector<report::TidyTable> arrival_fit_tables(const ArrivalFit& fit) {
    using report::number;
    using report::text;
    auto focal = [&](const std::string& type) {
        return report::integer(type == fit.seed_type ? 1 : 0);
    };
    report::TidyTable trapping{
        "trapping", {"form", "seed_type", "trapping", "neighbour_sizes", "size_source", "focal"},
        {}};
    for (const auto& t : fit.trapping_by_form)
        trapping.rows.push_back(
            {text(t.form), text(t.seed_type), number(t.trapping),
             report::integer(static_cast<std::int64_t>(t.sizes)),
             text(t.source == NeighbourSizeSource::census ? "census" : "trials"),
             focal(t.seed_type)});

    report::TidyTable hazards{"hazards",
                              {"microsite", "seed_type", "hazard_per_day", "lower", "upper",
                               "mean_residence_days", "focal"},
                              {}};
    report::TidyTable curve{"retention_curve", {"microsite", "seed_type", "day", "retained"}, {}};
    const int last_day =
        static_cast<int>(std::ceil(std::max(fit.last_check_day, fit.chain.exposure_days)));
    Eigen::VectorXd days(last_day + 1);
    for (int d = 0; d <= last_day; ++d) days[d] = d;
    for (const auto& h : fit.hazards) {
        hazards.rows.push_back({text(h.microsite), text(h.seed_type), number(h.hazard_per_day),
                                number(h.lower), number(h.upper),
                                h.hazard_per_day > 0.0 ? number(1.0 / h.hazard_per_day)
                                                       : report::missing(),
                                focal(h.seed_type)});
        const Eigen::VectorXd r = arrival::retention_curve(h.hazard_per_day, days);
        for (int d = 0; d <= last_day; ++d)
            curve.rows.push_back({text(h.microsite), text(h.seed_type), report::integer(d),
                                  number(r[d])});
    }

    report::TidyTable chain{"arrival_chain",
                            {"microsite", "cover", "trapping", "hazard_per_day", "landing",
                             "fraction"},
                            {}};
    const auto& c = fit.chain;
    for (std::size_t m = 0; m < c.microsites.size(); ++m) {
        const auto i = static_cast<Eigen::Index>(m);
        const bool is_bare = m == c.bare;
        double bare_ground = 1.0;
        for (Eigen::Index f = 0; f < c.cover.size(); ++f)
            if (f != static_cast<Eigen::Index>(c.bare)) bare_ground -= c.cover[f];
        chain.rows.push_back({text(c.microsites[m]),
                              number(is_bare ? bare_ground : c.cover[i]),
                              is_bare ? report::missing() : number(c.trapping[i]),
                              number(c.hazard_per_day[i]), number(fit.result.landing[i]),
                              number(fit.result.fractions[i])});
    }
    chain.rows.push_back({text("lost"), report::missing(), report::missing(), report::missing(),
                          number(0.0), number(fit.result.lost)});
    return {trapping, hazards, curve, chain};
}

}  // namespace safesite::pipeline
