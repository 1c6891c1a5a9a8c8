// Census validation: one test per data problem of issue 4 (and docs/methods/census.md),
// each asserting the issue code, its severity and the location of the offending row. The
// census is invented (census_fixture.hpp); the expected lines are those of its rows.
#include <catch2/catch.hpp>

#include <cstdio>
#include <filesystem>
#include <fstream>

#include "census_fixture.hpp"
#include "safesite/error.hpp"

using namespace census_fixture;
using safesite::census::Census;
using safesite::census::MissingRowPolicy;
using safesite::census::Severity;
using safesite::census::SizeTransform;
using safesite::census::ValidationIssue;

namespace {

const ValidationIssue& issue(const Census& c, const std::string& code) {
    const ValidationIssue* i = c.report().find(code);
    INFO("report:\n" << c.report().render());
    REQUIRE(i != nullptr);
    return *i;
}

}  // namespace

TEST_CASE("the base census is clean", "[census][unit]") {
    const Census c = read(base());
    INFO(c.report().render());
    CHECK(c.report().issues().empty());
    CHECK(c.valid());
}

TEST_CASE("duplicate plant-year rows are an error at the second row", "[census][unit]") {
    const Census c = read(base() + "A,2019,P1,gravel,3.1,alive,0,,0\n");  // line 14
    const auto& i = issue(c, "duplicate_row");
    CHECK(i.severity == Severity::error);
    CHECK(i.count == 1);
    CHECK(i.examples[0].line == 14);
    CHECK_FALSE(c.valid());
}

TEST_CASE("a plant alive after being recorded dead is an error", "[census][unit]") {
    std::string text = edit(base(), "A,2019,P1,gravel,3.0,alive,1,12,0", "A,2019,P1,gravel,,dead,,,0");
    text = edit(text, "A,2020,P1,gravel,,dead,,,0", "A,2020,P1,gravel,2.5,alive,0,,0");
    const Census c = read(text);
    const auto& i = issue(c, "alive_after_dead");
    CHECK(i.severity == Severity::error);
    CHECK(i.examples[0].line == 4);
}

TEST_CASE("a missing row in a censused year follows the missing_row policy", "[census][unit]") {
    const std::string text = edit(base(), "A,2019,P1,gravel,3.0,alive,1,12,0\n", "");
    {
        const Census c = read(text);
        const auto& i = issue(c, "missing_row");
        CHECK(i.severity == Severity::error);
        CHECK(i.count == 1);
        CHECK(i.examples[0].line == 2);  // A's last row before the missing year (2018)
    }
    {
        auto o = options();
        o.missing_row = MissingRowPolicy::notfound;
        const Census c = read(text, o);
        const auto& i = issue(c, "missing_row");
        CHECK(i.severity == Severity::warning);
        CHECK(c.valid());
        // A 2018 → 2019 is now "not found": excluded from survival (2018 keeps D only).
        CHECK(c.summary().per_year[0].transitions == 1);
        CHECK(c.summary().per_year[0].excluded_notfound == 2);  // A and B
    }
    // A plant that vanishes without a "dead" row is missing in the later censused years too.
    const Census c = read(edit(base(), "A,2020,P1,gravel,,dead,,,0\n", ""));
    CHECK(issue(c, "missing_row").examples[0].line == 3);
}

TEST_CASE("sizes the transform cannot take are errors at the size cell", "[census][unit]") {
    struct Case {
        SizeTransform t;
        const char* size;
        bool ok;
    };
    // Domains: log x > 0, sqrt x ≥ 0, log1p x > −1 (size_transform.hpp).
    for (const Case& k : {Case{SizeTransform::log, "0", false}, Case{SizeTransform::log, "-2", false},
                          Case{SizeTransform::sqrt, "0", true}, Case{SizeTransform::sqrt, "-0.5", false},
                          Case{SizeTransform::log1p, "-0.5", true}, Case{SizeTransform::log1p, "-1", false},
                          Case{SizeTransform::none, "-7", true}}) {
        INFO("transform " << to_string(k.t) << ", size " << k.size);
        const Census c = read(edit(base(), "A,2018,P1,gravel,2.0,", std::string("A,2018,P1,gravel,") +
                                                                        k.size + ","),
                              options(k.t));
        const auto* i = c.report().find("size_outside_transform");
        CHECK((i == nullptr) == k.ok);
        if (i) {
            CHECK(i->severity == Severity::error);
            CHECK(i->examples[0].line == 2);
            CHECK(i->examples[0].column == 5);
            CHECK(i->examples[0].key == "size");
        }
    }
}

