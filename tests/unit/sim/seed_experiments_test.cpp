// Simulated seed experiments and the true arrival chain of a truth file
// (docs/methods/simulation.md, "Seed experiments").
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <map>
#include <set>

#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/arrival/chain_parameters.hpp"
#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/arrival/trapping_model.hpp"
#include "safesite/census/census.hpp"
#include "safesite/error.hpp"
#include "safesite/io/atomic_file.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/sim/arrival_truth.hpp"
#include "safesite/sim/census_simulation.hpp"
#include "safesite/sim/seed_experiments.hpp"
#include "safesite/spec/model_spec.hpp"
#include "support/simulated_census.hpp"

using namespace safesite;
namespace fs = std::filesystem;

namespace {

spec::ModelSpec truth_with_experiments() {
    return spec::read_model_spec(std::string(SAFESITE_SOURCE_DIR) +
                                 "/models/ridge-truth-experiments.toml");
}

double logistic(double x) { return 1.0 / (1.0 + std::exp(-x)); }

/// τ_f by a brute-force 2-D midpoint rule over x ~ N(μ, σ_s²) and b ~ N(0, σ_b²), each on
/// ±8 SD with 1200 cells weighted by the normal density (no arrival code involved). For a
/// smooth integrand under a Gaussian weight that is e^-32 at the ends the rule converges
/// geometrically: exact to far below 1e-9 here (common practice).
double brute_force_trapping(const spec::TrappingTruthSpec& t, const std::string& form,
                            const std::string& type) {
    const int n = 1200;
    const double lim = 8.0, h = 2.0 * lim / n;
    std::vector<double> z(n), w(n);
    double wsum = 0.0;
    for (int i = 0; i < n; ++i) {
        z[i] = -lim + (i + 0.5) * h;
        w[i] = std::exp(-0.5 * z[i] * z[i]);
        wsum += w[i];
    }
    const double alpha = t.form_effect.count(form) ? t.form_effect.at(form) : 0.0;
    const double base = t.intercept + alpha + t.seed_type_effect.at(type);
    double total = 0.0;
    for (int i = 0; i < n; ++i) {
        const double eta = base + t.log_size_slope * (t.log_size_mean.at(form) + t.log_size_sd * z[i]);
        double inner = 0.0;
        for (int j = 0; j < n; ++j) inner += w[j] * logistic(eta + t.neighbour_sd * z[j]);
        total += w[i] * inner / wsum;
    }
    return total / wsum;
}

census::Census read_back(const spec::ModelSpec& truth, const sim::CensusSimulation& s) {
    return test::read_back(truth, s.census);
}

sim::SimulationOptions small_census(std::uint64_t seed) {
    sim::SimulationOptions o;
    o.plants = 300;
    o.years = 4;
    o.seed = seed;
    o.burn_in = 4;
    return o;
}

}  // namespace

TEST_CASE("true trapping averages over sizes and neighbour intercepts", "[sim][unit]") {
    const auto model = truth_with_experiments();
    const auto& t = model.experiment_truth->trapping;
    for (const char* form : {"cushion", "tussock"}) {
        for (const auto& type : t.seed_types()) {
            INFO(form << " × " << type);
            // The 400 midpoint quantiles have a slightly smaller variance than the normal
            // distribution; for |β_s σ_s| = 0.175 here the error is ≤ 4e-6 (measured while
            // writing this test against the brute-force rule). 1e-5 still catches a dropped
            // neighbour SD (which moves τ by ~5e-3) or a missing size spread (~1e-3).
            CHECK(sim::true_trapping(t, form, type) ==
                  Approx(brute_force_trapping(t, form, type)).margin(1e-5));
        }
    }
    // Without spread in size or neighbours, τ is the logistic of the linear predictor.
    auto sharp = t;
    sharp.log_size_sd = 0.0;
    sharp.neighbour_sd = 0.0;
    CHECK(sim::true_trapping(sharp, "cushion", "winged") ==
          Approx(logistic(-1.2 + 0.5 * 2.3 + 0.6 - 0.6)).margin(1e-14));
    CHECK(sim::true_trapping(sharp, "tussock", "plumed") ==
          Approx(logistic(-1.2 + 0.5 * 2.8)).margin(1e-14));
    CHECK_THROWS_AS(sim::true_trapping(t, "gravel", "winged"), UsageError);
}

