// The optional census column `neighbour_size` (issue 5, §3: the neighbours' size distribution
// from the census; docs/formats.md "Census", docs/methods/census.md "Neighbour sizes"):
// reading with and without it, located errors, the bare-soil warning, and the values per
// neighbour form in file order. The census below is invented; rows are in year-major order so
// that file order differs from the (plant, year) order of Census::records(). Expected values
// are the cells typed here, expected lines those given beside each row (header = line 1).
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "census_fixture.hpp"
#include "safesite/error.hpp"

using namespace census_fixture;
using safesite::census::Census;
using safesite::census::CensusOptions;
using safesite::census::Severity;
using safesite::census::Status;
using safesite::census::ValidationIssue;

namespace {

const std::string k_nb_header =
    "plant,year,plot,microsite,size,status,flowered,seeds,seedling,neighbour_size\n";
const std::string k_nb_rows =
    "A,2018,P1,gravel,2.0,alive,0,,0,\n"       // line 2
    "B,2018,P1,cushion,1.0,alive,0,,0,12.5\n"  // line 3
    "D,2018,P2,gravel,4.0,alive,1,20,0,\n"     // line 4
    "A,2019,P1,gravel,3.0,alive,1,12,0,\n"     // line 5
    "B,2019,P1,cushion,,notfound,,,0,13\n"     // line 6  (not alive: not in the sample)
    "C,2019,P1,cushion,0.5,alive,0,,1,30\n"    // line 7
    "D,2019,P2,gravel,4.5,alive,1,30,0,\n"     // line 8
    "F,2019,P2,tussock,2.0,alive,0,,1,8\n"     // line 9
    "A,2020,P1,gravel,,dead,,,0,\n"            // line 10
    "B,2020,P1,cushion,1.5,alive,1,,0,14\n"    // line 11
    "C,2020,P1,cushion,0.8,alive,0,,0,\n"      // line 12 (not measured)
    "D,2020,P2,gravel,5.0,alive,0,0,0,\n"      // line 13
    "E,2020,P2,cushion,0.3,alive,0,,1,7.5\n"   // line 14
    "F,2020,P2,tussock,,dead,,,0,9\n";         // line 15 (dead: not in the sample)

std::string nb_base() { return k_nb_header + k_nb_rows; }

/// Three labels, gravel is bare soil.
CensusOptions nb_options() {
    CensusOptions o = options();
    o.microsites = {"gravel", "cushion", "tussock"};
    o.bare = 0;
    return o;
}

const ValidationIssue& issue(const Census& c, const std::string& code) {
    const ValidationIssue* i = c.report().find(code);
    INFO("report:\n" << c.report().render());
    REQUIRE(i != nullptr);
    return *i;
}

}  // namespace

TEST_CASE("neighbour sizes are read per record and grouped by neighbour form in file order",
          "[census][unit]") {
    const Census c = read(nb_base(), nb_options());
    INFO(c.report().render());
    CHECK(c.report().issues().empty());
    REQUIRE(c.has_neighbour_sizes());

    // Per record: the typed value on the raw scale (never transformed, although size is log).
    for (const auto& r : c.records()) {
        INFO("plant " << r.plant << " " << r.year);
        if (r.plant == "B" && r.year == 2018) CHECK(r.neighbour_size.value() == 12.5);
        if (r.plant == "C" && r.year == 2020) CHECK_FALSE(r.neighbour_size.has_value());
        if (r.microsite == "gravel") CHECK_FALSE(r.neighbour_size.has_value());
    }

    // Alive records only (lines 6 and 15 are left out), one value per plant-year, ascending
    // line: 3, 7, 11, 14 under cushion (records() order would be B 2018, B 2020, C, E).
    const auto by = c.neighbour_sizes_by_microsite();
    REQUIRE(by.size() == 2);  // every non-bare label, and no key for bare soil
    CHECK(by.count("gravel") == 0);
    CHECK(by.at("cushion") == std::vector<double>{12.5, 30.0, 14.0, 7.5});
    CHECK(by.at("tussock") == std::vector<double>{8.0});
}

TEST_CASE("a census without the neighbour_size column reads exactly as before",
          "[census][unit]") {
    // The shared fixture has no such column; naming the bare label changes nothing either.
    const Census before = read(base());
    CensusOptions o = options();
    o.bare = 0;  // gravel
    const Census c = read(base(), o);
    CHECK_FALSE(c.has_neighbour_sizes());
    CHECK_FALSE(before.has_neighbour_sizes());
    CHECK(c.report().issues().empty());
    REQUIRE(c.records().size() == before.records().size());
    for (std::size_t k = 0; k < c.records().size(); ++k) {
        CHECK(c.records()[k].plant == before.records()[k].plant);
        CHECK(c.records()[k].year == before.records()[k].year);
        CHECK_FALSE(c.records()[k].neighbour_size.has_value());
    }
    CHECK(c.transition_rows() == before.transition_rows());
    CHECK(c.recruit_rows() == before.recruit_rows());
    CHECK(c.summary().transitions == before.summary().transitions);
    CHECK(c.summary().recruits == before.summary().recruits);
    // Every neighbour form is present, with no values.
    const auto by = c.neighbour_sizes_by_microsite();
    REQUIRE(by.size() == 1);
    CHECK(by.at("cushion").empty());
}