TEST_CASE("unknown microsite labels are errors with a hint", "[census][unit]") {
    const Census c = read(edit(base(), "D,2019,P2,gravel", "D,2019,P2,gravle"));
    const auto& i = issue(c, "unknown_microsite");
    CHECK(i.severity == Severity::error);
    CHECK(i.examples[0].line == 11);
    CHECK(i.examples[0].column == 4);
    CHECK(i.examples[0].text.find("'gravel'") != std::string::npos);
}

TEST_CASE("seeds recorded for a plant that did not flower are an error", "[census][unit]") {
    const Census c = read(edit(base(), "A,2018,P1,gravel,2.0,alive,0,,0", "A,2018,P1,gravel,2.0,alive,0,5,0"));
    const auto& i = issue(c, "seeds_without_flowering");
    CHECK(i.severity == Severity::error);
    CHECK(i.examples[0].line == 2);
    CHECK(i.examples[0].column == 8);
    // A count of zero for a non-flowering plant is consistent (D 2020 in the base census).
    CHECK(read(base()).report().find("seeds_without_flowering") == nullptr);
}

TEST_CASE("a census year without transitions is reported", "[census][unit]") {
    const Census c = read(k_header +
                          "A,2018,P1,gravel,2,alive,0,,0\n"
                          "A,2019,P1,gravel,2,alive,0,,0\n"
                          "A,2020,P1,gravel,,notfound,,,0\n");
    const auto& i = issue(c, "year_without_transitions");
    CHECK(i.severity == Severity::warning);
    CHECK(i.count == 1);
    CHECK(i.examples[0].text.find("2019") != std::string::npos);
    CHECK(c.valid());
}

TEST_CASE("census gaps are counted and no transition crosses them", "[census][unit]") {
    const Census c = read(k_header +
                          "A,2018,P1,gravel,2,alive,0,,0\n"
                          "A,2020,P1,gravel,3,alive,0,,0\n");
    CHECK(issue(c, "census_gap").severity == Severity::warning);
    REQUIRE(c.summary().gaps.size() == 1);
    CHECK(c.summary().gaps[0].from == 2018);
    CHECK(c.summary().gaps[0].to == 2020);
    CHECK(c.summary().transitions == 0);
    CHECK(issue(c, "no_transitions").severity == Severity::error);
}

TEST_CASE("a plant changing microsite or plot is an error", "[census][unit]") {
    const Census c = read(edit(base(), "C,2020,P1,cushion", "C,2020,P1,gravel"));
    const auto& i = issue(c, "microsite_changed");
    CHECK(i.severity == Severity::error);
    CHECK(i.examples[0].line == 9);
    const Census p = read(edit(base(), "C,2020,P1,cushion", "C,2020,P2,cushion"));
    CHECK(issue(p, "plot_changed").examples[0].line == 9);
}

TEST_CASE("unreadable cells, bad statuses and missing values are all reported at once",
          "[census][unit]") {
    std::string text = edit(base(), "A,2018,P1,gravel,2.0,", "A,2018,P1,gravel,\"2,0\",");
    text = edit(text, "D,2019,P2,gravel,4.5,alive", "D,2019,P2,gravel,4.5,Alive");
    text = edit(text, "C,2020,P1,cushion,0.8,", "C,2020,P1,cushion,,");
    text = edit(text, "D,2018,P2,gravel,4.0,alive,1,20", "D,2018,P2,gravel,4.0,alive,1,-4");
    text = edit(text, "E,2020,P2,cushion,0.3,alive,0,,1", "E,2020,P2,cushion,0.3,alive,yes,,1");
    const Census c = read(text);
    const auto& bad = issue(c, "bad_value");
    CHECK(bad.count == 3);  // "2,0", -4 seeds, "yes"
    CHECK(bad.examples[0].line == 2);
    CHECK(bad.examples[0].column == 5);
    CHECK(bad.examples[0].key == "size");
    const auto& status = issue(c, "bad_status");
    CHECK(status.examples[0].line == 11);
    CHECK(status.examples[0].column == 6);
    CHECK(status.examples[0].text.find("'alive'") != std::string::npos);
    // An alive plant without a size is kept (census.alive_without_size = "keep"): a warning.
    const auto& missing = issue(c, "alive_without_size");
    CHECK(missing.severity == Severity::warning);
    CHECK(missing.examples[0].line == 9);
    CHECK(missing.examples[0].key == "size");
}