TEST_CASE("the true arrival fractions are the chain's", "[sim][unit]") {
    const auto model = truth_with_experiments();
    const sim::ArrivalTruth a = sim::true_arrival(model);
    REQUIRE(a.microsites == model.microsites.labels);
    REQUIRE(a.seed_type == "winged");
    const auto& e = *model.experiment_truth;

    // The stated parameters, assembled independently of true_arrival.
    std::map<std::string, double> cover{{"cushion", 0.22}, {"tussock", 0.15}};
    std::map<std::string, double> tau, hazard;
    for (const auto& f : {"cushion", "tussock"}) tau[f] = sim::true_trapping(e.trapping, f, "winged");
    for (const auto& m : model.microsites.labels)
        hazard[m] = e.retention.hazard_per_day.at(m).at("winged");
    const auto expected = arrival::arrival_fractions(arrival::make_chain_parameters(
        model.microsites.labels, "gravel", cover, tau, hazard, 0.5, 45.0));
    double sum = 0.0;
    for (std::size_t m = 0; m < a.microsites.size(); ++m) {
        INFO(a.microsites[m]);
        // Same computation on the same inputs: equal to rounding (1e-15 common practice).
        CHECK(a.fractions[m] == Approx(expected.fractions[static_cast<Eigen::Index>(m)]).margin(1e-15));
        CHECK(a.hazard_per_day[m] == hazard.at(a.microsites[m]));
        sum += a.fractions[m];
    }
    // Not normalised: seeds are lost (Σ a + lost = 1 to rounding, arrival_chain.hpp).
    CHECK(sum < 1.0);
    CHECK(sum + a.lost == Approx(1.0).margin(1e-12));
    CHECK(a.cover[0] == Approx(1.0 - 0.22 - 0.15).margin(1e-15));  // bare ground
    CHECK(std::isnan(a.trapping[0]));

    // Closed form without re-landing (design.md §4): a seed stays where it landed until it
    // departs, so a_m = ℓ_m exp(−h_m T) with ℓ_f = c_f τ_f, ℓ_bare = 1 − Σ c_f τ_f.
    auto no_relanding = model;
    no_relanding.arrival.relanding = 0.0;
    const sim::ArrivalTruth b = sim::true_arrival(no_relanding);
    const double l_cushion = 0.22 * tau.at("cushion"), l_tussock = 0.15 * tau.at("tussock");
    const double T = 45.0;
    // exp(QT) by scaling and squaring is accurate to ~1e-13 relative here (common practice).
    CHECK(b.fractions[0] == Approx((1 - l_cushion - l_tussock) * std::exp(-0.045 * T)).epsilon(1e-12));
    CHECK(b.fractions[1] == Approx(l_cushion * std::exp(-0.006 * T)).epsilon(1e-12));
    CHECK(b.fractions[2] == Approx(l_tussock * std::exp(-0.015 * T)).epsilon(1e-12));

    // The table has one row per microsite, trapping missing for bare soil, and a row "lost".
    const auto table = sim::truth_arrival_table(a);
    CHECK(table.name == "truth-arrival");
    CHECK(table.columns == std::vector<std::string>{"microsite", "cover", "trapping",
                                                    "hazard_per_day", "landing", "fraction"});
    REQUIRE(table.rows.size() == 4);
    CHECK(std::holds_alternative<report::Missing>(table.rows[0][2]));
    CHECK(std::get<double>(table.rows[1][5]) == a.fractions[1]);
    CHECK(std::get<std::string>(table.rows[3][0]) == "lost");
    CHECK(std::get<double>(table.rows[3][5]) == a.lost);
    // The chain parameters handed on (e.g. to the true kernels) give the same fractions.
    CHECK(arrival::arrival_fractions(a.chain).fractions[1] == a.fractions[1]);

    // A fraction-only truth has no chain.
    auto fractions_only = spec::read_model_spec(std::string(SAFESITE_SOURCE_DIR) +
                                                "/models/ridge-truth.toml");
    CHECK_THROWS_AS(sim::true_arrival(fractions_only), SpecError);
}

