// Trapping and retention CSV readers (docs/formats.md), interval conversion and simulated
// experiments. Failures are checked by error type and location fields (style guide 4.15).
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <iterator>
#include <map>
#include <string>

#include "safesite/arrival/experiment_simulation.hpp"
#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/error.hpp"

namespace arr = safesite::arrival;

namespace {

const std::vector<std::string> forms = {"cushion", "tussock"};
const std::vector<std::string> microsites = {"gravel", "cushion", "tussock"};

const char* trapping_csv =
    "# invented example\n"
    "neighbour,form,neighbour_size,seed_type,launched,trapped\n"
    "c1,cushion,12.5,plumed,20,7\n"
    "c1,cushion,12.5,smooth,20,15\n"
    "t1,tussock,30,plumed,20,2\n";

const char* retention_csv =
    "seed,station,microsite,seed_type,day,present\n"
    "s1,g1,gravel,plumed,0,1\n"
    "s2,c1,cushion,plumed,0,1\n"
    "s1,g1,gravel,plumed,1,1\n"
    "s2,c1,cushion,plumed,2.5,1\n"
    "s1,g1,gravel,plumed,3,0\n"
    "s2,c1,cushion,plumed,7,1\n"
    "s1,g1,gravel,plumed,7,0\n";

// Expect a DataError at the given line and column name.
template <class F>
void expect_data_error(F&& f, std::size_t line, const std::string& key) {
    try {
        f();
        FAIL("no DataError thrown");
    } catch (const safesite::DataError& e) {
        INFO(e.what());
        CHECK(e.line() == line);
        CHECK(e.key() == key);
    }
}

std::string with_row(const char* base, const std::string& row) { return base + row + "\n"; }

}  // namespace

TEST_CASE("trapping trials are read and validated", "[arrival][unit]") {
    const auto data = arr::parse_trapping(trapping_csv, forms, "trap.csv");
    REQUIRE(data.trials.size() == 3);
    CHECK(data.trials[1].seed_type == "smooth");
    CHECK(data.trials[1].trapped == 15);
    CHECK(data.trials[2].neighbour_size == 30.0);
    CHECK(data.trials[0].line == 3);

    // Line 6 is the appended row (comment, header, three rows).
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "t2,tussock,3,plumed,20,21"), forms); },
                      6, "trapped");
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "t2,tussock,3,plumed,0,0"), forms); },
                      6, "launched");
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "t2,tussock,-3,plumed,20,1"), forms); },
                      6, "neighbour_size");
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "t2,moss,3,plumed,20,1"), forms); },
                      6, "form");
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "c1,tussock,12.5,winged,20,1"), forms); },
                      6, "form");
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "c1,cushion,12.5,plumed,20,1"), forms); },
                      6, "seed_type");
    expect_data_error([&] { arr::parse_trapping(with_row(trapping_csv, "t2,tussock,3,plumed,20,1.5"), forms); },
                      6, "trapped");
    // A missing column is reported at the header line.
    expect_data_error([&] { arr::parse_trapping("neighbour,form,seed_type,launched,trapped\n", forms); },
                      1, "neighbour_size");
}

TEST_CASE("trapping trials round-trip through CSV and become a table", "[arrival][unit]") {
    const auto data = arr::parse_trapping(trapping_csv, forms);
    const std::string text = arr::format_trapping_csv(data.trials);
    const auto again = arr::parse_trapping(text, forms);
    REQUIRE(again.trials.size() == data.trials.size());
    for (std::size_t i = 0; i < data.trials.size(); ++i) {
        CHECK(again.trials[i].neighbour == data.trials[i].neighbour);
        CHECK(again.trials[i].neighbour_size == data.trials[i].neighbour_size);
        CHECK(again.trials[i].trapped == data.trials[i].trapped);
    }
    const auto table = arr::trapping_table(data.trials, forms);
    CHECK(table.rows() == 3);
    CHECK(table.categorical("form").levels == forms);
    CHECK(table.numeric("trapped")[1] == 15.0);
    CHECK(table.numeric("launched")[2] == 20.0);
}

TEST_CASE("retention checks: impossible histories name the seed and the line",
          "[arrival][unit]") {
    const auto data = arr::parse_retention(retention_csv, microsites, "ret.csv");
    CHECK(data.checks.size() == 7);
    // Appended rows are line 9 (header + 7 rows).
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s1,g1,gravel,plumed,14,1"), microsites); },
                      9, "present");   // present again after absent
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s2,c1,cushion,plumed,7,1"), microsites); },
                      9, "day");       // day not strictly increasing
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s3,c1,cushion,plumed,1,1"), microsites); },
                      9, "day");       // no day-0 placement
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s3,c1,cushion,plumed,0,0"), microsites); },
                      9, "present");   // absent at placement
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s2,c1,tussock,plumed,9,1"), microsites); },
                      9, "microsite"); // microsite changes
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s3,x1,moss,plumed,0,1"), microsites); },
                      9, "microsite"); // unknown microsite
    expect_data_error([&] { arr::parse_retention(with_row(retention_csv, "s3,c1,cushion,plumed,0,2"), microsites); },
                      9, "present");   // not a 0/1 flag
    try {
        arr::parse_retention(with_row(retention_csv, "s1,g1,gravel,plumed,14,1"), microsites);
    } catch (const safesite::DataError& e) {
        CHECK(e.reason().find("\"s1\"") != std::string::npos);  // the seed is named
    }
}

