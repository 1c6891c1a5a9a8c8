// Model checking (docs/methods/model-checking.md): the small rules behind the check_* tables
// against outside references, and the tables of the demo run against the truth the demo
// census was simulated from (models/ridge-truth-experiments.toml).
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <map>
#include <set>
#include <string>

#include "safesite/pipeline/model_check.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/spec/model_spec.hpp"

using namespace safesite;

namespace {

const report::TidyTable& table(const std::vector<report::TidyTable>& tables,
                               const std::string& name) {
    for (const auto& t : tables)
        if (t.name == name) return t;
    FAIL("no table " << name);
    return tables.front();
}

double num(const report::TidyTable& t, const std::vector<report::Cell>& row,
           const std::string& column) {
    const auto& c = row[report::column_index(t, column)];
    if (const auto* d = std::get_if<double>(&c)) return *d;
    if (const auto* i = std::get_if<std::int64_t>(&c)) return static_cast<double>(*i);
    return NAN;
}

std::string txt(const report::TidyTable& t, const std::vector<report::Cell>& row,
                const std::string& column) {
    return report::format_cell(row[report::column_index(t, column)]);
}

}  // namespace

TEST_CASE("Wilson interval: Newcombe (1998) Table I examples", "[pipeline][unit][check]") {
    // Newcombe RG (1998) Stat. Med. 17:857-872, Table I, method 3 (score interval without
    // continuity correction, Wilson 1927), 95 %. Values from memory; they agree to the 4
    // decimals printed with a hand computation of Wilson's formula (Python, z = 1.959964).
    // Margin 5e-5: the table's rounding to 4 decimals.
    struct Case {
        std::int64_t k, n;
        double lower, upper;
    };
    const Case cases[] = {{81, 263, 0.2553, 0.3662},
                          {15, 148, 0.0624, 0.1605},
                          {0, 20, 0.0000, 0.1611},
                          {1, 29, 0.0061, 0.1718},
                          {29, 29, 0.8830, 1.0000}};
    for (const auto& c : cases) {
        const auto w = pipeline::wilson_interval(c.k, c.n);
        CHECK(w.proportion == Approx(static_cast<double>(c.k) / c.n).margin(1e-15));
        CHECK(w.lower == Approx(c.lower).margin(5e-5));
        CHECK(w.upper == Approx(c.upper).margin(5e-5));
    }
}

TEST_CASE("equal-count bins: count rule and assignment", "[pipeline][unit][check]") {
    // B = min(15, max(1, floor(n / 30))) (docs/methods/model-checking.md).
    CHECK(pipeline::equal_count_bin_count(0) == 1);
    CHECK(pipeline::equal_count_bin_count(29) == 1);
    CHECK(pipeline::equal_count_bin_count(60) == 2);
    CHECK(pipeline::equal_count_bin_count(449) == 14);
    CHECK(pipeline::equal_count_bin_count(100000) == 15);
    // 10 values in 3 bins: floor(i * 3 / 10) = 0,0,0,0,1,1,1,2,2,2 (hand-derived).
    CHECK(pipeline::equal_count_bins(10, 3) ==
          std::vector<std::size_t>{0, 0, 0, 0, 1, 1, 1, 2, 2, 2});
    // Sizes differ by at most one for any n, B (common practice for equal-count bins).
    for (std::size_t n : {31u, 100u, 977u})
        for (std::size_t b : {1u, 4u, 15u}) {
            std::map<std::size_t, std::size_t> size;
            for (auto k : pipeline::equal_count_bins(n, b)) ++size[k];
            REQUIRE(size.size() == b);
            std::size_t lo = n, hi = 0;
            for (const auto& [k, s] : size) {
                lo = std::min(lo, s);
                hi = std::max(hi, s);
            }
            CHECK(hi - lo <= 1);
        }
}

TEST_CASE("Blom positions and normal scores", "[pipeline][unit][check]") {
    // Blom (1958): p_i = (i - 3/8) / (n + 1/4); n = 5 by hand: 5/42, 13/42, 1/2, 29/42, 37/42.
    const auto p = pipeline::blom_positions(5);
    REQUIRE(p.size() == 5);
    CHECK(p[0] == Approx(5.0 / 42.0).margin(1e-15));
    CHECK(p[1] == Approx(13.0 / 42.0).margin(1e-15));
    CHECK(p[2] == Approx(0.5).margin(1e-15));
    CHECK(p[4] == Approx(37.0 / 42.0).margin(1e-15));
    // Normal quantiles of these positions from Python 3's statistics.NormalDist().inv_cdf
    // (a general library): -1.1797611176118603, -0.497200570681554, 0, and symmetric.
    // Margin 1e-12: both are double-precision inverse normal CDFs.
    const auto q = pipeline::normal_scores(5);
    CHECK(q[0] == Approx(-1.1797611176118603).margin(1e-12));
    CHECK(q[1] == Approx(-0.497200570681554).margin(1e-12));
    CHECK(q[2] == Approx(0.0).margin(1e-12));
    CHECK(q[3] == Approx(0.497200570681554).margin(1e-12));
    CHECK(q[4] == Approx(1.1797611176118603).margin(1e-12));
}

