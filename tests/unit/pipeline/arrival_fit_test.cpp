// The seed experiments inside a run (issue 5): fit() reads the trapping trials and retention
// checks named in the model file, fits both models, runs the arrival chain and feeds its
// fractions to establishment and to the kernels. The experiments are simulated here from
// invented truths (arrival::simulate_*), written as CSV and read back through the model file's
// column maps; the census is the invented fixture tests/data/pipeline_census_small.csv.
// Internal consistency and recovery checks (no outside source); seeds fixed, not tuned.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>
#include <string>

#include <unistd.h>

#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/arrival/experiment_simulation.hpp"
#include "safesite/arrival/trapping_model.hpp"
#include "safesite/error.hpp"
#include "safesite/pipeline/bootstrap.hpp"
#include "safesite/pipeline/check.hpp"
#include "safesite/pipeline/fit.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/pipeline/tables.hpp"
#include "safesite/spec/model_spec.hpp"

using namespace safesite;
namespace fs = std::filesystem;

namespace {

const std::vector<std::string> sites = {"gravel", "cushion"};
const std::vector<std::string> forms = {"cushion"};
const std::vector<std::string> types = {"plumed", "smooth"};
const std::uint64_t seed = 20261202;

// Invented trapping truth: logit τ = −1.2 + 0.4 log(size) + 0.8 [smooth], no neighbour effect.
arrival::TrappingTruth trapping_truth() {
    arrival::TrappingTruth t;
    t.intercept = -1.2;
    t.log_size_slope = 0.4;
    t.seed_type_effect["smooth"] = 0.8;
    return t;
}

// Invented hazards per day: bare gravel loses seeds fast, cushions hold them.
arrival::RetentionTruth retention_truth() {
    arrival::RetentionTruth r;
    r.hazard_per_day["gravel"]["plumed"] = 0.10;
    r.hazard_per_day["gravel"]["smooth"] = 0.05;
    r.hazard_per_day["cushion"]["plumed"] = 0.02;
    r.hazard_per_day["cushion"]["smooth"] = 0.015;
    return r;
}

struct Experiments {
    fs::path dir;
    std::vector<arrival::Neighbour> neighbours;
    ~Experiments() {
        std::error_code ec;
        fs::remove_all(dir, ec);
    }
};

// Rename the header's columns with the model file's maps (as a field sheet might name them).
std::string rename_header(std::string csv, const std::map<std::string, std::string>& names) {
    const auto end = csv.find('\n');
    std::string header = csv.substr(0, end), out;
    std::stringstream in(header);
    for (std::string col; std::getline(in, col, ',');) {
        const auto it = names.find(col);
        out += (out.empty() ? "" : ",") + (it == names.end() ? col : it->second);
    }
    return out + csv.substr(end);
}

void write(const fs::path& p, const std::string& text) {
    std::ofstream f(p, std::ios::binary);
    f << text;
}

// Trials and checks of a realistic size (arrival recovery test argues the retention size:
// 25 stations × 20 seeds per microsite and type give se(log ĥ) ≈ 0.05 at h = 0.02 per day).
Experiments write_experiments(const std::vector<std::string>& retention_sites = sites) {
    Experiments e;
    e.dir = fs::temp_directory_path() /
            ("safesite-arrival-fit-" + std::to_string(::getpid()) + "-" +
             std::to_string(reinterpret_cast<std::uintptr_t>(&e) % 100000));
    fs::create_directories(e.dir);
    e.neighbours = arrival::simulate_neighbours(forms, 60, 2.5, 0.5, seed);
    const auto trials = arrival::simulate_trapping(trapping_truth(), {e.neighbours, types, 20}, seed);
    arrival::RetentionDesign design;
    design.microsites = retention_sites;
    design.seed_types = types;
    design.stations_per_microsite = 25;
    design.seeds_per_station = 20;
    const auto checks = arrival::simulate_retention(retention_truth(), design, seed);
    write(e.dir / "trials.csv",
          rename_header(arrival::format_trapping_csv(trials), {{"form", "growth_form"}}));
    write(e.dir / "checks.csv",
          rename_header(arrival::format_retention_csv(checks), {{"day", "days"}}));
    return e;
}

spec::ModelSpec experiments_model(const Experiments& e) {
    spec::ModelSpec m =
        spec::read_model_spec(std::string(SAFESITE_TEST_DATA) + "/pipeline_fit.toml");
    m.data.trapping = e.dir / "trials.csv";
    m.data.retention = e.dir / "checks.csv";
    m.data.trapping_columns = {{"form", "growth_form"}};
    m.data.retention_columns = {{"day", "days"}};
    m.arrival.method = spec::ArrivalMethod::experiments;
    m.arrival.fractions.clear();
    m.arrival.cover = {{"cushion", 0.3}};
    m.arrival.exposure_days = 40;
    m.arrival.relanding = 0.5;
    m.arrival.seed_type = "plumed";
    m.arrival.trapping_formula = "trapped / launched ~ log(neighbour_size) + seed_type";
    m.arrival.retention_formula = "left ~ microsite * seed_type";
    m.scenarios.clear();
    spec::ScenarioSpec sc;
    sc.name = "cushion cover doubled";
    sc.cover_factor = {{"cushion", 2.0}};
    m.scenarios.push_back(sc);
    return m;
}

// Every kind of scenario change, one scenario each, with the chain modifiers it stands for.
std::vector<std::pair<spec::ScenarioSpec, arrival::ChainModifiers>> every_scenario_kind() {
    std::vector<std::pair<spec::ScenarioSpec, arrival::ChainModifiers>> out;
    auto add = [&](const std::string& name, auto set_spec, auto set_mod) {
        spec::ScenarioSpec s;
        s.name = name;
        arrival::ChainModifiers m;
        set_spec(s);
        set_mod(m);
        out.push_back({s, m});
    };
    add("shares", [](auto& s) { s.fraction_shares = {{"gravel", 1.0}}; },
        [](auto& m) { m.fraction_shares = {{"gravel", 1.0}}; });
    add("fractions", [](auto& s) { s.fractions = std::vector<double>{0.2, 0.8}; },
        [](auto& m) { m.fractions = {{"gravel", 0.2}, {"cushion", 0.8}}; });
    add("cover", [](auto& s) { s.cover_factor = {{"cushion", 0.5}}; },
        [](auto& m) { m.cover_factor = {{"cushion", 0.5}}; });
    add("trapping", [](auto& s) { s.trapping_odds_factor = {{"cushion", 3.0}}; },
        [](auto& m) { m.trapping_odds_factor = {{"cushion", 3.0}}; });
    add("hazard", [](auto& s) { s.hazard_factor = {{"gravel", 0.5}}; },
        [](auto& m) { m.hazard_factor = {{"gravel", 0.5}}; });
    add("exposure", [](auto& s) { s.exposure_days = 80.0; },
        [](auto& m) { m.exposure_days = 80.0; });
    add("relanding", [](auto& s) { s.relanding = 0.9; }, [](auto& m) { m.relanding = 0.9; });
    return out;
}

// The error fit() stops with; fails the test when it does not throw E.
template <class E>
E fit_error(const spec::ModelSpec& model) {
    try {
        pipeline::fit(model);
    } catch (const E& e) {
        return e;
    }
    FAIL("fit() did not throw the expected error");
    throw std::logic_error("unreachable");
}

const report::TidyTable& table(const std::vector<report::TidyTable>& ts, const std::string& n) {
    for (const auto& t : ts)
        if (t.name == n) return t;
    FAIL("no table " << n);
    throw std::logic_error("unreachable");
}

}  // namespace

