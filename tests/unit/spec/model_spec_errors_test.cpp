// Refused model files: each rule of docs/formats.md ("Model file") gives a SpecError with the
// file, the line of the offending key and its dotted key path (style guide 4.15: checked by
// type and location, not by wording). Hints are checked only for the suggested name.
#include <catch2/catch.hpp>

#include <stdexcept>
#include <string>

#include "safesite/spec/model_spec.hpp"
#include "support/spec_text.hpp"

using safesite::SpecError;
using safesite::spec::parse_model_spec;
using safesite::test::line_of;
using safesite::test::mentions;
using safesite::test::replace;

namespace {

// A valid model (checked in model_spec_errors_test); each case edits one thing.
const std::string k_base = safesite::test::base_model_text();

SpecError refused(const std::string& text) { return safesite::test::refused(text, "dir/m.toml"); }

}  // namespace

TEST_CASE("the base model of the error tests is valid", "[spec][unit]") {
    const auto m = parse_model_spec(k_base, "dir/m.toml");
    CHECK(m.keys.size() == 16);
    CHECK(*m.data.census == std::filesystem::path("dir/census.csv"));
}

TEST_CASE("unknown keys and tables are refused with a did-you-mean hint", "[spec][unit]") {
    {
        const auto text = replace(k_base, "points = 50", "point = 50");
        const auto e = refused(text);
        CHECK(e.file() == "dir/m.toml");
        CHECK(e.line() == line_of(text, "point = 50"));
        CHECK(e.key() == "mesh.point");
        CHECK(mentions(e, "'points'"));
    }
    {
        const auto text = replace(k_base, "[mesh]", "[mesch]");
        const auto e = refused(text);
        CHECK(e.key() == "mesch");
        CHECK(e.line() == line_of(text, "[mesch]"));
        CHECK(mentions(e, "'mesh'"));
    }
    {
        const auto text = replace(k_base, "[rates.seeds]", "[rates.sedes]");
        const auto e = refused(text);
        CHECK(e.key() == "rates.sedes");
        CHECK(mentions(e, "'seeds'"));
    }
    {
        const auto text = replace(k_base, "[model]\n", "[model]\nnmae = \"x\"\n");
        const auto e = refused(text);
        CHECK(e.key() == "model.nmae");
        CHECK(mentions(e, "'name'"));
        CHECK(e.line() == 2);
    }
    {  // far from every key: no hint, but the list of keys
        const auto e = refused(replace(k_base, "points = 50", "colour = \"red\""));
        CHECK(e.key() == "mesh.colour");
        CHECK(mentions(e, "margin"));
    }
    {  // unknown column in [data.columns]
        const auto text = k_base + "\n[data.columns]\nplnt = \"tag\"\n";
        const auto e = refused(text);
        CHECK(e.key() == "data.columns.plnt");
        CHECK(e.line() == line_of(text, "plnt"));
        CHECK(mentions(e, "'plant'"));
    }
}

TEST_CASE("wrong value types are refused", "[spec][unit]") {
    {
        const auto text = replace(k_base, "points = 50", "points = \"many\"");
        const auto e = refused(text);
        CHECK(e.key() == "mesh.points");
        CHECK(e.line() == line_of(text, "points"));
    }
    CHECK(refused(replace(k_base, "points = 50", "points = 10.5")).key() == "mesh.points");
    CHECK(refused(replace(k_base, "bare = \"gravel\"", "bare = [\"gravel\"]")).key() ==
          "microsites.bare");
    CHECK(refused(replace(k_base, "labels = [\"gravel\", \"cushion\", \"tussock\"]",
                          "labels = [\"gravel\", 2]"))
              .key() == "microsites.labels");
    CHECK(refused(replace(k_base, "tussock = 0.2 }", "tussock = \"0.2\" }")).key() ==
          "arrival.fractions.tussock");
    CHECK(refused(k_base + "[census]\nseedling_flag = 1\n").key() == "census.seedling_flag");
    CHECK(refused(k_base + "[[scenario]]\nname = 3\n").key() == "scenario[1].name");
}

