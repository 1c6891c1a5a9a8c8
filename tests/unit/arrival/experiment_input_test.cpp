// Honest failure on seed-experiment input (issue 11): header without rows, missing-value
// markers and long values in the trapping and retention files. Checked by type and location
// fields (file, line, column, column name), not wording; the length bound is the point of the
// long-value case.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/error.hpp"

namespace arr = safesite::arrival;

namespace {

const std::vector<std::string> forms = {"cushion", "tussock"};
const std::vector<std::string> microsites = {"gravel", "cushion", "tussock"};
const std::string trapping_header = "neighbour,form,neighbour_size,seed_type,launched,trapped\n";
const std::string retention_header = "seed,station,microsite,seed_type,day,present\n";

template <class F>
safesite::DataError refused(F&& f) {
    try {
        f();
    } catch (const safesite::DataError& e) {
        return e;
    }
    FAIL("expected a DataError");
    throw std::logic_error("unreachable");
}

}  // namespace

TEST_CASE("experiment files with a header and no rows are refused at the header line",
          "[arrival][unit]") {
    const auto t = refused([] { (void)arr::parse_trapping(trapping_header, forms, "trap.csv"); });
    CHECK(t.file() == "trap.csv");
    CHECK(t.line() == 1);
    const auto r = refused(
        [] { (void)arr::parse_retention("# 2024\n" + retention_header, microsites, "ret.csv"); });
    CHECK(r.file() == "ret.csv");
    CHECK(r.line() == 2);
}

TEST_CASE("missing-value markers in experiment counts are located", "[arrival][unit]") {
    const auto t = refused([] {
        (void)arr::parse_trapping(trapping_header + "c1,cushion,12.5,plumed,20,NA\n", forms, "t");
    });
    CHECK(t.line() == 2);
    CHECK(t.column() == 6);
    CHECK(t.key() == "trapped");
    const auto r = refused([] {
        (void)arr::parse_retention(retention_header +
                                       "s1,g1,gravel,plumed,0,1\n"
                                       "s1,g1,gravel,plumed,.,1\n",
                                   microsites, "r");
    });
    CHECK(r.line() == 3);
    CHECK(r.column() == 5);
    CHECK(r.key() == "day");
}

TEST_CASE("a 10 MB value in an experiment file gives a short message", "[arrival][unit]") {
    const std::string huge(10 * 1024 * 1024, 'z');
    const auto t = refused([&] {
        (void)arr::parse_trapping(trapping_header + huge + "," + huge + ",12.5,plumed,20,3\n",
                                  forms, "t");
    });
    CHECK(t.line() == 2);
    CHECK(t.key() == "form");
    CHECK(std::string(t.what()).size() < 500);
    const auto r = refused([&] {
        (void)arr::parse_retention(retention_header + huge + ",g1," + huge + ",plumed,0,1\n",
                                   microsites, "r");
    });
    CHECK(r.line() == 2);
    CHECK(r.key() == "microsite");
    CHECK(std::string(r.what()).size() < 500);
}
