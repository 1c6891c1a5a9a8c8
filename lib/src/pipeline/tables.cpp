#include "safesite/pipeline/tables.hpp"

#include <cmath>
#include <string>

namespace safesite::pipeline {

namespace {

using report::Cell;
using report::TidyTable;

// A double cell, or an empty cell when the value was not computed (NaN).
Cell num(double x) { return std::isnan(x) ? report::missing() : report::number(x); }
Cell txt(const std::string& s) { return report::text(s); }

std::string stage_name(const KernelLayout& layout, std::size_t k) {
    return layout.juvenile == JuvenileMode::seedling_class && k >= layout.microsites.size()
               ? "first-year"
               : "established";
}

std::string class_label(const KernelLayout& layout, std::size_t k) {
    const std::string& site = layout.microsites[k % layout.microsites.size()];
    return stage_name(layout, k) == "first-year" ? site + " (first-year)" : site;
}

TidyTable lambda_table(const AnalysisResult& r) {
    TidyTable t{"lambda", {"kernel", "lambda", "r0", "generation_time", "mesh_points"}, {}};
    for (const auto& k : r.kernels)
        t.rows.push_back({txt(k.label), num(k.lambda), num(k.r0), num(k.generation_time),
                          report::integer(static_cast<std::int64_t>(k.points))});
    return t;
}

TidyTable perturbation_table(const AnalysisResult& r) {
    TidyTable t{"perturbation",
                {"kernel", "change", "survival_factor", "lambda", "delta_lambda"},
                {}};
    for (const auto& k : r.kernels)
        for (const auto& p : k.perturbation)
            t.rows.push_back({txt(k.label), num(p.change), num(1.0 + p.change), num(p.lambda),
                              num(p.lambda - k.lambda)});
    return t;
}

// Stable structure or reproductive value, one row per kernel × class × mesh node.
TidyTable structure_table(const AnalysisResult& r, bool reproductive) {
    TidyTable t;
    if (reproductive) {
        t = {"reproductive_value", {"kernel", "microsite", "stage", "size", "value"}, {}};
    } else {
        t = {"stable_structure",
             {"kernel", "microsite", "stage", "size", "density", "proportion"},
             {}};
    }
    const std::size_t n_sites = r.layout.microsites.size();
    for (const auto& k : r.kernels) {
        const auto n = k.nodes.size();
        const auto classes = n > 0 ? static_cast<std::size_t>(k.w.size() / n) : 0;
        for (std::size_t c = 0; c < classes; ++c) {
            for (Eigen::Index i = 0; i < n; ++i) {
                const Eigen::Index at = static_cast<Eigen::Index>(c) * n + i;
                std::vector<Cell> row{txt(k.label), txt(r.layout.microsites[c % n_sites]),
                                      txt(stage_name(r.layout, c)), num(k.nodes[i])};
                if (reproductive) {
                    row.push_back(num(k.v[at]));
                } else {
                    row.push_back(num(k.w[at]));
                    row.push_back(num(k.w[at] * k.weights[i]));
                }
                t.rows.push_back(std::move(row));
            }
        }
    }
    return t;
}

// Life-cycle measures of a recruit of each microsite, every kernel (docs/formats.md).
TidyTable life_at_birth_table(const AnalysisResult& r) {
    TidyTable t{"life_history_at_birth",
                {"kernel", "microsite", "life_expectancy", "flowering_probability",
                 "first_flowering_age", "seeds_mean", "seeds_variance"},
                {}};
    for (const auto& k : r.kernels) {
        if (!k.life_cycle) continue;
        for (const auto& b : k.life_cycle->at_birth)
            t.rows.push_back({txt(k.label), txt(b.microsite), num(b.life_expectancy),
                              num(b.flowering_probability), num(b.first_flowering_age),
                              num(b.seeds_mean), num(b.seeds_variance)});
    }
    return t;
}

// Life-cycle measures per microsite, stage and mesh node of the pooled kernel.
TidyTable life_by_size_table(const AnalysisResult& r) {
    TidyTable t{"life_history_by_size",
                {"kernel", "microsite", "stage", "size", "life_expectancy",
                 "flowering_probability", "first_flowering_age", "seeds_mean",
                 "seeds_variance"},
                {}};
    const KernelResult& k = r.pooled();
    if (!k.life_cycle) return t;
    const LifeCycleResult& c = *k.life_cycle;
    const Eigen::Index n = k.nodes.size();
    const std::size_t classes = n > 0 ? static_cast<std::size_t>(c.life_expectancy.size() / n) : 0;
    for (std::size_t cl = 0; cl < classes; ++cl)
        for (Eigen::Index i = 0; i < n; ++i) {
            const Eigen::Index at = static_cast<Eigen::Index>(cl) * n + i;
            t.rows.push_back({txt(k.label),
                              txt(r.layout.microsites[cl % r.layout.microsites.size()]),
                              txt(stage_name(r.layout, cl)), num(k.nodes[i]),
                              num(c.life_expectancy[at]), num(c.flowering_probability[at]),
                              num(c.first_flowering_age[at]), num(c.seeds_mean[at]),
                              num(c.seeds_variance[at])});
        }
    return t;
}

TidyTable arrival_table(const AnalysisResult& r) {
    TidyTable t{"arrival", {"scenario", "microsite", "fraction", "source"}, {}};
    const std::string source =
        r.arrival_source == ArrivalSource::given ? "given" : "experiments";
    const KernelResult& pooled = r.pooled();
    for (std::size_t m = 0; m < r.layout.microsites.size(); ++m)
        t.rows.push_back({txt("baseline"), txt(r.layout.microsites[m]),
                          num(pooled.arrival[static_cast<Eigen::Index>(m)]), txt(source)});
    for (const auto& s : r.scenarios)
        for (std::size_t m = 0; m < r.layout.microsites.size(); ++m)
            t.rows.push_back({txt(s.name), txt(r.layout.microsites[m]),
                              num(s.arrival[static_cast<Eigen::Index>(m)]), txt("scenario")});
    return t;
}

TidyTable scenario_table(const AnalysisResult& r) {
    TidyTable t{"scenarios", {"scenario", "kernel", "lambda", "delta_lambda", "lost"}, {}};
    for (const auto& s : r.scenarios) {
        t.rows.push_back(
            {txt(s.name), txt("pooled"), num(s.lambda_pooled), num(s.delta_pooled), num(s.lost)});
        for (std::size_t y = 0; y < s.lambda_years.size(); ++y)
            t.rows.push_back({txt(s.name), txt(r.kernels[y].label), num(s.lambda_years[y]),
                              num(s.delta_years[y]), num(s.lost)});
    }
    return t;
}

TidyTable sensitivity_table(const AnalysisResult& r) {
    TidyTable t{"sensitivities",
                {"kernel", "parameter", "target", "value", "sensitivity", "elasticity"},
                {}};
    for (const auto& s : r.sensitivities)
        t.rows.push_back({txt("pooled"), txt(s.parameter), txt(s.target), num(s.value),
                          num(s.sensitivity), num(s.elasticity)});
    // Juvenile survival for every census year (the pooled row is among the above).
    for (std::size_t y = 0; y + 1 < r.kernels.size(); ++y) {
        const auto& k = r.kernels[y];
        if (std::isnan(k.juvenile_sensitivity)) continue;
        t.rows.push_back({txt(k.label), txt("juvenile_survival"), txt(""), report::missing(),
                          num(k.juvenile_sensitivity), num(k.juvenile_elasticity)});
    }
    return t;
}

TidyTable break_even_table(const AnalysisResult& r) {
    TidyTable t{"break_even",
                {"form", "arrival_moved", "establishment_bare", "lambda_baseline",
                 "break_even_establishment", "status", "lambda_at_0", "lambda_at_1"},
                {}};
    for (const auto& b : r.break_even)
        t.rows.push_back({txt(b.form), num(b.arrival_form), num(b.establishment_bare),
                          num(b.lambda_baseline), num(b.solution.value),
                          txt(b.solution.status_name()), num(b.solution.lambda_lo),
                          num(b.solution.lambda_hi)});
    return t;
}

TidyTable diagnostics_table(const AnalysisResult& r) {
    TidyTable t{"diagnostics", {"kernel", "diagnostic", "target", "value", "message"}, {}};
    for (const auto& k : r.kernels) {
        if (!std::isnan(k.lambda_refined)) {
            t.rows.push_back({txt(k.label), txt("lambda_mesh_n"), txt(""), num(k.lambda),
                              txt(std::to_string(k.points) + " points")});
            t.rows.push_back({txt(k.label), txt("lambda_mesh_2n"), txt(""), num(k.lambda_refined),
                              txt(std::to_string(2 * k.points) + " points")});
            t.rows.push_back({txt(k.label), txt("mesh_relative_change"), txt(""),
                              num(std::abs(k.lambda_refined - k.lambda) / k.lambda), txt("")});
        }
        for (std::size_t c = 0; c < k.max_evicted_growth.size(); ++c)
            t.rows.push_back({txt(k.label), txt("max_evicted_growth"),
                              txt(class_label(r.layout, c)), num(k.max_evicted_growth[c]),
                              txt("largest growth mass off the mesh over parent sizes")});
        for (std::size_t m = 0; m < k.evicted_recruits.size(); ++m)
            t.rows.push_back({txt(k.label), txt("evicted_recruits"), txt(r.layout.microsites[m]),
                              num(k.evicted_recruits[m]), txt("recruit-size mass off the mesh")});
    }
    for (const auto& w : r.warnings)
        t.rows.push_back({txt(""), txt("warning"), txt(""), report::missing(), txt(w)});
    return t;
}

TidyTable assumptions_table(const AnalysisResult& r) {
    TidyTable t{"assumptions", {"number", "assumption"}, {}};
    for (std::size_t i = 0; i < r.assumptions.size(); ++i)
        t.rows.push_back({report::integer(static_cast<std::int64_t>(i + 1)), txt(r.assumptions[i])});
    return t;
}

// The largest share of growth (per class) and recruit-size (per microsite, under its entry
// class) mass off the mesh, per kernel (docs/formats.md, `eviction`).
TidyTable eviction_table(const AnalysisResult& r) {
    TidyTable t{"eviction", {"kernel", "class", "part", "size", "share", "side"}, {}};
    for (const auto& k : r.kernels)
        for (const auto& e : k.eviction)
            t.rows.push_back({txt(k.label), txt(class_label(r.layout, e.class_index)),
                              txt(e.part), num(e.size), num(e.share),
                              txt(e.above ? "above" : "below")});
    return t;
}

// λ with n and 2n mesh points (docs/formats.md, `mesh_check`).
TidyTable mesh_check_table(const AnalysisResult& r) {
    TidyTable t{"mesh_check",
                {"kernel", "points", "lambda", "points_refined", "lambda_refined",
                 "relative_difference"},
                {}};
    for (const auto& k : r.kernels) {
        if (std::isnan(k.lambda_refined)) continue;
        t.rows.push_back({txt(k.label), report::integer(static_cast<std::int64_t>(k.points)),
                          num(k.lambda), report::integer(static_cast<std::int64_t>(2 * k.points)),
                          num(k.lambda_refined),
                          num(std::abs(k.lambda_refined - k.lambda) / k.lambda)});
    }
    return t;
}

// Every class of every reducible kernel with its component (docs/formats.md, `reducibility`).
TidyTable reducibility_table(const AnalysisResult& r) {
    TidyTable t{"reducibility",
                {"kernel", "setting", "class", "component", "role", "lambda_component",
                 "lambda_renewing", "lambda_kernel"},
                {}};
    for (const auto& k : r.reducible)
        for (const auto& c : k.classes)
            t.rows.push_back({txt(k.kernel), txt(k.setting), txt(c.class_name),
                              report::integer(static_cast<std::int64_t>(c.component)),
                              txt(c.role), num(c.lambda_component), num(k.lambda_renewing),
                              num(k.lambda_kernel)});
    return t;
}

}  // namespace

TidyTable decomposition_table(const AnalysisResult& r) {
    TidyTable t{"year_decomposition", {"kernel", "component", "contribution", "delta_lambda"}, {}};
    for (const auto& c : r.year_contributions)
        t.rows.push_back({txt(c.year), txt(c.component), num(c.contribution), num(c.delta_lambda)});
    return t;
}

TidyTable stochastic_table(const AnalysisResult& r) {
    TidyTable t{"stochastic_lambda",
                {"environment", "kernels", "years", "log_lambda", "lambda", "std_error", "seed"},
                {}};
    if (r.stochastic)
        t.rows.push_back({txt("census years, equally likely, independent"),
                          report::integer(static_cast<std::int64_t>(r.stochastic->kernels)),
                          report::integer(static_cast<std::int64_t>(r.stochastic->years)),
                          num(r.stochastic->log_lambda), num(r.stochastic->lambda),
                          num(r.stochastic->std_error),
                          report::integer(static_cast<std::int64_t>(r.stochastic->seed))});
    return t;
}

std::vector<report::TidyTable> analysis_tables(const AnalysisResult& result) {
    return {lambda_table(result),       stochastic_table(result), decomposition_table(result),
            perturbation_table(result),
            structure_table(result, false), structure_table(result, true),
            life_at_birth_table(result), life_by_size_table(result),
            arrival_table(result),      scenario_table(result),
            sensitivity_table(result),  break_even_table(result),
            diagnostics_table(result),  assumptions_table(result),
            eviction_table(result),     mesh_check_table(result),
            reducibility_table(result)};
}

report::TidyTable establishment_table(const EstablishmentEstimate& estimate) {
    TidyTable t{"establishment",
                {"year", "microsite", "seeds", "arrival", "recruits", "establishment", "source"},
                {}};
    for (const auto& row : estimate.rows)
        t.rows.push_back({txt(row.year), txt(row.microsite), num(row.seeds), num(row.arrival),
                          num(row.recruits), num(row.establishment), txt("census")});
    return t;
}

}  // namespace safesite::pipeline
