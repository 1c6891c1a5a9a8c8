// Reading valid model files: every value lands in the right field, defaults are applied,
// paths are resolved against the model file. The expected values are those typed in the
// fixtures (tests/data/model_*.toml, invented); defaults are those documented in
// docs/formats.md.
#include <catch2/catch.hpp>

#include <filesystem>
#include <string>

#include "safesite/spec/model_spec.hpp"

namespace fs = std::filesystem;
using namespace safesite::spec;
using safesite::census::MissingRowPolicy;
using safesite::census::SizeTransform;

namespace {
fs::path fixture(const std::string& name) { return fs::path(SAFESITE_TEST_DATA) / name; }
}  // namespace

TEST_CASE("a fitted model file is read into typed values", "[spec][unit]") {
    const ModelSpec m = read_model_spec(fixture("model_fitted.toml"));
    CHECK(m.name == "Ridge forb, fitted fixture");
    CHECK(m.size_transform == SizeTransform::log);
    REQUIRE(m.data.census.has_value());
    CHECK(*m.data.census == (fixture("model_fitted.toml").parent_path() / "census_small.csv")
                                .lexically_normal());
    CHECK_FALSE(m.data.trapping.has_value());
    CHECK(m.data.census_columns.at("plant") == "tag");
    CHECK(m.data.census_columns.at("y") == "north");
    CHECK(m.data.census_columns.at("neighbour_size") == "nb_cm");
    CHECK(m.data.census_columns.size() == 12);
    CHECK(m.census.missing_row == MissingRowPolicy::notfound);
    CHECK(m.census.seedling_flag);

    CHECK(m.mesh.points == 80);
    CHECK(m.mesh.rule == QuadratureRule::gauss_legendre);
    CHECK(m.mesh.eviction == EvictionPolicy::discard);
    CHECK(m.mesh.lower.value() == -1.0);
    CHECK(m.mesh.upper.value() == 4.0);  // an integer is accepted where a number is expected
    CHECK(m.mesh.margin == 0.2);
    CHECK(m.mesh.eviction_warning == 0.02);
    CHECK(m.mesh.allow_sizes_outside);
    CHECK(m.mesh.upper_at.key == "mesh.upper");
    CHECK(m.mesh.upper_at.line > 0);

    CHECK(m.microsites.labels == std::vector<std::string>{"gravel", "cushion", "tussock"});
    CHECK(m.microsites.bare_index == 0);
    CHECK(m.microsites.index("tussock").value() == 2);

    REQUIRE(m.rates.size() == 5);
    CHECK(m.rates[0].name == "survival");
    CHECK(m.rates[4].name == "recruit_size");
    const RateSpec& s = m.rate("survival");
    CHECK(s.family == "binomial");
    CHECK(s.link == "probit");
    CHECK(s.formula == "survived ~ size + microsite");
    CHECK(s.candidates.size() == 2);
    CHECK(s.year == YearHandling::random);
    CHECK(s.groups == std::vector<std::string>{"plot"});
    CHECK(s.random_slope.value() == "size");
    CHECK_FALSE(s.is_fixed());
    CHECK(s.formula_at.line > s.at.line);
    const RateSpec& g = m.rate("growth");
    CHECK(g.link == "identity");  // canonical default
    CHECK(g.spread.value() == "size");
    CHECK(g.year == YearHandling::fixed);
    CHECK(m.rate("seeds").link == "log");
    CHECK(m.rate("flowering").link == "logit");
    CHECK(m.rate("flowering").year == YearHandling::none);
    CHECK_THROWS_AS(m.rate("mortality"), safesite::UsageError);
    CHECK_FALSE(m.all_rates_fixed());

    CHECK(m.establishment.method == EstablishmentMethod::census);
    CHECK(m.arrival.method == ArrivalMethod::fractions);
    CHECK(m.arrival.fractions == std::vector<double>{0.6, 0.25, 0.15});

    REQUIRE(m.scenarios.size() == 2);
    CHECK(m.scenarios[0].fractions.value() == std::vector<double>{1.0, 0.0, 0.0});
    CHECK(m.scenarios[1].establishment_factor.at("cushion") == 1.2);
    CHECK(m.scenarios[1].at.key == "scenario[2]");

    CHECK(m.perturbation.juvenile == JuvenileRule::seedling);
    CHECK(m.perturbation.survival_changes.size() == 5);
    CHECK(m.uncertainty.replicates == 200);
    CHECK(m.uncertainty.seed == 20261201u);
    CHECK(m.uncertainty.level == 0.9);
    CHECK(m.output.dir ==
          (fixture("model_fitted.toml").parent_path() / "results/run1").lexically_normal());
    CHECK(m.output.print_coordinates);
}

