#include "safesite/pipeline/check.hpp"

#include <algorithm>
#include <cstdint>
#include <map>
#include <set>
#include <utility>
#include <numeric>

#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/formula.hpp"

namespace safesite::pipeline {

namespace {

/// One formula of the model file against the table its fit sees: the levels of ref() first
/// (with a hint), then every column and kind as the fit will learn them.
void resolve(const spec::FormulaSource& source, const std::string& text,
             const stats::Table& table) {
    stats::Formula f;
    try {
        f = stats::parse_formula(text, source.value.key);
        (void)stats::DesignSpec::learn_types(f, table);
    } catch (const stats::FormulaError& e) {
        // Levels of ref() first (with a hint), below; other problems as the fit would see them.
        bool level = false;
        for (const auto& term : f.terms)
            for (const auto& a : term.atoms)
                level = level || (a.kind == stats::Atom::Kind::reference &&
                                  a.level_position == e.column());
        if (!level) {
            std::string reason = e.reason();
            const std::string prefix =
                "formula '" + text + "', character " + std::to_string(e.column()) + ": ";
            if (reason.rfind(prefix, 0) == 0) reason = reason.substr(prefix.size());
            spec::formula_error(source, text, e.column(), reason);
        }
    }
    for (const auto& term : f.terms)
        for (const auto& a : term.atoms) {
            if (a.kind != stats::Atom::Kind::reference || !table.has(a.expr.name) ||
                !table.is_categorical(a.expr.name))
                continue;
            const auto& levels = table.categorical(a.expr.name).levels;
            if (std::find(levels.begin(), levels.end(), a.ref_level) != levels.end()) continue;
            spec::formula_error(source, text, a.level_position,
                                spec::level_message(a.ref_level, a.expr.name, levels,
                                                    " in the data"));
        }
}

}  // namespace

void resolve_formulas(const spec::ModelSpec& model, const census::TransitionData& data) {
    for (const auto& rate : model.rates) {
        if (rate.is_fixed()) continue;
        const stats::Table& table = rate.name == "survival" || rate.name == "growth"
                                        ? data.transitions
                                    : rate.name == "recruit_size" ? data.recruits
                                                                  : data.plants;
        // A model built in code has no source locations: name the file and the key at least.
        auto source = [&](const spec::FormulaSource* given, const std::string& key) {
            spec::FormulaSource s = given ? *given : spec::FormulaSource{};
            if (s.value.key.empty()) s.value = {model.file.string(), rate.at.line, 0, key};
            return s;
        };
        const std::string prefix = "rates." + rate.name + ".";
        resolve(source(&rate.formula_source, prefix + "formula"), rate.formula, table);
        for (std::size_t i = 0; i < rate.candidates.size(); ++i)
            resolve(source(i < rate.candidate_sources.size() ? &rate.candidate_sources[i]
                                                             : nullptr,
                           prefix + "candidates[" + std::to_string(i + 1) + "]"),
                    rate.candidates[i], table);
    }
}

void resolve_arrival_formulas(const spec::ModelSpec& model,
                              const arrival::TrappingData& trapping,
                              const arrival::RetentionData& retention) {
    const spec::ArrivalSpec& a = model.arrival;
    if (a.method != spec::ArrivalMethod::experiments) return;
    std::vector<std::string> forms;
    for (std::size_t m = 0; m < model.microsites.labels.size(); ++m)
        if (m != model.microsites.bare_index) forms.push_back(model.microsites.labels[m]);
    auto source = [&](spec::FormulaSource s, const std::string& key) {
        if (s.value.key.empty()) s.value = {model.file.string(), a.at.line, 0, key};
        return s;
    };
    resolve(source(a.trapping_formula_source, "arrival.trapping_formula"), a.trapping_formula,
            arrival::trapping_table(trapping.trials, forms));
    resolve(source(a.retention_formula_source, "arrival.retention_formula"), a.retention_formula,
            arrival::interval_table(arrival::retention_intervals(retention.checks),
                                    model.microsites.labels));
}

CheckResult check(const spec::ModelSpec& model) {
    if (!model.data.census)
        throw SpecError({model.file.string(), 0, 0, "data.census"},
                        "the model file names no census ([data] census)");
    const io::CsvTable csv = io::CsvTable::read(*model.data.census);
    const census::Census c = census::read_census(csv, spec::to_census_options(model));
    CheckResult out;
    out.census_file = model.data.census->string();
    out.microsites = model.microsites.labels;
    out.report = c.report();
    out.summary = c.summary();
    // Formulas against the census tables: only a census without errors has them.
    if (out.valid()) {
        const census::TransitionData td = census::build_transitions(c);
        resolve_formulas(model, td);
        const std::size_t kernels = td.transitions.categorical("year").levels.size() + 1;
        out.memory = spec::mesh_memory(model, kernels);
        spec::require_mesh_memory(model, kernels);
    }
    out.options = c.options();
    if (model.arrival.method == spec::ArrivalMethod::experiments && model.data.trapping &&
        model.data.retention) {
        std::vector<std::string> forms;
        for (std::size_t m = 0; m < model.microsites.labels.size(); ++m)
            if (m != model.microsites.bare_index) forms.push_back(model.microsites.labels[m]);
        out.trapping =
            arrival::read_trapping(*model.data.trapping, forms, model.data.trapping_columns);
        out.retention = arrival::read_retention(*model.data.retention, model.microsites.labels,
                                                model.data.retention_columns);
        resolve_arrival_formulas(model, *out.trapping, *out.retention);
    }
    return out;
}

std::vector<report::TidyTable> check_tables(const CheckResult& result) {
    using report::integer;
    using report::text;
    auto count = [](auto n) { return integer(static_cast<std::int64_t>(n)); };
    const auto& s = result.summary;

    report::TidyTable years{"census_years",
                            {"year", "next_censused", "alive", "flowering", "seeds_counted",
                             "flowering_without_count", "transitions", "excluded_notfound",
                             "recruits_next_year"},
                            {}};
    report::TidyTable sites{"census_microsites",
                            {"year", "microsite", "alive", "recruits_next_year"},
                            {}};
    for (const auto& y : s.per_year) {
        const std::size_t recruits = std::accumulate(y.recruits_by_microsite.begin(),
                                                     y.recruits_by_microsite.end(),
                                                     std::size_t{0});
        years.rows.push_back({count(y.year), count(y.next_censused ? 1 : 0), count(y.alive),
                              count(y.flowering), count(y.seeds_counted),
                              count(y.flowering_without_count), count(y.transitions),
                              count(y.excluded_notfound), count(recruits)});
        for (std::size_t m = 0; m < result.microsites.size(); ++m) {
            const auto alive = m < y.alive_by_microsite.size() ? y.alive_by_microsite[m] : 0;
            const auto rec = m < y.recruits_by_microsite.size() ? y.recruits_by_microsite[m] : 0;
            sites.rows.push_back({count(y.year), text(result.microsites[m]), count(alive),
                                  y.next_censused ? count(rec) : report::missing()});
        }
    }
    report::TidyTable gaps{"census_gaps", {"from_year", "to_year"}, {}};
    for (const auto& g : s.gaps) gaps.rows.push_back({count(g.from), count(g.to)});

    report::TidyTable problems{
        "problems",
        {"severity", "code", "message", "count", "line", "column", "key", "example"},
        {}};
    for (const auto& issue : result.report.issues()) {
        const std::string severity =
            issue.severity == census::Severity::error ? "error" : "warning";
        if (issue.examples.empty())
            problems.rows.push_back({text(severity), text(issue.code), text(issue.message),
                                     count(issue.count), report::missing(), report::missing(),
                                     text(""), text("")});
        for (const auto& ex : issue.examples)
            problems.rows.push_back(
                {text(severity), text(issue.code), text(issue.message), count(issue.count),
                 ex.line > 0 ? count(ex.line) : report::missing(),
                 ex.column > 0 ? count(ex.column) : report::missing(), text(ex.key),
                 text(ex.text)});
    }
    // What each [census] row policy did: rows changed (or, set to "error", rows refused).
    report::TidyTable policies{"census_policies", {"key", "value", "rows"}, {}};
    auto issue_count = [&](const char* code) {
        const auto* issue = result.report.find(code);
        return count(issue ? issue->count : 0);
    };
    const auto& o = result.options;
    policies.rows.push_back({text("census.missing_row"),
                             text(std::string(to_string(o.missing_row))),
                             issue_count("missing_row")});
    policies.rows.push_back(
        {text("census.alive_without_size"), text(std::string(to_string(o.alive_without_size))),
         o.alive_without_size == census::AliveWithoutSize::keep ? count(s.alive_without_size)
                                                                : issue_count("missing_size")});
    policies.rows.push_back(
        {text("census.alive_after_dead"), text(std::string(to_string(o.alive_after_dead))),
         o.alive_after_dead == census::AliveAfterDead::notfound
             ? count(s.dead_read_as_notfound)
             : issue_count("alive_after_dead")});
    std::vector<report::TidyTable> out{years, sites, gaps, problems, policies};
    if (result.trapping) {
        struct Counts {
            std::set<std::string> neighbours;
            std::int64_t trials = 0, launched = 0, trapped = 0;
        };
        std::map<std::pair<std::string, std::string>, Counts> by;
        for (const auto& t : result.trapping->trials) {
            Counts& c = by[{t.form, t.seed_type}];
            c.neighbours.insert(t.neighbour);
            c.trials += 1;
            c.launched += t.launched;
            c.trapped += t.trapped;
        }
        report::TidyTable t{"trapping_summary",
                            {"form", "seed_type", "neighbours", "trials", "launched", "trapped"},
                            {}};
        for (const auto& [key, c] : by)
            t.rows.push_back({text(key.first), text(key.second), count(c.neighbours.size()),
                              integer(c.trials), integer(c.launched), integer(c.trapped)});
        out.push_back(std::move(t));
    }
    if (result.retention) {
        struct Counts {
            std::set<std::string> stations, seeds, left;
            std::int64_t checks = 0;
            double last_day = 0.0;
        };
        std::map<std::pair<std::string, std::string>, Counts> by;
        for (const auto& c : result.retention->checks) {
            Counts& k = by[{c.microsite, c.seed_type}];
            k.stations.insert(c.station);
            k.seeds.insert(c.seed);
            if (!c.present) k.left.insert(c.seed);
            k.checks += 1;
            k.last_day = std::max(k.last_day, c.day);
        }
        report::TidyTable t{"retention_summary",
                            {"microsite", "seed_type", "stations", "seeds", "checks",
                             "seeds_left", "last_day"},
                            {}};
        for (const auto& [key, k] : by)
            t.rows.push_back({text(key.first), text(key.second), count(k.stations.size()),
                              count(k.seeds.size()), integer(k.checks), count(k.left.size()),
                              report::number(k.last_day)});
        out.push_back(std::move(t));
    }
    return out;
}

}  // namespace safesite::pipeline