TEST_CASE("seedling flag consistency warnings", "[census][unit]") {
    // B first recorded in 2019 in plot P1 (first censused 2018) without the flag.
    const Census c = read(edit(edit(base(), "B,2018,P1,cushion,1.0,alive,0,,0\n", ""),
                               "B,2019,P1,cushion,,notfound,,,0", "B,2019,P1,cushion,1.2,alive,0,,0"));
    CHECK(issue(c, "first_record_not_seedling").examples[0].line == 5);
    const Census d = read(edit(base(), "D,2019,P2,gravel,4.5,alive,1,30,0", "D,2019,P2,gravel,4.5,alive,1,30,1"));
    CHECK(issue(d, "seedling_flag_not_first").examples[0].line == 11);
    CHECK(d.valid());
}

TEST_CASE("the report keeps the first examples and counts the rest", "[census][unit]") {
    std::string text = k_header;
    for (int p = 0; p < 8; ++p) {
        std::string tag = "P";
        tag += std::to_string(p);  // two steps: g++ 12 false -Wrestrict (GCC bug 105329)
        text += tag + ",2018,X,moss,1,alive,0,,0\n" + tag + ",2019,X,moss,1,alive,0,,0\n";
    }
    const Census c = read(text);
    const auto& i = issue(c, "unknown_microsite");
    CHECK(i.count == 16);
    CHECK(i.examples.size() == safesite::census::ValidationReport::max_examples);
    CHECK(c.report().render().find("and 11 more") != std::string::npos);
}

TEST_CASE("load_census throws a DataError carrying the report (exit 3 in the CLI)",
          "[census][unit]") {
    const auto file = std::filesystem::temp_directory_path() / "safesite-census-load-test.csv";
    {
        std::ofstream out(file, std::ios::binary);
        out << base() << "A,2019,P1,gravel,3.1,alive,0,,0\n";
    }
    try {
        (void)safesite::census::load_census(file, options());
        FAIL("no error");
    } catch (const safesite::DataError& e) {
        CHECK(e.file() == file.string());
        CHECK(e.line() == 14);
        CHECK(e.reason().find("duplicate_row") != std::string::npos);
    }
    // Warnings alone do not stop.
    {
        std::ofstream out(file, std::ios::binary);
        out << edit(base(), "D,2019,P2,gravel,4.5,alive,1,30,0", "D,2019,P2,gravel,4.5,alive,1,30,1");
    }
    CHECK_NOTHROW(safesite::census::load_census(file, options()));
    std::filesystem::remove(file);
    CHECK_THROWS_AS(safesite::census::load_census(file, options()), safesite::DataError);
}

TEST_CASE("a missing required column is a DataError naming it", "[census][unit]") {
    try {
        (void)read(edit(base(), "status", "fate"));
        FAIL("no error");
    } catch (const safesite::DataError& e) {
        CHECK(e.line() == 1);
        CHECK(e.key() == "status");
    }
    // Without the seedling flag the seedling column is not needed.
    auto o = options();
    o.seedling_flag = false;
    CHECK(read(edit(base(), "seedling", "other"), o).valid());
    CHECK_THROWS_AS(read(edit(base(), "seedling", "other")), safesite::DataError);
}

TEST_CASE("census files with RFC 4180 quoting, CRLF line ends, a BOM and mapped columns",
          "[census][unit]") {
    // RFC 4180 section 2 rules 2, 5-7 (quoted fields with commas, doubled quotes, CRLF).
    const std::string text =
        "\xEF\xBB\xBF# invented test census\r\n"
        "tag,yr,plot,microsite,rosette_cm,status,flowered,seeds,seedling\r\n"
        "\"A \"\"1\"\"\",2018,\"P1, north\",gravel,2.0,alive,0,,0\r\n"
        "\"A \"\"1\"\"\",2019,\"P1, north\",gravel,2.5,alive,0,,0\r\n";
    auto o = options();
    o.columns = {{"plant", "tag"}, {"year", "yr"}, {"size", "rosette_cm"}};
    const Census c = read(text, o);
    INFO(c.report().render());
    REQUIRE(c.valid());
    REQUIRE(c.records().size() == 2);
    CHECK(c.records()[0].plant == "A \"1\"");
    CHECK(c.records()[0].plot == "P1, north");
    CHECK(c.records()[1].line == 4);
    CHECK(c.summary().transitions == 1);
}