TEST_CASE("fit: arrival from the seed experiments recovers the true chain and feeds the kernels",
          "[pipeline][unit]") {
    const Experiments e = write_experiments();
    const spec::ModelSpec model = experiments_model(e);
    const pipeline::FitResult r = pipeline::fit(model);
    REQUIRE(r.arrival.has_value());
    const pipeline::ArrivalFit& a = *r.arrival;
    REQUIRE(a.trapping.converged);
    REQUIRE(a.retention.converged);
    CHECK(a.trials == 120);
    CHECK(a.neighbours == 60);
    CHECK(a.seeds == 2 * 2 * 25 * 20);

    // Hazards within 15 % of the truth (issue 5 §5), every microsite × seed type.
    auto truth = retention_truth();
    REQUIRE(a.hazards.size() == 4);
    for (const auto& h : a.hazards) {
        const double t = truth.hazard_per_day[h.microsite][h.seed_type];
        INFO(h.microsite << " " << h.seed_type << ": " << h.hazard_per_day << " vs " << t);
        CHECK(std::abs(h.hazard_per_day / t - 1.0) < 0.15);
        CHECK(h.lower < h.hazard_per_day);
        CHECK(h.upper > h.hazard_per_day);
    }

    // The true chain: τ averaged over the same neighbour sizes (the census fixture has no
    // neighbour_size column, so the trial neighbours' sizes are used), true hazards.
    std::vector<double> sizes;
    for (const auto& n : e.neighbours) sizes.push_back(n.size);
    Eigen::VectorXd eta(static_cast<Eigen::Index>(sizes.size()));
    for (Eigen::Index i = 0; i < eta.size(); ++i)
        eta[i] = -1.2 + 0.4 * std::log(sizes[static_cast<std::size_t>(i)]);
    const double tau_true = arrival::average_trapping(eta);
    REQUIRE(a.trapping_by_form.size() == 2);
    CHECK(a.trapping_by_form[0].source == pipeline::NeighbourSizeSource::trials);
    CHECK(a.trapping_by_form[0].sizes == 60);
    const auto true_chain = arrival::make_chain_parameters(
        sites, "gravel", {{"cushion", 0.3}}, {{"cushion", tau_true}},
        {{"gravel", 0.10}, {"cushion", 0.02}}, 0.5, 40);
    const auto a_true = arrival::arrival_fractions(true_chain);
    for (Eigen::Index m = 0; m < 2; ++m) {
        INFO(sites[static_cast<std::size_t>(m)] << ": fitted a " << a.result.fractions[m]
                                                << ", true " << a_true.fractions[m]);
        CHECK(std::abs(a.result.fractions[m] - a_true.fractions[m]) < 0.03);
    }
    // Teeth: every true fraction is above 0.1 (about 0.11 and 0.12 here, most seeds are lost
    // within T = 40 days), so 0.03 is at most a 30 % error, not an empty bound near 0.
    INFO("true fractions " << a_true.fractions.transpose());
    CHECK(a_true.fractions.minCoeff() > 0.1);

    // The chain holds what the model file and the fits say.
    CHECK(a.chain.cover[1] == 0.3);
    CHECK(a.chain.relanding == 0.5);
    CHECK(a.chain.exposure_days == 40);
    CHECK(a.chain.trapping[1] == a.trapping_by_form[0].trapping);
    CHECK(a.trapping_by_form[0].seed_type == "plumed");
    CHECK(a.result.fractions.sum() + a.result.lost == Approx(1.0).margin(1e-12));

    // The prepared model uses the chain's fractions, and establishment divides by them:
    // ê = R / (S a) with the fixture's counts (fit_test.cpp: 934 seeds, 18 / 25 recruits).
    const auto& pm = r.model;
    CHECK(pm.arrival_source == pipeline::ArrivalSource::experiments);
    REQUIRE(pm.chain.has_value());
    CHECK((pm.arrival - a.result.fractions).cwiseAbs().maxCoeff() == 0.0);
    CHECK(r.establishment.pooled[0] ==
          Approx(18.0 / (934 * a.result.fractions[0])).epsilon(1e-12));
    CHECK(r.establishment.pooled[1] ==
          Approx(25.0 / (934 * a.result.fractions[1])).epsilon(1e-12));

    // Coefficient rows and rate summaries for both experiments.
    std::set<std::string> rates;
    for (const auto& c : r.coefficients) rates.insert(c.rate);
    CHECK(rates.count("trapping") == 1);
    CHECK(rates.count("retention") == 1);
    bool retention_summary = false;
    for (const auto& s : r.rates)
        if (s.rate == "retention") {
            retention_summary = true;
            CHECK(s.link == "cloglog");
            CHECK(s.formula.find("offset(log(interval_days))") != std::string::npos);
            CHECK(s.observations == a.intervals);
        }
    CHECK(retention_summary);

    // Output tables: the chain table's fractions and the lost share add up to 1.
    const auto tables = pipeline::fit_tables(r);
    const auto& chain = table(tables, "arrival_chain");
    REQUIRE(chain.rows.size() == 3);
    double total = 0.0;
    for (const auto& row : chain.rows) total += std::get<double>(row.back());
    CHECK(total == Approx(1.0).margin(1e-12));
    const auto& curve = table(tables, "retention_curve");
    CHECK(curve.rows.size() == 4 * 57);  // days 0..56 (last check day 56 > T = 40)
    CHECK(table(tables, "hazards").rows.size() == 4);
    CHECK(table(tables, "trapping").rows.size() == 2);
}