TEST_CASE("the census of an experiment truth arrives by the chain", "[sim][unit]") {
    const auto model = truth_with_experiments();
    const sim::ArrivalTruth a = sim::true_arrival(model);
    // The same truth with the chain's fractions given directly and no experiments: the census
    // draws must be identical (the census uses exactly these fractions, and the neighbour-size
    // draws come from a stream of their own), the only difference being the extra column.
    auto direct = model;
    direct.arrival.method = spec::ArrivalMethod::fractions;
    direct.arrival.fractions = a.fractions;
    direct.experiment_truth.reset();
    const auto o = small_census(7);
    const auto with = sim::simulate_census(model, o);
    const auto without = sim::simulate_census(direct, o);
    REQUIRE(without.census.columns == std::vector<std::string>{"plant", "year", "plot",
                                                               "microsite", "size", "status",
                                                               "flowered", "seeds", "seedling",
                                                               "x", "y"});
    REQUIRE(with.census.columns.size() == without.census.columns.size() + 1);
    REQUIRE(with.census.columns[9] == "neighbour_size");
    REQUIRE(with.census.rows.size() == without.census.rows.size());
    std::map<std::string, double> size_of;   // plant → neighbour size
    std::map<std::string, std::vector<double>> log_sizes;  // form → log sizes (one per plant)
    for (std::size_t i = 0; i < with.census.rows.size(); ++i) {
        auto row = with.census.rows[i];
        const report::Cell ns = row[9];
        row.erase(row.begin() + 9);
        REQUIRE(row == without.census.rows[i]);
        const auto& plant = std::get<std::string>(row[0]);
        const auto& site = std::get<std::string>(row[3]);
        if (site == "gravel") {
            CHECK(std::holds_alternative<report::Missing>(ns));
            continue;
        }
        REQUIRE(std::holds_alternative<double>(ns));
        const double x = std::get<double>(ns);
        CHECK(x > 0.0);
        auto [it, fresh] = size_of.emplace(plant, x);
        CHECK(it->second == x);  // kept for life
        if (fresh) log_sizes[site].push_back(std::log(x));
    }
    // The neighbour sizes follow log(size) ~ N(μ_f, σ²): the mean of n logs within 4 SE
    // (σ/√n; a false alarm ~1 in 16 000, seed fixed; rounding to 4 digits moves a log by
    // < 5e-4, negligible).
    const auto& t = model.experiment_truth->trapping;
    for (const auto& [form, logs] : log_sizes) {
        REQUIRE(logs.size() > 20);
        double mean = 0.0;
        for (double l : logs) mean += l;
        mean /= static_cast<double>(logs.size());
        INFO(form << ": " << logs.size() << " plants, mean log size " << mean);
        CHECK(std::abs(mean - t.log_size_mean.at(form)) <
              4.0 * t.log_size_sd / std::sqrt(static_cast<double>(logs.size())));
    }
    // The census with the extra column still passes the census validation.
    const census::Census c = read_back(model, with);
    INFO(c.report().render());
    CHECK_FALSE(c.report().has_errors());
}

TEST_CASE("simulated experiments are written and read back", "[sim][unit]") {
    const auto model = truth_with_experiments();
    const auto s = sim::simulate_experiments(model, 20261201);
    const std::vector<std::string> forms{"cushion", "tussock"};
    // 2 forms × 40 neighbours × 3 seed types; 3 microsites × 20 stations × 3 types × 10 seeds.
    CHECK(s.trapping.size() == 2 * 40 * 3);
    std::set<std::string> seeds;
    for (const auto& c : s.retention) seeds.insert(c.seed);
    CHECK(seeds.size() == 3 * 20 * 3 * 10);

    const fs::path dir = fs::temp_directory_path() / "safesite-sim-experiments-test";
    fs::remove_all(dir);
    io::ensure_directory(dir);
    io::write_file_atomic(dir / "trapping.csv", arrival::format_trapping_csv(s.trapping));
    io::write_file_atomic(dir / "retention.csv", arrival::format_retention_csv(s.retention));
    const auto trapping = arrival::read_trapping(dir / "trapping.csv", forms);
    const auto retention = arrival::read_retention(dir / "retention.csv", model.microsites.labels);
    REQUIRE(trapping.trials.size() == s.trapping.size());
    REQUIRE(retention.checks.size() == s.retention.size());
    for (std::size_t i = 0; i < s.trapping.size(); ++i) {
        CHECK(trapping.trials[i].neighbour == s.trapping[i].neighbour);
        CHECK(trapping.trials[i].neighbour_size == s.trapping[i].neighbour_size);
        CHECK(trapping.trials[i].trapped == s.trapping[i].trapped);
    }
    for (std::size_t i = 0; i < s.retention.size(); ++i) {
        CHECK(retention.checks[i].seed == s.retention[i].seed);
        CHECK(retention.checks[i].day == s.retention[i].day);
        CHECK(retention.checks[i].present == s.retention[i].present);
    }
    fs::remove_all(dir);

    // The truth tables.
    CHECK(s.truth_arrival.rows.size() == 3 + 1);
    CHECK(s.truth_hazards.rows.size() == 3 * 3);
    CHECK(s.truth_trapping.rows.size() == 2 * 3);
}