TEST_CASE("missing required keys and tables are refused", "[spec][unit]") {
    {
        const auto text = replace(k_base, "size_transform = \"log\"", "");
        const auto e = refused(text);
        CHECK(e.key() == "model.size_transform");
        CHECK(e.line() == 1);  // the [model] header
    }
    CHECK(refused(replace(k_base, "[rates.seeds]\nfamily = \"poisson\"\nformula = \"seeds ~ "
                                  "size\"\n",
                          ""))
              .key() == "rates.seeds");
    {
        const auto text = replace(k_base, "family = \"poisson\"\n", "");
        const auto e = refused(text);
        CHECK(e.key() == "rates.seeds.family");
        CHECK(e.line() == line_of(text, "[rates.seeds]"));
    }
    CHECK(refused(replace(k_base, "bare = \"gravel\"", "")).key() == "microsites.bare");
    CHECK(refused(replace(k_base, "fractions = { gravel = 0.5, cushion = 0.3, tussock = 0.2 }",
                          ""))
              .key() == "arrival.fractions");
    CHECK(refused(k_base + "[[scenario]]\ncover_factor = { cushion = 0.5 }\n").key() ==
          "scenario[1].name");
    CHECK(refused(k_base + "[perturbation]\njuvenile = \"seedling\"\n").key() ==
          "perturbation.survival_changes");
    CHECK(refused(k_base + "[perturbation]\njuvenile = \"size\"\nsurvival_changes = [0.1]\n")
              .key() == "perturbation.juvenile_size_below");
    // A missing top-level table has no line.
    const auto e = refused(replace(k_base, "[arrival]\n", "[other]\n"));
    CHECK(e.key() == "other");
}

TEST_CASE("values out of range are refused", "[spec][unit]") {
    {
        const auto text = replace(k_base, "points = 50", "points = 1");
        const auto e = refused(text);
        CHECK(e.key() == "mesh.points");
        CHECK(e.line() == line_of(text, "points = 1"));
    }
    CHECK(refused(replace(k_base, "points = 50", "lower = 2.0\nupper = 2.0")).key() ==
          "mesh.upper");
    CHECK(refused(replace(k_base, "points = 50", "margin = -0.1")).key() == "mesh.margin");
    // Fractions: each in [0, 1], sum 1 within 1e-9.
    {
        const auto text = replace(k_base, "tussock = 0.2 }", "tussock = 0.25 }");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.fractions");
        CHECK(e.line() == line_of(text, "fractions"));
    }
    CHECK_NOTHROW(parse_model_spec(replace(k_base, "tussock = 0.2 }", "tussock = 0.2000000001 }"),
                                   "m.toml"));
    CHECK(refused(replace(k_base, "tussock = 0.2 }", "tussock = 0.20000001 }")).key() ==
          "arrival.fractions");
    CHECK(refused(replace(k_base, "gravel = 0.5, cushion = 0.3", "gravel = 1.1, cushion = 0.3"))
              .key() == "arrival.fractions.gravel");
    CHECK(refused(k_base + "[establishment]\nmethod = \"fixed\"\nvalues = { gravel = 0.1, "
                           "cushion = 1.2, tussock = 0.1 }\n")
              .key() == "establishment.values.cushion");
    CHECK(refused(k_base + "[uncertainty]\nlevel = 1.0\n").key() == "uncertainty.level");
    CHECK(refused(k_base + "[uncertainty]\nreplicates = -1\n").key() == "uncertainty.replicates");
    CHECK(refused(k_base + "[perturbation]\nsurvival_changes = [-1.5]\n").key() ==
          "perturbation.survival_changes");
    CHECK(refused(k_base + "[[scenario]]\nname = \"a\"\nestablishment_factor = { cushion = -1 "
                           "}\n")
              .key() == "scenario[1].establishment_factor.cushion");
}

TEST_CASE("microsite labels must be known and complete", "[spec][unit]") {
    {
        const auto text = replace(k_base, "gravel = 0.5,", "gravl = 0.5,");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.fractions.gravl");
        CHECK(e.line() == line_of(text, "gravl"));
        CHECK(mentions(e, "'gravel'"));
    }
    CHECK(refused(replace(k_base, "gravel = 0.5, cushion = 0.3,", "gravel = 0.8,")).key() ==
          "arrival.fractions");
    {
        const auto e = refused(replace(k_base, "bare = \"gravel\"", "bare = \"gravle\""));
        CHECK(e.key() == "microsites.bare");
        CHECK(mentions(e, "'gravel'"));
    }
    CHECK(refused(replace(k_base, "\"tussock\"]", "\"gravel\"]")).key() == "microsites.labels");
    CHECK(refused(k_base + "[[scenario]]\nname = \"a\"\nfractions = { gravel = 1.0, cushion = 0, "
                           "tusock = 0 }\n")
              .key() == "scenario[1].fractions.tusock");
}