TEST_CASE("run: chain scenarios and cover sensitivities with fitted experiments",
          "[pipeline][unit]") {
    const Experiments e = write_experiments();
    const pipeline::RunResult r = pipeline::run(experiments_model(e));
    REQUIRE(r.analysis.scenarios.size() == 1);
    const auto& s = r.analysis.scenarios[0];
    // Doubling the cushion cover sends more seeds to cushions (more are trapped there).
    CHECK(s.arrival[1] > r.fit.model.arrival[1]);
    const auto expected = arrival::scenario_arrival(
        *r.fit.model.chain, [] {
            arrival::ChainModifiers mod;
            mod.cover_factor["cushion"] = 2.0;
            return mod;
        }());
    CHECK((s.arrival - expected.fractions).cwiseAbs().maxCoeff() < 1e-15);
    std::set<std::string> parameters;
    for (const auto& x : r.analysis.sensitivities) parameters.insert(x.parameter);
    CHECK(parameters.count("cover") == 1);
    CHECK(parameters.count("hazard") == 1);
}

TEST_CASE("run: every kind of scenario change reaches the arrival chain", "[pipeline][unit]") {
    const Experiments e = write_experiments();
    spec::ModelSpec model = experiments_model(e);
    model.scenarios.clear();
    const auto kinds = every_scenario_kind();
    for (const auto& [s, mod] : kinds) model.scenarios.push_back(s);
    const pipeline::RunResult r = pipeline::run(model);
    REQUIRE(r.analysis.scenarios.size() == kinds.size());
    for (std::size_t i = 0; i < kinds.size(); ++i) {
        const auto& got = r.analysis.scenarios[i];
        INFO(got.name);
        const auto expected = arrival::scenario_arrival(*r.fit.model.chain, kinds[i].second);
        CHECK((got.arrival - expected.fractions).cwiseAbs().maxCoeff() < 1e-15);
        // Each change moves the fractions away from the baseline.
        CHECK((got.arrival - r.fit.model.arrival).cwiseAbs().maxCoeff() > 1e-3);
    }
}

