// Transitions, recruits and census summaries of the invented census in census_fixture.hpp.
// Every expected value is derived by hand from the fixture's 12 rows (derivations in the
// comments), following the rules of docs/methods/census.md; none comes from running the code.
#include <catch2/catch.hpp>

#include <cmath>

#include "census_fixture.hpp"
#include "safesite/census/transition_data.hpp"

using namespace census_fixture;
using safesite::census::build_transitions;
using safesite::census::Census;

namespace {
bool is_nan(double x) { return std::isnan(x); }
}  // namespace

TEST_CASE("transitions t → t+1 of the fixture census", "[census][unit]") {
    const Census c = read(base());
    REQUIRE(c.valid());
    const auto data = build_transitions(c);
    const auto& t = data.transitions;
    CHECK(t.names() == std::vector<std::string>{"size", "size_next", "survived", "flowered",
                                                "seeds", "microsite", "year", "plot", "plant",
                                                "seedling"});
    // Alive at t with a row at t+1 saying alive or dead, in plant then year order:
    // A 2018→2019 (alive), A 2019→2020 (dead), C 2019→2020, D 2018→2019, D 2019→2020.
    // B 2018→2019 is "notfound" at 2019: left out. B 2020, C 2020, D 2020, E 2020: no 2021.
    REQUIRE(t.rows() == 5);
    const auto& size = t.numeric("size");
    const auto& next = t.numeric("size_next");
    const auto& survived = t.numeric("survived");
    const auto& flowered = t.numeric("flowered");
    const auto& seeds = t.numeric("seeds");
    const auto& seedling = t.numeric("seedling");
    const auto& plant = t.categorical("plant");
    const auto& year = t.categorical("year");
    const auto& microsite = t.categorical("microsite");
    CHECK(plant.values == std::vector<std::string>{"A", "A", "C", "D", "D"});
    CHECK(year.values == std::vector<std::string>{"2018", "2019", "2019", "2018", "2019"});
    CHECK(year.levels == std::vector<std::string>{"2018", "2019"});
    CHECK(microsite.levels == std::vector<std::string>{"gravel", "cushion"});  // model order
    CHECK(microsite.values[2] == "cushion");
    CHECK(t.categorical("plot").values == std::vector<std::string>{"P1", "P1", "P1", "P2", "P2"});
    // Sizes on the log scale (size_transform = log): exact because both sides call std::log
    // on the same decimal value.
    CHECK(size[0] == std::log(2.0));
    CHECK(next[0] == std::log(3.0));
    CHECK(size[2] == std::log(0.5));
    CHECK(next[2] == std::log(0.8));
    CHECK(is_nan(next[1]));  // A died
    CHECK(survived == std::vector<double>{1, 0, 1, 1, 1});
    CHECK(flowered == std::vector<double>{0, 1, 0, 1, 1});
    CHECK(is_nan(seeds[0]));  // not counted
    CHECK(seeds[1] == 12.0);
    CHECK(seeds[3] == 20.0);
    CHECK(seeds[4] == 30.0);
    CHECK(seedling == std::vector<double>{0, 0, 1, 0, 0});  // C was flagged in 2019

    // Recruits: C first seen 2019 (P1 censused 2018) → year label 2018; E first seen 2020
    // (P2 censused 2019) → label 2019. Both in cushion.
    const auto& r = data.recruits;
    CHECK(r.names() == std::vector<std::string>{"size", "microsite", "year", "plot"});
    REQUIRE(r.rows() == 2);
    CHECK(r.numeric("size")[0] == std::log(0.5));
    CHECK(r.numeric("size")[1] == std::log(0.3));
    CHECK(r.categorical("year").values == std::vector<std::string>{"2018", "2019"});
    CHECK(r.categorical("plot").values == std::vector<std::string>{"P1", "P2"});
    CHECK(r.categorical("microsite").values == std::vector<std::string>{"cushion", "cushion"});
}

