// fit(), check() and run() on the invented census fixture tests/data/pipeline_census_small.csv
// (2 microsites, census 2001–2004, every flowering plant's seeds counted).
// The seed and recruit totals below were counted from the fixture file itself, independently
// of safesite, when it was written (seeds at t: 2001 350, 2002 261, 2003 323; recruits at t+1
// gravel/cushion: 7/8, 5/8, 6/9), so the establishment estimates are exact ratios
// (docs/methods/pipeline.md: ê = R / (S a)); 1e-12 relative allows for rounding only.
#include <catch2/catch.hpp>

#include <cmath>
#include <set>

#include "safesite/pipeline/fit.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/pipeline/tables.hpp"
#include "safesite/spec/model_spec.hpp"

using namespace safesite;

namespace {
spec::ModelSpec fixture() {
    return spec::read_model_spec(std::string(SAFESITE_TEST_DATA) + "/pipeline_fit.toml");
}
}  // namespace

TEST_CASE("fit estimates establishment per year and pooled from the census counts",
          "[pipeline][unit]") {
    const auto result = pipeline::fit(fixture());
    const auto& est = result.establishment;
    REQUIRE(est.years == std::vector<std::string>{"2001", "2002", "2003"});
    const double a_gravel = 0.7, a_cushion = 0.3;
    CHECK(est.by_year[0][0] == Approx(7.0 / (350 * a_gravel)).epsilon(1e-12));
    CHECK(est.by_year[0][1] == Approx(8.0 / (350 * a_cushion)).epsilon(1e-12));
    CHECK(est.by_year[1][1] == Approx(8.0 / (261 * a_cushion)).epsilon(1e-12));
    CHECK(est.by_year[2][0] == Approx(6.0 / (323 * a_gravel)).epsilon(1e-12));
    CHECK(est.pooled[0] == Approx(18.0 / (934 * a_gravel)).epsilon(1e-12));
    CHECK(est.pooled[1] == Approx(25.0 / (934 * a_cushion)).epsilon(1e-12));
    // The kernels use the same numbers.
    CHECK(result.model.establishment_pooled[1] == Approx(est.pooled[1]).epsilon(1e-15));
    CHECK(result.model.establishment_by_year.size() == 3);
}

TEST_CASE("fit: candidates compared by AIC, fixed year effects with a pooled refit",
          "[pipeline][unit]") {
    const auto result = pipeline::fit(fixture());
    // Survival: two candidates, each with "+ year" for the year kernels.
    std::vector<pipeline::ComparisonRow> survival;
    for (const auto& r : result.comparison)
        if (r.rate == "survival") survival.push_back(r);
    REQUIRE(survival.size() == 2);
    CHECK(survival[0].aic <= survival[1].aic);
    CHECK(survival[0].chosen);
    CHECK_FALSE(survival[1].chosen);
    CHECK(survival[0].delta_aic == 0.0);
    CHECK(survival[0].weight + survival[1].weight == Approx(1.0).epsilon(1e-12));
    for (const auto& r : survival) CHECK(r.formula.find("+ year") != std::string::npos);
    // Coefficients of both fits: year terms only in the "years" fit.
    std::set<std::string> models;
    bool year_term_in_pooled = false, year_term_in_years = false;
    for (const auto& c : result.coefficients) {
        if (c.rate != "survival") continue;
        models.insert(c.model);
        const bool year_term = c.term.rfind("year[", 0) == 0;
        if (c.model == "pooled") year_term_in_pooled |= year_term;
        if (c.model == "years") year_term_in_years |= year_term;
    }
    CHECK(models == std::set<std::string>{"years", "pooled"});
    CHECK(year_term_in_years);
    CHECK_FALSE(year_term_in_pooled);
    // One kernel per transition year, first-year classes from the seedling flag.
    CHECK(result.model.years.size() == 3);
    CHECK(result.model.layout.juvenile == pipeline::JuvenileMode::seedling_class);
    const auto tables = pipeline::fit_tables(result);
    REQUIRE(tables.size() == 3);
    CHECK(tables[2].name == "establishment");
    CHECK(tables[2].rows.size() == 3 * 2 + 2);
}

TEST_CASE("run: lambda per year and pooled, perturbation, scenario, diagnostics",
          "[pipeline][unit]") {
    const auto result = pipeline::run(fixture());
    const auto& kernels = result.analysis.kernels;
    REQUIRE(kernels.size() == 4);
    CHECK(kernels.back().label == "pooled");
    for (const auto& k : kernels) {
        INFO(k.label);
        CHECK(k.lambda > 0.0);
        CHECK(std::isfinite(k.r0));
        // Mesh convergence is reported, not asserted: it is a diagnostic of the fit.
        CHECK(std::isfinite(k.lambda_refined));
        REQUIRE(k.perturbation.size() == 3);
        // λ is non-decreasing in juvenile survival (K ≥ 0, Perron–Frobenius).
        CHECK(k.perturbation[0].lambda <= k.lambda);
        CHECK(k.perturbation[2].lambda >= k.lambda);
        CHECK(k.juvenile_sensitivity > 0.0);
    }
    REQUIRE(result.analysis.scenarios.size() == 1);
    CHECK(result.analysis.scenarios[0].lambda_years.size() == 3);
    const auto tables = pipeline::run_tables(result);
    std::set<std::string> names;
    for (const auto& t : tables) names.insert(t.name);
    for (const char* n : {"coefficients", "model_comparison", "establishment", "lambda",
                          "perturbation", "stable_structure", "reproductive_value", "arrival",
                          "scenarios", "sensitivities", "break_even", "diagnostics",
                          "assumptions", "eviction", "mesh_check", "reducibility"})
        CHECK(names.count(n) == 1);
}

TEST_CASE("run: stochastic λ of the year kernels, reproducible from the seed",
          "[pipeline][unit]") {
    spec::ModelSpec model = fixture();
    const auto a = pipeline::run(model).analysis;
    REQUIRE(a.stochastic.has_value());
    CHECK(a.stochastic->kernels == 3);
    CHECK(a.stochastic->years == 20000);
    CHECK(a.stochastic->std_error > 0.0);
    CHECK(a.stochastic->lambda == Approx(std::exp(a.stochastic->log_lambda)).epsilon(1e-15));
    // log λ_s is an average of one-year log growths of populations near the year kernels'
    // structures: it lies within the range of the year kernels' log λ (here a weak bound
    // that still catches a wrong norm or a missing renormalisation).
    double lo = 1e300, hi = -1e300;
    for (std::size_t y = 0; y + 1 < a.kernels.size(); ++y) {
        lo = std::min(lo, std::log(a.kernels[y].lambda));
        hi = std::max(hi, std::log(a.kernels[y].lambda));
    }
    CHECK(a.stochastic->log_lambda > lo - 0.5 * (hi - lo));
    CHECK(a.stochastic->log_lambda < hi + 0.5 * (hi - lo));
    CHECK(pipeline::run(model).analysis.stochastic->log_lambda == a.stochastic->log_lambda);
    model.uncertainty.seed += 1;
    CHECK(pipeline::run(model).analysis.stochastic->log_lambda != a.stochastic->log_lambda);
}