TEST_CASE("fit: experiment errors name the key or the file", "[pipeline][unit]") {
    SECTION("focal seed type absent from the experiments") {
        const Experiments e = write_experiments();
        spec::ModelSpec model = experiments_model(e);
        model.arrival.seed_type = "winged";
        const SpecError err = fit_error<SpecError>(model);
        CHECK(err.key() == "arrival.seed_type");
        CHECK(std::string(err.what()).find("winged") != std::string::npos);
    }
    SECTION("a microsite without retention checks") {
        const Experiments e = write_experiments({"gravel"});
        const DataError err = fit_error<DataError>(experiments_model(e));
        CHECK(err.file().find("checks.csv") != std::string::npos);
        CHECK(std::string(err.what()).find("cushion") != std::string::npos);
    }
    SECTION("a trapping formula reading a column the trials do not have") {
        const Experiments e = write_experiments();
        spec::ModelSpec model = experiments_model(e);
        model.arrival.trapping_formula = "trapped / launched ~ wind_speed";
        CHECK(fit_error<SpecError>(model).key() == "arrival.trapping_formula");
    }
    SECTION("cover = \"census\" takes the census share of plant records") {
        const Experiments e = write_experiments();
        spec::ModelSpec model = experiments_model(e);
        model.arrival.cover.clear();
        model.arrival.cover_from_census = true;
        const auto r = pipeline::fit(model);
        // Independent count from the fixture file: plant records alive in 2001–2003 (the
        // census years with a next census) standing under a cushion, over all of them.
        std::ifstream in(std::string(SAFESITE_TEST_DATA) + "/pipeline_census_small.csv");
        double alive = 0, cushion = 0;
        for (std::string line; std::getline(in, line);) {
            if (line.empty() || line[0] == '#' || line.rfind("plant,", 0) == 0) continue;
            std::vector<std::string> f;
            std::stringstream ss(line);
            for (std::string x; std::getline(ss, x, ',');) f.push_back(x);
            if (f[5] != "alive" || f[1] == "2004") continue;
            alive += 1;
            if (f[3] == "cushion") cushion += 1;
        }
        REQUIRE(alive > 0);
        CHECK(r.arrival->chain.cover[1] == Approx(cushion / alive).epsilon(1e-12));
    }
}

TEST_CASE("check: the seed experiments are read and summarised", "[pipeline][unit]") {
    const Experiments e = write_experiments();
    const pipeline::CheckResult r = pipeline::check(experiments_model(e));
    REQUIRE(r.trapping.has_value());
    REQUIRE(r.retention.has_value());
    const auto tables = pipeline::check_tables(r);
    const auto& trap = table(tables, "trapping_summary");
    // 60 cushion neighbours, one trial per seed type, 20 seeds launched each (the design).
    REQUIRE(trap.rows.size() == 2);
    for (const auto& row : trap.rows) {
        CHECK(std::get<std::int64_t>(row[2]) == 60);
        CHECK(std::get<std::int64_t>(row[3]) == 60);
        CHECK(std::get<std::int64_t>(row[4]) == 1200);
    }
    const auto& ret = table(tables, "retention_summary");
    // 25 stations × 20 seeds of each type per microsite.
    REQUIRE(ret.rows.size() == 4);
    for (const auto& row : ret.rows) {
        CHECK(std::get<std::int64_t>(row[2]) == 25);
        CHECK(std::get<std::int64_t>(row[3]) == 500);
        CHECK(std::get<std::int64_t>(row[5]) <= 500);
    }
}