TEST_CASE("deterministic subsample, Sturges bins and surface stride", "[pipeline][unit][check]") {
    // n <= max: every row, in order.
    CHECK(pipeline::subsample_rows(4, 10) == std::vector<std::size_t>{0, 1, 2, 3});
    // n = 10, m = 4: floor((2j + 1) * 10 / 8) = 1, 3, 6, 8 (hand-derived).
    CHECK(pipeline::subsample_rows(10, 4) == std::vector<std::size_t>{1, 3, 6, 8});
    const auto big = pipeline::subsample_rows(123457, 2000);
    REQUIRE(big.size() == 2000);
    CHECK(std::is_sorted(big.begin(), big.end()));
    CHECK(std::set<std::size_t>(big.begin(), big.end()).size() == 2000);
    CHECK(big.back() < 123457);
    // Sturges (1926): ceil(log2 n) + 1: n = 100 -> 8, n = 1024 -> 11, n = 1 -> 1.
    CHECK(pipeline::sturges_bins(100) == 8);
    CHECK(pipeline::sturges_bins(1024) == 11);
    CHECK(pipeline::sturges_bins(1) == 1);
    // Stride: one block of 100 nodes -> side 50 -> stride 2; 24 blocks -> side
    // floor(sqrt(20000/24)) = 28 -> stride ceil(100/28) = 4 (25 cells); a 40-node mesh stays.
    CHECK(pipeline::surface_stride(100, 1) == 2);
    CHECK(pipeline::surface_stride(100, 24) == 4);
    CHECK(pipeline::surface_stride(40, 1) == 1);
    CHECK(pipeline::surface_stride(400, 10000) == 80);  // side at least 5
}

