// The individual-based census simulation (docs/methods/simulation.md).
#include <catch2/catch.hpp>

#include <cmath>
#include <map>

#include "safesite/census/census.hpp"
#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/pipeline/fixed_model.hpp"
#include "safesite/pipeline/kernel_rates.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/sim/census_simulation.hpp"
#include "safesite/spec/model_spec.hpp"
#include "support/simulated_census.hpp"

using namespace safesite;

namespace {

spec::ModelSpec ridge_truth() {
    return spec::read_model_spec(std::string(SAFESITE_SOURCE_DIR) + "/models/ridge-truth.toml");
}

census::Census read_back(const spec::ModelSpec& truth, const sim::CensusSimulation& s) {
    return test::read_back(truth, s.census);
}

}  // namespace

TEST_CASE("a simulated census passes the census validation", "[sim][unit]") {
    const auto truth = ridge_truth();
    sim::SimulationOptions o;
    o.plants = 400;
    o.years = 5;
    o.seed = 3;
    o.burn_in = 5;
    o.notfound_rate = 0.05;
    o.missing_seed_rate = 0.1;
    const auto s = sim::simulate_census(truth, o);
    const census::Census c = read_back(truth, s);
    INFO(c.report().render());
    CHECK_FALSE(c.report().has_errors());
    CHECK(c.summary().years == std::vector<int>{2015, 2016, 2017, 2018, 2019});
    CHECK(s.alive.front() == 400);
    CHECK(c.summary().transitions > 1000);
    CHECK(c.summary().recruits > 0);
    // The warts are there.
    std::size_t notfound = 0, uncounted = 0, flowered = 0;
    for (const auto& row : s.census.rows) {
        const auto& status = std::get<std::string>(row[5]);
        if (status == "notfound") ++notfound;
        if (status == "alive" && std::get<std::int64_t>(row[6]) == 1) {
            ++flowered;
            if (std::holds_alternative<report::Missing>(row[7])) ++uncounted;
        }
    }
    CHECK(notfound > 0);
    CHECK(uncounted > 0);
    CHECK(uncounted < flowered);
    // One deviation per rate with year_sd and census year.
    CHECK(s.truth_years.rows.size() == 4 * 5);
}

TEST_CASE("simulated survival and flowering follow the truth", "[sim][unit]") {
    // Internal consistency: the number of plants that flower (survive) in a year is a sum of
    // independent Bernoulli(p_i) draws, with p_i the truth's rate at the plant's recorded size
    // and that year's deviation. Its mean is Σp_i and its SD sqrt(Σp_i(1−p_i)); we allow 4 SD
    // (a false alarm about 1 in 16 000 per check; the seed is fixed). Sizes are recorded with
    // four significant digits, which moves p_i by < 1e-3: negligible against 4 SD.
    const auto truth = ridge_truth();
    sim::SimulationOptions o;
    o.plants = 3000;
    o.years = 3;
    o.seed = 20261201;
    o.burn_in = 8;
    o.notfound_rate = 0.0;
    const auto s = sim::simulate_census(truth, o);
    const census::Census c = read_back(truth, s);
    REQUIRE_FALSE(c.report().has_errors());

    pipeline::KernelLayout layout;
    layout.microsites = truth.microsites.labels;
    layout.year_levels = s.years;
    for (std::size_t k = 0; k + 1 < s.years.size(); ++k) {
        const std::string& label = s.years[k];
        std::map<std::string, double> shifts;
        for (const auto& [rate, by_year] : s.deviations) shifts[rate] = by_year.at(label);
        const auto rates = pipeline::fixed_kernel_rates(truth, label, shifts, s.years);
        double expect_flower = 0, var_flower = 0, expect_surv = 0, var_surv = 0;
        double seen_flower = 0, seen_surv = 0;
        for (const auto& [i, j] : c.transition_rows()) {
            const auto& r = c.records()[i];
            if (std::to_string(r.year) != label) continue;
            const auto m = *truth.microsites.index(r.microsite);
            Eigen::VectorXd z(1);
            z[0] = r.size;
            const auto table =
                pipeline::covariate_table(layout, z, m, c.is_seedling_row(i), label);
            const double p = rates.flowering.mean(table)[0];
            const double sv = rates.survival.mean(table)[0];
            expect_flower += p;
            var_flower += p * (1 - p);
            expect_surv += sv;
            var_surv += sv * (1 - sv);
            seen_flower += r.flowered ? 1 : 0;
            seen_surv += c.records()[j].status == census::Status::alive ? 1 : 0;
        }
        INFO("year " << label << ": flowered " << seen_flower << " vs " << expect_flower
                     << ", survived " << seen_surv << " vs " << expect_surv);
        CHECK(std::abs(seen_flower - expect_flower) < 4 * std::sqrt(var_flower));
        CHECK(std::abs(seen_surv - expect_surv) < 4 * std::sqrt(var_surv));
    }
}

TEST_CASE("simulate refuses truths it cannot simulate", "[sim][unit]") {
    auto truth = ridge_truth();
    sim::SimulationOptions o;
    o.plants = 10;
    o.years = 2;
    auto not_fixed = truth;
    not_fixed.rates[0].coefficients.reset();
    try {
        sim::simulate_census(not_fixed, o);
        FAIL("expected a SpecError");
    } catch (const SpecError& e) {
        CHECK(e.key() == "rates.survival.coefficients");
    }
    auto poisson_less = truth;
    for (auto& r : poisson_less.rates) {
        if (r.name == "seeds") r.family = "gaussian";
    }
    CHECK_THROWS_AS(sim::simulate_census(poisson_less, o), SpecError);
    sim::SimulationOptions bad = o;
    bad.years = 1;
    CHECK_THROWS_AS(sim::simulate_census(truth, bad), UsageError);
}