TEST_CASE("retention histories become at-risk intervals", "[arrival][unit]") {
    const auto data = arr::parse_retention(retention_csv, microsites);
    const auto iv = arr::retention_intervals(data.checks);
    // s1: 0→1 stays, 1→3 leaves, (3→7 not at risk); s2: 0→2.5, 2.5→7 both stay.
    REQUIRE(iv.size() == 4);
    CHECK(iv[0].seed == "s1");
    CHECK(iv[0].interval_days == 1.0);
    CHECK_FALSE(iv[0].left);
    CHECK(iv[1].interval_days == 2.0);
    CHECK(iv[1].left);
    CHECK(iv[2].seed == "s2");
    CHECK(iv[2].interval_days == 2.5);
    CHECK(iv[3].start_day == 2.5);
    CHECK(iv[3].interval_days == 4.5);
    CHECK_FALSE(iv[3].left);
    const auto table = arr::interval_table(iv, microsites);
    CHECK(table.rows() == 4);
    CHECK(table.categorical("microsite").levels == std::vector<std::string>{"gravel", "cushion"});
    CHECK(table.numeric("left") == std::vector<double>{0, 1, 0, 0});
    CHECK(table.numeric("log_interval")[3] == Approx(std::log(4.5)).margin(1e-15));
}

TEST_CASE("simulated experiments: reproducible, valid and consistent with the truth",
          "[arrival][unit]") {
    arr::TrappingTruth trap;
    trap.intercept = -2.0;
    trap.log_size_slope = 0.6;
    trap.form_effect["tussock"] = -0.8;
    trap.seed_type_effect["smooth"] = 1.0;
    const auto neighbours = arr::simulate_neighbours(forms, 30, 2.5, 0.5, 7);
    arr::TrappingDesign td{neighbours, {"plumed", "winged", "smooth"}, 20};
    const auto trials = arr::simulate_trapping(trap, td, 7);
    CHECK(trials.size() == 180);
    // Same seed → identical output; another replicate → different output.
    CHECK(arr::format_trapping_csv(trials) == arr::format_trapping_csv(arr::simulate_trapping(trap, td, 7)));
    CHECK(arr::format_trapping_csv(trials) != arr::format_trapping_csv(arr::simulate_trapping(trap, td, 7, 1)));
    // The CSV passes our own validation.
    CHECK(arr::parse_trapping(arr::format_trapping_csv(trials), forms).trials.size() == 180);
    // Mean trapped share vs the mean true probability: 60 neighbours × 20 seeds = 1200 seeds
    // per seed type, binomial SD of the share ≤ 0.5/√1200 ≈ 0.0144; 0.05 is > 3 SD.
    for (const std::string type : {"plumed", "smooth"}) {
        double trapped = 0, launched = 0, expected = 0;
        for (const auto& t : trials) {
            if (t.seed_type != type) continue;
            trapped += static_cast<double>(t.trapped);
            launched += static_cast<double>(t.launched);
            expected += static_cast<double>(t.launched) *
                        arr::trapping_probability(trap, t.form, type, t.neighbour_size);
        }
        CHECK(trapped / launched == Approx(expected / launched).margin(0.05));
    }

    arr::RetentionTruth ret;
    ret.hazard_per_day["gravel"] = {{"plumed", 0.10}};
    ret.hazard_per_day["cushion"] = {{"plumed", 0.01}};
    arr::RetentionDesign rd;
    rd.microsites = {"gravel", "cushion"};
    rd.seed_types = {"plumed"};
    rd.stations_per_microsite = 10;
    rd.seeds_per_station = 20;
    const auto checks = arr::simulate_retention(ret, rd, 11);
    CHECK(arr::format_retention_csv(checks) == arr::format_retention_csv(arr::simulate_retention(ret, rd, 11)));
    const auto parsed = arr::parse_retention(arr::format_retention_csv(checks), microsites);
    CHECK(parsed.checks.size() == checks.size());
    // Share of gravel seeds present at day 7 on the regular schedule vs exp(−0.7) = 0.497:
    // ~160 regular seeds, binomial SD ≈ 0.04; margin 0.12 is 3 SD.
    // Every irregular seed has a day-2 row (its first check after placement); regular seeds
    // never do.
    std::map<std::string, bool> irregular, alive7, all;
    for (const auto& c : checks) {
        if (c.microsite != "gravel") continue;
        all[c.seed] = true;
        if (c.day == 2) irregular[c.seed] = true;
        if (c.day == 7 && c.present) alive7[c.seed] = true;
    }
    double at_risk = 0, present = 0;
    for (const auto& [seed, _] : all) {
        if (irregular.count(seed)) continue;
        at_risk += 1;
        present += alive7.count(seed) ? 1 : 0;
    }
    CHECK(at_risk > 100);
    CHECK(present / at_risk == Approx(std::exp(-0.7)).margin(0.12));
}

TEST_CASE("the CSV examples in docs/formats.md are valid arrival data", "[arrival][unit]") {
    // Keeps the format reference honest: the fenced csv blocks under "Trapping trials" and
    // "Retention checks" must pass our own readers.
    std::ifstream in(std::string(SAFESITE_SOURCE_DIR) + "/docs/formats.md");
    REQUIRE(in);
    const std::string doc((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    auto block_after = [&](const std::string& heading) {
        const auto h = doc.find(heading);
        REQUIRE(h != std::string::npos);
        const auto start = doc.find("```csv\n", h);
        REQUIRE(start != std::string::npos);
        const auto end = doc.find("```", start + 7);
        return doc.substr(start + 7, end - start - 7);
    };
    CHECK(arr::parse_trapping(block_after("## Trapping trials"), forms).trials.size() == 3);
    CHECK(arr::parse_retention(block_after("## Retention checks"), microsites).checks.size() == 5);
}
