// Bootstrap intervals (pipeline/bootstrap.hpp) on the invented census fixture
// tests/data/pipeline_census_small.csv. Reproducibility and bookkeeping checks, and the
// type-7 quantile against hand-computed values from its definition (Hyndman & Fan 1996, eq.
// for Q7: h = (n − 1)p + 1 in 1-based order statistics).
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "safesite/error.hpp"
#include "safesite/pipeline/bootstrap.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/spec/model_spec.hpp"

using namespace safesite;

namespace {
spec::ModelSpec fixture() {
    return spec::read_model_spec(std::string(SAFESITE_TEST_DATA) + "/pipeline_fit.toml");
}
}  // namespace

TEST_CASE("type-7 quantile: hand-computed values", "[pipeline][unit]") {
    // x = 1..10: h = 9p, Q = x_(⌊h⌋+1) + (h − ⌊h⌋)(x_(⌊h⌋+2) − x_(⌊h⌋+1)) (1-based).
    std::vector<double> x;
    for (int i = 10; i >= 1; --i) x.push_back(i);  // unsorted on purpose
    CHECK(pipeline::quantile_type7(x, 0.0) == 1.0);
    CHECK(pipeline::quantile_type7(x, 1.0) == 10.0);
    CHECK(pipeline::quantile_type7(x, 0.1) == Approx(1.9).margin(1e-12));
    CHECK(pipeline::quantile_type7(x, 0.5) == Approx(5.5).margin(1e-12));
    CHECK(pipeline::quantile_type7(x, 0.975) == Approx(9.775).margin(1e-12));
    // Non-finite values are left out; nothing finite gives NaN.
    x.push_back(std::nan(""));
    CHECK(pipeline::quantile_type7(x, 0.5) == Approx(5.5).margin(1e-12));
    CHECK(std::isnan(pipeline::quantile_type7({std::nan("")}, 0.5)));
    CHECK_THROWS_AS(pipeline::quantile_type7(x, 1.5), UsageError);
}

TEST_CASE("bootstrap: same seed, same intervals whatever the thread count", "[pipeline][unit]") {
    const spec::ModelSpec model = fixture();
    const pipeline::RunResult base = pipeline::run(model);
    pipeline::BootstrapOptions o;
    o.replicates = 6;
    o.seed = 7;
    o.threads = 1;
    const auto one = pipeline::bootstrap(model, base, o);
    o.threads = 2;
    // The progress callback: once per replicate, counts 1..B in order, whatever the threads.
    // (Recorded here, checked after: Catch2 assertions are not for worker threads.)
    std::vector<std::size_t> seen, totals;
    o.progress = [&](std::size_t done, std::size_t total) {
        seen.push_back(done);
        totals.push_back(total);
    };
    const auto two = pipeline::bootstrap(model, base, o);
    CHECK(seen == std::vector<std::size_t>{1, 2, 3, 4, 5, 6});
    CHECK(totals == std::vector<std::size_t>(6, 6));
    o.progress = nullptr;
    REQUIRE(one.failed == 0);
    REQUIRE(one.values.size() == 6);
    REQUIRE(one.values == two.values);  // exact, replicate by replicate

    // Another seed draws other resamples.
    o.seed = 8;
    const auto other = pipeline::bootstrap(model, base, o);
    CHECK(other.values != one.values);

    // Bookkeeping: every quantity has its estimate from the original run, 6 replicates, an
    // interval with lower ≤ upper, and the replicates actually vary.
    bool lambda_pooled = false;
    for (const auto& b : one.intervals) {
        INFO(b.quantity << " " << b.kernel << " " << b.target);
        CHECK(b.replicates == 6);
        CHECK(b.lower <= b.upper);
        if (b.quantity == "lambda" && b.kernel == "pooled") {
            lambda_pooled = true;
            CHECK(b.estimate == base.analysis.pooled().lambda);
            CHECK(b.std_error > 0.0);
            // Resampling 4 census years of a few hundred plants moves λ by percent, not by
            // tens of percent (an upper bound that catches a broken resample).
            CHECK(b.std_error < 0.2);
        }
        // Fractions given directly are not resampled, so they have no interval.
        CHECK(b.quantity != "arrival");
    }
    CHECK(lambda_pooled);
    const auto tables = pipeline::bootstrap_tables(one);
    REQUIRE(tables.size() == 2);
    CHECK(tables[0].rows.size() == one.intervals.size());
    CHECK(tables[1].rows.size() == 6 * one.intervals.size());
}

TEST_CASE("bootstrap: settings out of range are usage errors", "[pipeline][unit]") {
    const spec::ModelSpec model = fixture();
    const pipeline::RunResult base = pipeline::run(model);
    pipeline::BootstrapOptions o;
    o.replicates = 1;
    CHECK_THROWS_AS(pipeline::bootstrap(model, base, o), UsageError);
    o.replicates = 3;
    o.level = 1.0;
    CHECK_THROWS_AS(pipeline::bootstrap(model, base, o), UsageError);
}
