// Year-to-year decomposition of λ by vital rate (analyse, docs/methods/pipeline.md).
// Internal checks on the invented truth models/ridge-truth.toml: when only one rate differs
// between a year and the pooled kernel, that rate carries the whole difference and every other
// component is 0; the components always add up to λ_year − λ_pooled.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>
#include <string>

#include "safesite/pipeline/analyse.hpp"
#include "safesite/pipeline/fixed_model.hpp"
#include "safesite/spec/model_spec.hpp"

using namespace safesite;

namespace {
pipeline::AnalysisResult analyse_with(const pipeline::YearShifts& shifts) {
    const spec::ModelSpec truth =
        spec::read_model_spec(std::string(SAFESITE_SOURCE_DIR) + "/models/ridge-truth.toml");
    pipeline::FixedModelOptions fo;
    fo.years = {"2001", "2002"};
    fo.shifts = shifts;
    pipeline::PreparedModel m = pipeline::prepare_fixed(truth, fo);
    m.break_even = false;
    m.mesh_check = false;
    m.scenarios.clear();
    m.survival_changes.clear();
    m.stochastic_years = 0;
    return pipeline::analyse(m);
}
}  // namespace

TEST_CASE("year decomposition: one rate differing carries the whole difference",
          "[pipeline][unit]") {
    const auto a = analyse_with({{"survival", {{"2001", 0.3}, {"2002", -0.2}}}});
    REQUIRE(a.year_contributions.size() == 2 * 7);
    for (const auto& c : a.year_contributions) {
        INFO(c.year << " " << c.component << ": " << c.contribution << " of " << c.delta_lambda);
        if (c.component == "survival")
            CHECK(c.contribution == Approx(c.delta_lambda).margin(1e-12));
        else
            CHECK(c.contribution == Approx(0.0).margin(1e-12));
    }
    // The shifts move λ in opposite directions (survival up in 2001, down in 2002).
    CHECK(a.year_contributions[0].delta_lambda > 0.01);
    CHECK(a.year_contributions[7].delta_lambda < -0.01);
}

TEST_CASE("year decomposition: components add up to the year's difference", "[pipeline][unit]") {
    const auto a = analyse_with({{"survival", {{"2001", 0.3}, {"2002", -0.2}}},
                                 {"growth", {{"2001", -0.1}, {"2002", 0.15}}},
                                 {"seeds", {{"2001", 0.4}}}});
    std::map<std::string, double> sum, delta;
    std::map<std::string, std::map<std::string, double>> by;
    for (const auto& c : a.year_contributions) {
        sum[c.year] += c.contribution;
        delta[c.year] = c.delta_lambda;
        by[c.year][c.component] = c.contribution;
    }
    for (const auto& [year, s] : sum) CHECK(s == Approx(delta[year]).margin(1e-12));
    // Rates that did not change contribute nothing; those that did, something.
    CHECK(by["2001"]["flowering"] == Approx(0.0).margin(1e-12));
    CHECK(by["2002"]["seeds"] == Approx(0.0).margin(1e-12));
    CHECK(std::abs(by["2001"]["seeds"]) > 1e-3);
    CHECK(std::abs(by["2002"]["growth"]) > 1e-3);
    // The interaction is small next to the main effects for shifts of this size.
    CHECK(std::abs(by["2001"]["interaction"]) < 0.2 * std::abs(delta["2001"]));
}