TEST_CASE("bootstrap with the seed experiments: chain quantities get intervals",
          "[pipeline][unit]") {
    const Experiments e = write_experiments();
    const spec::ModelSpec model = experiments_model(e);
    const pipeline::RunResult base = pipeline::run(model);
    pipeline::BootstrapOptions o;
    o.replicates = 5;
    o.seed = 11;
    o.threads = 2;
    const auto boot = pipeline::bootstrap(model, base, o);
    REQUIRE(boot.failed == 0);
    std::set<std::string> quantities;
    for (const auto& b : boot.intervals) {
        quantities.insert(b.quantity);
        if (b.quantity == "hazard" || b.quantity == "trapping" || b.quantity == "arrival") {
            INFO(b.quantity << " " << b.target);
            CHECK(b.replicates == 5);
            CHECK(b.std_error > 0.0);  // neighbours and stations were resampled
            // Resampling 60 neighbours and 25 stations moves τ, h and a by a few percent at
            // most (relative SE ≈ 1/√(units)); a tenfold error would mean a broken resample.
            CHECK(b.std_error < 0.5 * b.estimate);
        }
    }
    CHECK(quantities.count("hazard") == 1);
    CHECK(quantities.count("trapping") == 1);
    CHECK(quantities.count("arrival") == 1);
    CHECK(quantities.count("scenario_delta_lambda") == 1);
}

TEST_CASE("fit: τ is averaged over the census neighbour sizes when the census has them",
          "[pipeline][unit]") {
    const Experiments e = write_experiments();
    spec::ModelSpec model = experiments_model(e);
    // The fixture census with a neighbour_size column: 20 (raw scale) for every record under
    // a cushion, empty on bare gravel.
    std::ifstream in(std::string(SAFESITE_TEST_DATA) + "/pipeline_census_small.csv");
    std::string text;
    std::size_t alive_cushion = 0;
    for (std::string line; std::getline(in, line);) {
        if (line.empty() || line[0] == '#') {
            text += line + "\n";
        } else if (line.rfind("plant,", 0) == 0) {
            text += line + ",neighbour_size\n";
        } else {
            const bool cushion = line.find(",cushion,") != std::string::npos;
            if (cushion && line.find(",alive,") != std::string::npos) ++alive_cushion;
            text += line + (cushion ? ",20\n" : ",\n");
        }
    }
    write(e.dir / "census.csv", text);
    model.data.census = e.dir / "census.csv";
    const auto r = pipeline::fit(model);
    const auto& t = r.arrival->trapping_by_form[0];
    CHECK(t.source == pipeline::NeighbourSizeSource::census);
    CHECK(t.sizes == alive_cushion);
    // Every size is 20, so τ is the fitted probability at size 20 (no random intercept).
    const double expected =
        arrival::trapping_by_form(r.arrival->trapping, "plumed", {{"cushion", {20.0}}})
            .at("cushion");
    CHECK(r.arrival->chain.trapping[1] == Approx(expected).epsilon(1e-14));
}

TEST_CASE("eval: a model without a census fits the seed experiments when asked",
          "[pipeline][unit]") {
    const Experiments e = write_experiments();
    spec::ModelSpec model =
        spec::read_model_spec(std::string(SAFESITE_SOURCE_DIR) + "/models/fixed-example.toml");
    const spec::ModelSpec with_experiments = experiments_model(e);
    model.data.trapping = with_experiments.data.trapping;
    model.data.retention = with_experiments.data.retention;
    model.data.trapping_columns = with_experiments.data.trapping_columns;
    model.data.retention_columns = with_experiments.data.retention_columns;
    model.arrival = with_experiments.arrival;
    model.scenarios.clear();
    const pipeline::RunResult r = pipeline::evaluate_fixed(model);
    REQUIRE(r.fit.arrival.has_value());
    CHECK(r.analysis.arrival_source == pipeline::ArrivalSource::experiments);
    CHECK((r.analysis.pooled().arrival - r.fit.arrival->result.fractions).cwiseAbs().maxCoeff() ==
          0.0);
    // Without a census, τ comes from the trial neighbours' sizes.
    CHECK(r.fit.arrival->trapping_by_form[0].source == pipeline::NeighbourSizeSource::trials);
    bool trapping_rows = false;
    for (const auto& c : r.fit.coefficients) trapping_rows = trapping_rows || c.rate == "trapping";
    CHECK(trapping_rows);
}