TEST_CASE("the trapping trials follow the true trapping", "[sim][unit]") {
    // Per form × seed type, the mean over the 40 neighbours of trapped/launched estimates τ
    // (the neighbours are drawn from the size distribution and the intercept distribution
    // that τ averages over). Its SE is estimated from the spread of the 40 proportions (which
    // holds the neighbour and binomial variation); allowed 4 SE (false alarm ~1 in 16 000 per
    // check, seed fixed). Sizes recorded to 4 digits move τ by < 1e-4: negligible.
    const auto model = truth_with_experiments();
    const auto s = sim::simulate_experiments(model, 5);
    std::map<std::pair<std::string, std::string>, std::vector<double>> p;
    for (const auto& t : s.trapping)
        p[{t.form, t.seed_type}].push_back(static_cast<double>(t.trapped) / t.launched);
    REQUIRE(p.size() == 6);
    for (const auto& [key, v] : p) {
        const double tau = sim::true_trapping(model.experiment_truth->trapping, key.first, key.second);
        double mean = 0.0, ss = 0.0;
        for (double x : v) mean += x;
        mean /= static_cast<double>(v.size());
        for (double x : v) ss += (x - mean) * (x - mean);
        const double se = std::sqrt(ss / (static_cast<double>(v.size()) - 1.0) /
                                    static_cast<double>(v.size()));
        INFO(key.first << " × " << key.second << ": mean " << mean << ", τ " << tau << ", se "
                       << se);
        CHECK(std::abs(mean - tau) < 4.0 * se);
    }
}

TEST_CASE("simulated experiments are reproducible and separate from the census",
          "[sim][unit]") {
    const auto model = truth_with_experiments();
    const auto a = sim::simulate_experiments(model, 11);
    const auto b = sim::simulate_experiments(model, 11);
    const auto c = sim::simulate_experiments(model, 12);
    CHECK(arrival::format_trapping_csv(a.trapping) == arrival::format_trapping_csv(b.trapping));
    CHECK(arrival::format_retention_csv(a.retention) ==
          arrival::format_retention_csv(b.retention));
    CHECK(arrival::format_trapping_csv(a.trapping) != arrival::format_trapping_csv(c.trapping));
    CHECK(arrival::format_retention_csv(a.retention) !=
          arrival::format_retention_csv(c.retention));
    // The two forms draw their neighbours from different streams (not one shared sequence).
    CHECK(a.trapping[0].neighbour_size / std::exp(2.3) !=
          Approx(a.trapping[3 * 40].neighbour_size / std::exp(2.8)).epsilon(1e-3));
    // The census of the same seed is the same, twice.
    const auto o = small_census(11);
    CHECK(report::to_csv(sim::simulate_census(model, o).census) ==
          report::to_csv(sim::simulate_census(model, o).census));
}

TEST_CASE("simulate refuses an experiments truth without the experiments' truth", "[sim][unit]") {
    auto model = truth_with_experiments();
    model.experiment_truth.reset();
    try {
        sim::simulate_census(model, small_census(1));
        FAIL("expected a SpecError");
    } catch (const SpecError& e) {
        CHECK(e.key() == "arrival.fractions");
    }
    CHECK_THROWS_AS(sim::simulate_experiments(model, 1), SpecError);
}