TEST_CASE("vital-rate rules: links, formulas, fixed values, year handling, groups",
          "[spec][unit]") {
    auto rate_edit = [&](const std::string& from, const std::string& to) {
        return refused(replace(k_base, from, to));
    };
    {
        const auto e = rate_edit("family = \"poisson\"", "family = \"poisson\"\nlink = \"logit\"");
        CHECK(e.key() == "rates.seeds.link");
    }
    {
        const auto e = rate_edit("family = \"poisson\"", "family = \"poison\"");
        CHECK(e.key() == "rates.seeds.family");
        CHECK(mentions(e, "'poisson'"));
    }
    CHECK(rate_edit("formula = \"seeds ~ size\"", "formula = \"seed ~ size\"").key() ==
          "rates.seeds.formula");
    CHECK(rate_edit("formula = \"seeds ~ size\"", "formula = \"seeds size\"").key() ==
          "rates.seeds.formula");
    CHECK(rate_edit("formula = \"seeds ~ size\"",
                    "formula = \"seeds ~ size\"\ncandidates = [\"seeds ~ \"]")
              .key() == "rates.seeds.candidates[1]");  // entries counted from 1
    CHECK(rate_edit("formula = \"seeds ~ size\"", "formula = \"seeds ~ size\"\ntheta = 2.0")
              .key() == "rates.seeds.theta");
    CHECK(rate_edit("formula = \"size ~ microsite\"",
                    "formula = \"size ~ microsite\"\ncoefficients = { \"(Intercept)\" = 1.0 }")
              .key() == "rates.recruit_size.sd");
    CHECK(rate_edit("formula = \"size ~ microsite\"",
                    "formula = \"size ~ microsite\"\ncoefficients = { \"(Intercept)\" = 1.0 "
                    "}\nsd = 0")
              .key() == "rates.recruit_size.sd");
    CHECK(rate_edit("formula = \"survived ~ size\"",
                    "formula = \"survived ~ size\"\nrandom_slope = \"size\"")
              .key() == "rates.survival.random_slope");
    CHECK(rate_edit("formula = \"survived ~ size\"",
                    "formula = \"survived ~ size\"\nyear = \"random\"\nrandom_slope = \"sise\"")
              .key() == "rates.survival.random_slope");
    {
        const auto e = rate_edit("formula = \"survived ~ size\"",
                                 "formula = \"survived ~ size\"\ngroups = [\"plto\"]");
        CHECK(e.key() == "rates.survival.groups");
        CHECK(mentions(e, "'plot'"));
    }
    CHECK(rate_edit("formula = \"survived ~ size\"",
                    "formula = \"survived ~ size\"\ngroups = [\"year\"]")
              .key() == "rates.survival.groups");
    CHECK(rate_edit("formula = \"survived ~ size\"",
                    "formula = \"survived ~ size\"\nyear = \"randm\"")
              .key() == "rates.survival.year");
    CHECK(rate_edit("formula = \"survived ~ size\"", "formula = \"survived ~ size\"\nspread = \"size\"")
              .key() == "rates.survival.spread");
    // A fitted rate needs the census.
    {
        const auto e = rate_edit("[data]\ncensus = \"census.csv\"\n", "");
        CHECK(e.key() == "rates.survival");
        CHECK(e.line() > 0);
    }
}