TEST_CASE("model checks of the demo census agree with the truth it was simulated from",
          "[pipeline][unit][check]") {
    // demo/census.csv was simulated from models/ridge-truth-experiments.toml (the header of
    // models/ridge.toml), fitted here with models/ridge.toml. Truth: survival
    // logit⁻¹(-0.5 + 1.1 z + β_m), β = 0, 0.6, 0.3 (gravel, cushion, tussock), random year
    // effects SD 0.35; growth Gaussian with mean 0.55 + 0.78 z and SD exp(-0.9 - 0.15 z),
    // year effects on the mean only, fitted with the same family and fixed year effects.
    const std::filesystem::path root = SAFESITE_SOURCE_DIR;
    spec::ModelSpec model = spec::read_model_spec(root / "models/ridge.toml");
    model.scenarios.clear();
    model.perturbation.survival_changes.clear();
    const pipeline::RunResult result = pipeline::run(model);
    REQUIRE(result.data);
    const auto tables = pipeline::model_check_tables(result.fit, result.analysis, &*result.data);
    std::set<std::string> names;
    for (const auto& t : tables) {
        names.insert(t.name);
        CHECK(t.name.rfind("check_", 0) == 0);
        report::check_table(t);
    }
    CHECK(names == std::set<std::string>{"check_binned", "check_curves", "check_growth",
                                         "check_seeds", "check_recruit_sizes", "check_trapping",
                                         "check_trapping_curve", "check_retention",
                                         "check_size_distribution", "check_surfaces"});

    SECTION("binned survival and flowering: the truth lies within each bin's interval, loosely") {
        // Argument: the random year effects (SD 0.35 on the logit scale) attenuate the
        // population-averaged curve by a factor of about 1/sqrt(1 + 0.346 * 0.35^2) = 0.98
        // (Zeger, Liang & Albert 1988, from memory), and averaging over a bin's size range
        // moves it a little more; so a bin may miss the conditional truth by slightly more
        // than its 95 % half-width. We require |observed - truth at the bin's mean size| to
        // be within the Wilson half-width + 0.03 for at least 90 % of the bins.
        const auto& t = table(tables, "check_binned");
        const std::map<std::string, double> beta{{"gravel", 0.0}, {"cushion", 0.6},
                                                 {"tussock", 0.3}};
        // Flowering: logit⁻¹(-5 + 2.2 z), year SD 0.4 (attenuation factor about 0.97).
        std::map<std::string, std::size_t> bins, close;
        for (const auto& row : t.rows) {
            const std::string rate = txt(t, row, "rate");
            const double z = num(t, row, "size_mean");
            const double eta = rate == "survival"
                                   ? -0.5 + 1.1 * z + beta.at(txt(t, row, "microsite"))
                                   : -5.0 + 2.2 * z;
            const double truth = 1.0 / (1.0 + std::exp(-eta));
            const double p = num(t, row, "proportion");
            const double half = 0.5 * (num(t, row, "upper") - num(t, row, "lower"));
            ++bins[rate];
            if (std::abs(p - truth) <= half + 0.03) ++close[rate];
            // The criterion tells a wrong curve apart: the truth shifted by +1 on the logit
            // scale (common practice: a sanity check that the test can fail).
            const double wrong = 1.0 / (1.0 + std::exp(-(eta + 1.0)));
            if (std::abs(p - wrong) <= half + 0.03) ++close[rate + " shifted"];
            CHECK(num(t, row, "plants") >= 30);  // the bin-count rule
        }
        for (const char* rate : {"survival", "flowering"}) {
            INFO(rate << ": " << close[rate] << " of " << bins[rate] << " bins close");
            REQUIRE(bins[rate] >= 20);
            CHECK(static_cast<double>(close[rate]) >= 0.9 * static_cast<double>(bins[rate]));
        }
        // Survival bins tell the shifted curve apart. Flowering bins less so (54 of 90 stayed
        // "close" when this was written): most lie where flowering is near 0 and a logit shift
        // moves the probability little, so the flowering criterion is loose there.
        INFO("survival, shifted truth: " << close["survival shifted"] << " of "
                                         << bins["survival"] << " bins close");
        CHECK(static_cast<double>(close["survival shifted"]) <
              0.6 * static_cast<double>(bins["survival"]));
    }

    SECTION("growth residuals are close to standard normal") {
        // Argument: the fitted growth family is the true one, so the standardised residuals
        // are about N(0, 1): mean within ±0.05, SD within 1 ± 0.05 and a share beyond ±2 in
        // [0.03, 0.065] around the normal 0.0455 (sampling SD about 0.002 with thousands of
        // residuals; the margins also allow the estimation error of the fits).
        const auto& t = table(tables, "check_growth");
        REQUIRE(t.rows.size() > 1000);
        double sum = 0.0, sum2 = 0.0, beyond = 0.0;
        for (const auto& row : t.rows) {
            const double r = num(t, row, "residual");
            sum += r;
            sum2 += r * r;
            if (std::abs(r) > 2.0) beyond += 1.0;
        }
        const double n = static_cast<double>(t.rows.size());
        const double mean = sum / n;
        CHECK(std::abs(mean) < 0.05);
        CHECK(std::sqrt(sum2 / n - mean * mean) == Approx(1.0).margin(0.05));
        CHECK(beyond / n > 0.03);
        CHECK(beyond / n < 0.065);
        // Normal scores run from about -3.5 to 3.5 and pair with the residuals by rank.
        for (const auto& row : t.rows) CHECK(std::isfinite(num(t, row, "normal_score")));
    }

    SECTION("size distribution shares and surfaces are consistent") {
        const auto& d = table(tables, "check_size_distribution");
        std::map<std::string, double> total;
        for (const auto& row : d.rows) total[txt(d, row, "source")] += num(d, row, "proportion");
        for (const auto& [source, s] : total) CHECK(s == Approx(1.0).margin(1e-9));
        // Elasticities sum to 1 over all blocks (Caswell 2001 §9.2); downsampling sums cells.
        const auto& k = table(tables, "check_surfaces");
        double e = 0.0;
        std::map<std::string, std::size_t> cells;
        for (const auto& row : k.rows) {
            if (txt(k, row, "surface") == "elasticity") e += num(k, row, "value");
            ++cells[txt(k, row, "surface") + "|" + txt(k, row, "to_class") + "|" +
                    txt(k, row, "from_class")];
        }
        CHECK(e == Approx(1.0).margin(1e-9));
        for (const auto& [block, n] : cells) CHECK(n <= 50 * 50);
        CHECK(k.rows.size() <= 3 * 21000);
    }
}