TEST_CASE("an experiments model file is read into typed values", "[spec][unit]") {
    const ModelSpec m = read_model_spec(fixture("model_experiments.toml"));
    CHECK(m.name == "model_experiments");  // default: the file's stem
    CHECK(m.size_transform == SizeTransform::sqrt);
    CHECK(*m.data.retention == fs::path("/tmp/retention.csv"));
    CHECK(*m.data.trapping == (fs::path(SAFESITE_TEST_DATA) / "trapping.csv").lexically_normal());
    CHECK(m.data.trapping_columns.at("trapped") == "n_caught");
    CHECK(m.data.retention_columns.at("present") == "there");
    CHECK(m.census.missing_row == MissingRowPolicy::error);
    CHECK_FALSE(m.census.seedling_flag);
    // [mesh] absent: the documented defaults.
    CHECK(m.mesh.points == 100);
    CHECK(m.mesh.rule == QuadratureRule::midpoint);
    CHECK(m.mesh.eviction == EvictionPolicy::boundary);
    CHECK(m.mesh.eviction_warning == 0.01);
    CHECK_FALSE(m.mesh.allow_sizes_outside);
    CHECK_FALSE(m.mesh.lower.has_value());
    CHECK(m.mesh.margin == 0.1);
    CHECK(m.rate("flowering").link == "cloglog");

    CHECK(m.establishment.method == EstablishmentMethod::fixed);
    CHECK(m.establishment.values == std::vector<double>{0.01, 0.05, 0.03});
    const ArrivalSpec& a = m.arrival;
    CHECK(a.method == ArrivalMethod::experiments);
    CHECK_FALSE(a.cover_from_census);
    CHECK(a.cover.size() == 2);
    CHECK(a.cover.at("tussock") == 0.12);
    CHECK(a.exposure_days == 150.0);
    CHECK(a.relanding == 0.6);
    CHECK(a.seed_type == "plumed");
    CHECK(a.trapping_groups == std::vector<std::string>{"neighbour"});
    CHECK(a.retention_formula == "left ~ microsite");
    CHECK(a.retention_groups == std::vector<std::string>{"station"});

    REQUIRE(m.scenarios.size() == 4);
    CHECK(m.scenarios[2].relanding.value() == 0.9);
    CHECK(m.scenarios[2].changes_chain());
    CHECK(m.scenarios[3].fraction_shares.at("gravel") == 1.0);
    CHECK(m.scenarios[3].fraction_shares.size() == 1);
    CHECK_FALSE(m.scenarios[3].changes_chain());
    CHECK(m.scenarios[0].cover_factor.at("cushion") == 0.5);
    CHECK(m.scenarios[0].changes_chain());
    CHECK(m.scenarios[1].trapping_odds_factor.at("cushion") == 2.0);
    CHECK(m.scenarios[1].hazard_factor.at("gravel") == 0.5);
    CHECK(m.scenarios[1].exposure_days.value() == 100.0);

    CHECK(m.perturbation.juvenile == JuvenileRule::size);
    CHECK(m.perturbation.juvenile_size_below.value() == 1.0);
    // [uncertainty] and [output] absent: defaults.
    CHECK(m.uncertainty.replicates == 0);
    CHECK(m.uncertainty.level == 0.95);
    CHECK(m.output.dir == (fs::path(SAFESITE_TEST_DATA) / "out").lexically_normal());
    CHECK_FALSE(m.output.print_coordinates);
}

TEST_CASE("a truth file with fixed coefficients needs no census", "[spec][unit]") {
    const ModelSpec m = read_model_spec(fixture("model_truth.toml"));
    CHECK(m.all_rates_fixed());
    CHECK_FALSE(m.data.census.has_value());
    const RateSpec& s = m.rate("survival");
    REQUIRE(s.is_fixed());
    CHECK(s.coefficients->at("(Intercept)") == -0.5);
    CHECK(s.coefficients->at("microsite[cushion]") == 0.4);
    CHECK(s.year_sd.value() == 0.3);
    CHECK(m.rate("growth").spread_coefficients == std::vector<double>{-0.7, -0.1});
    CHECK(m.rate("growth").spread.value() == "size");  // default spread column
    CHECK(m.rate("flowering").coefficients->at("(Intercept)") == -3.0);
    CHECK(m.rate("seeds").theta.value() == 2.0);
    CHECK(m.rate("recruit_size").sd.value() == 0.4);
    CHECK(m.arrival.fractions == std::vector<double>{0.7, 0.3});
    CHECK(m.scenarios.empty());
    CHECK(m.perturbation.survival_changes.empty());
    CHECK(m.size_transform == SizeTransform::log1p);
}

TEST_CASE("census reading options come from the model file", "[spec][unit]") {
    const ModelSpec m = read_model_spec(fixture("model_fitted.toml"));
    const auto o = to_census_options(m);
    CHECK(o.columns.at("size") == "rosette_cm");
    CHECK(o.transform == SizeTransform::log);
    CHECK(o.microsites == m.microsites.labels);
    CHECK(o.bare.value() == 0);  // bare = "gravel", the first label of the fixture
    CHECK(o.columns.at("neighbour_size") == "nb_cm");
    CHECK(o.missing_row == MissingRowPolicy::notfound);
    CHECK(o.seedling_flag);
}