TEST_CASE("arrival, scenario and perturbation rules", "[spec][unit]") {
    const std::string experiments = replace(
        replace(k_base, "fractions = { gravel = 0.5, cushion = 0.3, tussock = 0.2 }",
                "method = \"experiments\"\ncover = { cushion = 0.2, tussock = 0.1 }\n"
                "exposure_days = 120\nrelanding = 0.5\nseed_type = \"plumed\"\n"
                "trapping_formula = \"trapped / launched ~ form\"\n"
                "retention_formula = \"left ~ microsite\""),
        "census = \"census.csv\"",
        "census = \"census.csv\"\ntrapping = \"t.csv\"\nretention = \"r.csv\"");
    CHECK_NOTHROW(parse_model_spec(experiments, "m.toml"));
    CHECK(refused(replace(experiments, "relanding = 0.5", "relanding = 1.5")).key() ==
          "arrival.relanding");
    CHECK(refused(replace(experiments, "cover = { cushion = 0.2,", "cover = { gravel = 0.2,"))
              .key() == "arrival.cover.gravel");
    CHECK(refused(replace(experiments, "cushion = 0.2, tussock = 0.1",
                          "cushion = 0.7, tussock = 0.4"))
              .key() == "arrival.cover");
    CHECK(refused(replace(experiments, "cover = { cushion = 0.2, tussock = 0.1 }",
                          "cover = \"censis\""))
              .key() == "arrival.cover");
    CHECK(refused(replace(experiments, "seed_type = \"plumed\"\n", "")).key() ==
          "arrival.seed_type");
    CHECK(refused(replace(experiments, "trapping = \"t.csv\"\n", "")).key() == "arrival");
    CHECK(refused(replace(k_base, "fractions = {", "relanding = 0.3\nfractions = {")).key() ==
          "arrival.relanding");
    // Scenarios.
    CHECK(refused(k_base + "[[scenario]]\nname = \"a\"\n").key() == "scenario[1]");
    {
        const auto text = k_base +
                          "[[scenario]]\nname = \"a\"\nestablishment_factor = { cushion = 2 }\n"
                          "[[scenario]]\nname = \"b\"\ncover_factor = { cushion = 2 }\n";
        const auto e = refused(text);
        CHECK(e.key() == "scenario[2]");  // a chain change without arrival experiments
        CHECK(e.line() == line_of(text, "[[scenario]]\nname = \"b\""));  // the entry header
    }
    CHECK(refused(k_base + "[[scenario]]\nname = \"a\"\nestablishment_factor = { cushion = 2 }\n"
                           "[[scenario]]\nname = \"a\"\nestablishment_factor = { tussock = 2 }\n")
              .key() == "scenario[2].name");
    CHECK(refused(experiments +
                  "[[scenario]]\nname = \"x\"\nexposure_days = 10\nfractions = { gravel = 1, "
                  "cushion = 0, tussock = 0 }\n")
              .key() == "scenario[1]");
    CHECK_NOTHROW(parse_model_spec(
        experiments + "[[scenario]]\nname = \"x\"\nhazard_factor = { gravel = 0.5 }\n", "m.toml"));
    CHECK(refused(experiments + "[[scenario]]\nname = \"x\"\nrelanding = 1.2\n").key() ==
          "scenario[1].relanding");
    CHECK(refused(experiments + "[[scenario]]\nname = \"x\"\nrelanding = 0.2\n"
                                "fraction_shares = { gravel = 1 }\n")
              .key() == "scenario[1]");
    CHECK(refused(k_base + "[[scenario]]\nname = \"x\"\nfraction_shares = { gravel = 0 }\n")
              .key() == "scenario[1].fraction_shares");
    CHECK(refused(k_base + "[[scenario]]\nname = \"x\"\nfraction_shares = { gravel = 1 }\n"
                           "fractions = { gravel = 1, cushion = 0, tussock = 0 }\n")
              .key() == "scenario[1]");
    CHECK(refused(k_base + "[[scenario]]\nname = \"x\"\nrelanding = 0.5\n").key() ==
          "scenario[1]");  // a chain change without experiments
    // Juveniles by seedling flag need the flag.
    CHECK(refused(k_base + "[census]\nseedling_flag = false\n[perturbation]\nsurvival_changes = "
                           "[0.1]\n")
              .key() == "perturbation.juvenile");
    CHECK(refused(k_base + "[perturbation]\njuvenile_size_below = 1.0\nsurvival_changes = [0.1]\n")
              .key() == "perturbation.juvenile_size_below");
}

TEST_CASE("TOML syntax errors and unreadable files are SpecErrors with a line", "[spec][unit]") {
    {
        const auto text = replace(k_base, "points = 50", "points = = 50");
        const auto e = refused(text);
        CHECK(e.line() == line_of(text, "points = = 50"));
    }
    CHECK_THROWS_AS(safesite::spec::read_model_spec("/nonexistent/model.toml"), SpecError);
}
