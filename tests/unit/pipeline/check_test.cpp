// check() on the invented census fixture tests/data/pipeline_census_small.csv (census
// 2001–2004, 2 microsites). Expected counts were taken from the fixture file when it was
// written (independently of safesite): 4 census years, recruits at t+1 per microsite
// gravel/cushion 7/8, 5/8, 6/9.
#include <catch2/catch.hpp>

#include "safesite/error.hpp"
#include "safesite/pipeline/check.hpp"
#include "safesite/spec/model_spec.hpp"

using namespace safesite;

TEST_CASE("check summarises the census fixture without errors", "[pipeline][unit]") {
    const auto model =
        spec::read_model_spec(std::string(SAFESITE_TEST_DATA) + "/pipeline_fit.toml");
    const auto result = pipeline::check(model);
    CHECK(result.valid());
    CHECK(result.summary.years == std::vector<int>{2001, 2002, 2003, 2004});
    REQUIRE(result.summary.per_year.size() == 4);
    CHECK(result.summary.per_year[0].recruits_by_microsite == std::vector<std::size_t>{7, 8});
    CHECK(result.summary.per_year[2].recruits_by_microsite == std::vector<std::size_t>{6, 9});
    const auto tables = pipeline::check_tables(result);
    REQUIRE(tables.size() == 5);
    CHECK(tables[0].name == "census_years");
    CHECK(tables[0].rows.size() == 4);
    CHECK(tables[1].name == "census_microsites");
    CHECK(tables[1].rows.size() == 4 * 2);
    CHECK(tables[3].name == "problems");
    // One row per [census] policy key; the fixture triggers none of them.
    CHECK(tables[4].name == "census_policies");
    REQUIRE(tables[4].rows.size() == 3);
    for (const auto& row : tables[4].rows) CHECK(row[2] == report::integer(0));
}

TEST_CASE("check refuses a model file without a census", "[pipeline][unit]") {
    const auto model =
        spec::read_model_spec(std::string(SAFESITE_TEST_DATA) + "/model_truth.toml");
    try {
        pipeline::check(model);
        FAIL("expected a SpecError");
    } catch (const SpecError& e) {
        CHECK(e.key() == "data.census");
    }
}