TEST_CASE("the alive plant-years table of the fixture census", "[census][unit]") {
    const auto data = build_transitions(read(base()));
    const auto& p = data.plants;
    CHECK(p.names() == std::vector<std::string>{"size", "flowered", "seeds", "microsite", "year",
                                                "plot", "plant", "seedling"});
    // Alive rows: A 2018, A 2019, B 2018, B 2020, C 2019, C 2020, D 2018-2020, E 2020 = 10.
    REQUIRE(p.rows() == 10);
    CHECK(p.categorical("plant").values ==
          std::vector<std::string>{"A", "A", "B", "B", "C", "C", "D", "D", "D", "E"});
    CHECK(p.categorical("year").levels == std::vector<std::string>{"2018", "2019", "2020"});
    // B 2020 flowered without a count: its seeds are NaN; it has no transition (no 2021).
    CHECK(p.numeric("flowered")[3] == 1.0);
    CHECK(is_nan(p.numeric("seeds")[3]));
    CHECK(p.numeric("seeds")[8] == 0.0);    // D 2020 counted 0
    CHECK(p.numeric("seedling")[9] == 1.0);  // E, flagged at its first record
    CHECK(p.numeric("size")[9] == std::log(0.3));
}

TEST_CASE("census summary counts of the fixture census", "[census][unit]") {
    const Census c = read(base());
    const auto& s = c.summary();
    CHECK(s.rows == 12);
    CHECK(s.plants == 5);
    CHECK(s.years == std::vector<int>{2018, 2019, 2020});
    CHECK(s.gaps.empty());
    CHECK(s.transitions == 5);
    CHECK(s.recruits == 2);
    CHECK(s.unattributed_recruits == 0);
    REQUIRE(s.per_year.size() == 3);
    const auto& y18 = s.per_year[0];
    const auto& y19 = s.per_year[1];
    const auto& y20 = s.per_year[2];
    // 2018 alive: A (gravel), B (cushion), D (gravel); D flowered with 20 seeds.
    CHECK(y18.alive == 3);
    CHECK(y18.alive_by_microsite == std::vector<std::size_t>{2, 1});
    CHECK(y18.flowering == 1);
    CHECK(y18.seeds_counted == 20);
    CHECK(y18.transitions == 2);        // A, D
    CHECK(y18.excluded_notfound == 1);  // B
    CHECK(y18.recruits_by_microsite == std::vector<std::size_t>{0, 1});  // C
    CHECK(y18.next_censused);
    // 2019 alive: A, D (gravel), C (cushion); A and D flowered with 12 and 30 seeds.
    CHECK(y19.alive_by_microsite == std::vector<std::size_t>{2, 1});
    CHECK(y19.flowering == 2);
    CHECK(y19.seeds_counted == 42);
    CHECK(y19.flowering_without_count == 0);
    CHECK(y19.transitions == 3);  // A, C, D
    CHECK(y19.recruits_by_microsite == std::vector<std::size_t>{0, 1});  // E
    // 2020 alive: B, C, E (cushion), D (gravel); B flowered without a count, D counted 0.
    CHECK(y20.alive == 4);
    CHECK(y20.alive_by_microsite == std::vector<std::size_t>{1, 3});
    CHECK(y20.flowering == 1);
    CHECK(y20.flowering_without_count == 1);
    CHECK(y20.seeds_counted == 0);
    CHECK_FALSE(y20.next_censused);
    CHECK(y20.transitions == 0);
    // Shares: 2020 1/4 gravel, 3/4 cushion; pooled (2+2+1)/10 and (1+1+3)/10. Ratios of small
    // integers: exact in binary floating point up to one rounding (margin 1e-15).
    CHECK(c.summary().microsite_share(2020)[1] == Approx(0.75).margin(1e-15));
    CHECK(c.summary().microsite_share()[0] == Approx(0.5).margin(1e-15));
    CHECK_THROWS_AS(c.summary().microsite_share(2017), safesite::UsageError);
    // Size range over alive rows: min 0.3 (E), max 5.0 (D), log scale.
    CHECK(s.size_min == std::log(0.3));
    CHECK(s.size_max == std::log(5.0));
}

TEST_CASE("without a seedling flag, recruits are plants first recorded after their plot's "
          "first census", "[census][unit]") {
    auto o = options();
    o.seedling_flag = false;
    const Census c = read(base(), o);
    REQUIRE(c.valid());
    // Same recruits as with the flag: C (2019, P1 from 2018) and E (2020, P2 from 2018).
    CHECK(c.summary().recruits == 2);
    const auto data = build_transitions(c);
    CHECK(data.transitions.numeric("seedling") == std::vector<double>{0, 0, 1, 0, 0});
}

TEST_CASE("build_transitions refuses a census with errors", "[census][unit]") {
    const Census c = read(base() + "A,2019,P1,gravel,3.1,alive,0,,0\n");
    CHECK_THROWS_AS(build_transitions(c), safesite::UsageError);
}