TEST_CASE("an all-empty neighbour_size column changes nothing but has_neighbour_sizes",
          "[census][unit]") {
    // The shared fixture with an empty tenth field on every row.
    std::string text = k_header.substr(0, k_header.size() - 1) + ",neighbour_size\n";
    std::string rows;
    for (char ch : k_rows) {
        if (ch == '\n') rows.push_back(',');
        rows.push_back(ch);
    }
    const Census with = read(text + rows);
    const Census without = read(base());
    INFO(with.report().render());
    CHECK(with.report().issues().empty());
    CHECK(with.has_neighbour_sizes());
    CHECK(with.transition_rows() == without.transition_rows());
    CHECK(with.recruit_rows() == without.recruit_rows());
    CHECK(with.summary().rows == without.summary().rows);
    CHECK(with.neighbour_sizes_by_microsite().at("cushion").empty());
}

TEST_CASE("a neighbour_size that is not a positive number is a located bad_value",
          "[census][unit]") {
    // Field 10 is neighbour_size; line 7 is C 2019 (cushion).
    for (const char* bad : {"-3", "0", "abc", "1,5"}) {
        INFO("neighbour_size " << bad);
        const std::string cell = std::string(bad).find(',') == std::string::npos
                                     ? std::string(bad)
                                     : "\"" + std::string(bad) + "\"";
        const Census c = read(edit(nb_base(), "C,2019,P1,cushion,0.5,alive,0,,1,30",
                                   "C,2019,P1,cushion,0.5,alive,0,,1," + cell),
                              nb_options());
        const auto& i = issue(c, "bad_value");
        CHECK(i.severity == Severity::error);
        CHECK(i.count == 1);
        CHECK(i.examples[0].line == 7);
        CHECK(i.examples[0].column == 10);
        CHECK(i.examples[0].key == "neighbour_size");
        CHECK(i.examples[0].text.find(bad) != std::string::npos);  // the value is quoted
        CHECK_FALSE(c.valid());
    }
    // With a mapped column name, the location carries the file's name.
    CensusOptions o = nb_options();
    o.columns["neighbour_size"] = "nb_diam_cm";
    const std::string text = edit(edit(nb_base(), ",neighbour_size\n", ",nb_diam_cm\n"),
                                  "E,2020,P2,cushion,0.3,alive,0,,1,7.5",
                                  "E,2020,P2,cushion,0.3,alive,0,,1,-7.5");
    const Census c = read(text, o);
    const auto& i = issue(c, "bad_value");
    CHECK(i.examples[0].line == 14);
    CHECK(i.examples[0].column == 10);
    CHECK(i.examples[0].key == "nb_diam_cm");
}

TEST_CASE("a mapped neighbour_size column is read under the file's name", "[census][unit]") {
    CensusOptions o = nb_options();
    o.columns["neighbour_size"] = "nb_diam_cm";
    const Census c = read(edit(nb_base(), ",neighbour_size\n", ",nb_diam_cm\n"), o);
    CHECK(c.report().issues().empty());
    CHECK(c.has_neighbour_sizes());
    CHECK(c.neighbour_sizes_by_microsite().at("cushion") ==
          std::vector<double>{12.5, 30.0, 14.0, 7.5});
    // Under the default name only, a renamed column is not found: the census has none.
    CHECK_FALSE(read(edit(nb_base(), ",neighbour_size\n", ",nb_diam_cm\n"), nb_options())
                    .has_neighbour_sizes());
}

TEST_CASE("a neighbour_size on bare soil is a warning and the value is ignored",
          "[census][unit]") {
    // A 2019 (line 5) and D 2020 (line 13) stand on gravel, the bare-soil label.
    std::string text = edit(nb_base(), "A,2019,P1,gravel,3.0,alive,1,12,0,",
                            "A,2019,P1,gravel,3.0,alive,1,12,0,6");
    text = edit(text, "D,2020,P2,gravel,5.0,alive,0,0,0,", "D,2020,P2,gravel,5.0,alive,0,0,0,4.2");
    const Census c = read(text, nb_options());
    const auto& i = issue(c, "neighbour_size_on_bare");
    CHECK(i.severity == Severity::warning);
    CHECK(i.count == 2);
    REQUIRE(i.examples.size() == 2);
    CHECK(i.examples[0].line == 5);
    CHECK(i.examples[0].column == 10);
    CHECK(i.examples[0].key == "neighbour_size");
    CHECK(i.examples[1].line == 13);
    CHECK(c.valid());
    CHECK(c.report().warning_count() == 2);
    CHECK(c.report().error_count() == 0);
    // The rows are kept (a warning never drops data) with the value emptied.
    std::size_t gravel_alive = 0;
    for (const auto& r : c.records()) {
        if (r.microsite != "gravel") continue;
        CHECK_FALSE(r.neighbour_size.has_value());
        if (r.status == Status::alive) ++gravel_alive;
    }
    CHECK(gravel_alive == 5);  // A 2018, A 2019, D 2018–2020
    const auto by = c.neighbour_sizes_by_microsite();
    CHECK(by.count("gravel") == 0);
    CHECK(by.at("cushion") == std::vector<double>{12.5, 30.0, 14.0, 7.5});

    // No bare label named: no row is bare soil, so no warning and gravel is a form like any.
    CensusOptions o = nb_options();
    o.bare.reset();
    const Census n = read(text, o);
    CHECK(n.report().find("neighbour_size_on_bare") == nullptr);
    CHECK(n.neighbour_sizes_by_microsite().at("gravel") == std::vector<double>{6.0, 4.2});
}
