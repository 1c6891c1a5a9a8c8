// The truth of the seed experiments in a truth file (`[simulate.trapping]`,
// `[simulate.retention]`; docs/formats.md "Model file"): read into ExperimentTruthSpec, and
// every rule refused with a located SpecError (style guide 4.15: type and location, not
// wording).
#include <catch2/catch.hpp>

#include <algorithm>
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

// A valid truth file with experiments (checked by the first test case); each case edits one
// thing. Values are invented.
const std::string k_truth = R"TOML([model]
size_transform = "log"

[microsites]
labels = ["gravel", "cushion", "tussock"]
bare = "gravel"

[rates.survival]
family = "binomial"
formula = "survived ~ size"
coefficients = { "(Intercept)" = 0.5, size = 1.0 }

[rates.growth]
family = "gaussian"
formula = "size_next ~ size"
coefficients = { "(Intercept)" = 0.5, size = 0.8 }
sd = 0.3

[rates.flowering]
family = "binomial"
formula = "flowered ~ size"
coefficients = { "(Intercept)" = -3.0, size = 1.5 }

[rates.seeds]
family = "poisson"
formula = "seeds ~ size"
coefficients = { "(Intercept)" = 1.0, size = 1.0 }

[rates.recruit_size]
family = "gaussian"
formula = "size ~ 1"
coefficients = { "(Intercept)" = 0.0 }
sd = 0.3

[establishment]
method = "fixed"
values = { gravel = 0.01, cushion = 0.05, tussock = 0.03 }

[arrival]
method = "experiments"
cover = { cushion = 0.22, tussock = 0.15 }
exposure_days = 45.0
relanding = 0.5
seed_type = "winged"
trapping_formula = "trapped / launched ~ log(neighbour_size) + form + seed_type"
retention_formula = "left ~ microsite * seed_type"

[simulate.trapping]
intercept = -1.2
log_size_slope = 0.5
form_effect = { cushion = 0.6 }
seed_type_effect = { plumed = 0.0, winged = -0.6, smooth = -1.4 }
neighbour_sd = 0.3
neighbours_per_form = 40
log_size_mean = { cushion = 2.3, tussock = 2.8 }
log_size_sd = 0.35
launched = 25

[simulate.retention]
hazard_per_day = { gravel = { plumed = 0.09, winged = 0.045, smooth = 0.03 }, cushion = { plumed = 0.012, winged = 0.006, smooth = 0.004 }, tussock = { plumed = 0.025, winged = 0.015, smooth = 0.01 } }
station_sd = 0.2
stations_per_microsite = 8
seeds_per_station = 5
schedule = [0, 1, 3, 7, 14, 28, 56]
irregular_schedule = [0, 2, 5, 10, 21, 42]
irregular_share = 0.2
)TOML";

SpecError refused(const std::string& text) { return safesite::test::refused(text, "dir/t.toml"); }

}  // namespace

TEST_CASE("the experiment truth is read into ExperimentTruthSpec", "[spec][unit]") {
    const auto m = parse_model_spec(k_truth, "dir/t.toml");
    REQUIRE(m.experiment_truth.has_value());
    const auto& t = m.experiment_truth->trapping;
    CHECK(t.intercept == -1.2);
    CHECK(t.log_size_slope == 0.5);
    CHECK(t.form_effect.size() == 1);  // tussock not listed: effect 0
    CHECK(t.form_effect.at("cushion") == 0.6);
    CHECK(t.seed_types() == std::vector<std::string>{"plumed", "smooth", "winged"});
    CHECK(t.seed_type_effect.at("smooth") == -1.4);
    CHECK(t.neighbour_sd == 0.3);
    CHECK(t.neighbours_per_form == 40);
    CHECK(t.log_size_mean.at("tussock") == 2.8);
    CHECK(t.log_size_sd == 0.35);
    CHECK(t.launched == 25);
    const auto& r = m.experiment_truth->retention;
    CHECK(r.hazard_per_day.size() == 3);
    CHECK(r.hazard_per_day.at("cushion").at("winged") == 0.006);
    CHECK(r.station_sd == 0.2);
    CHECK(r.stations_per_microsite == 8);
    CHECK(r.seeds_per_station == 5);
    CHECK(r.schedule == std::vector<double>{0, 1, 3, 7, 14, 28, 56});
    CHECK(r.irregular_schedule.size() == 6);
    CHECK(r.irregular_share == 0.2);
    // A truth needs no experiment data files.
    CHECK_FALSE(m.data.trapping.has_value());
    // Keys are recorded for the docs round trip, maps as one key.
    CHECK(std::count(m.keys.begin(), m.keys.end(), "simulate.retention.hazard_per_day") == 1);
    CHECK(std::count(m.keys.begin(), m.keys.end(), "simulate.trapping.form_effect") == 1);
}

TEST_CASE("optional experiment-truth keys take their defaults", "[spec][unit]") {
    std::string text = replace(k_truth, "neighbour_sd = 0.3\n", "");
    text = replace(text, "form_effect = { cushion = 0.6 }\n", "");
    text = replace(text, "station_sd = 0.2\n", "");
    text = replace(text, "irregular_schedule = [0, 2, 5, 10, 21, 42]\n", "");
    text = replace(text, "irregular_share = 0.2\n", "");
    const auto m = parse_model_spec(text, "dir/t.toml");
    CHECK(m.experiment_truth->trapping.neighbour_sd == 0.0);
    CHECK(m.experiment_truth->trapping.form_effect.empty());
    CHECK(m.experiment_truth->retention.station_sd == 0.0);
    CHECK(m.experiment_truth->retention.irregular_share == 0.0);
    CHECK(m.experiment_truth->retention.irregular_schedule.empty());
}

TEST_CASE("experiment-truth errors are located", "[spec][unit]") {
    SECTION("a missing hazard for a seed type") {
        const std::string text =
            replace(k_truth, "cushion = { plumed = 0.012, winged = 0.006, smooth = 0.004 }",
                    "cushion = { plumed = 0.012, winged = 0.006 }");
        const auto e = refused(text);
        CHECK(e.file() == "dir/t.toml");
        CHECK(e.key() == "simulate.retention.hazard_per_day.cushion");
        CHECK(e.line() == line_of(text, "hazard_per_day"));
        CHECK(mentions(e, "'smooth'"));
    }
    SECTION("a missing microsite of hazard_per_day") {
        const std::string text = replace(
            k_truth, ", tussock = { plumed = 0.025, winged = 0.015, smooth = 0.01 } }", " }");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.retention.hazard_per_day");
        CHECK(e.line() == line_of(text, "hazard_per_day"));
        CHECK(mentions(e, "'tussock'"));
    }
    SECTION("a misspelt seed type in hazard_per_day gets a hint") {
        const std::string text = replace(k_truth, "smooth = 0.01 }", "smoth = 0.01 }");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.retention.hazard_per_day.tussock.smoth");
        CHECK(e.line() == line_of(text, "hazard_per_day"));
        CHECK(mentions(e, "'smooth'"));
    }
    SECTION("a negative hazard") {
        const std::string text = replace(k_truth, "winged = 0.045", "winged = -0.045");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.retention.hazard_per_day.gravel.winged");
        CHECK(e.line() == line_of(text, "hazard_per_day"));
    }
    SECTION("the focal seed type is not a simulated one") {
        const std::string text = replace(k_truth, "seed_type = \"winged\"", "seed_type = \"wingd\"");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.seed_type");
        CHECK(e.line() == line_of(text, "seed_type = \"wingd\""));
        CHECK(mentions(e, "'winged'"));
    }
    SECTION("cover = \"census\" cannot be a truth") {
        const std::string text =
            replace(k_truth, "cover = { cushion = 0.22, tussock = 0.15 }", "cover = \"census\"");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.cover");
        CHECK(e.line() == line_of(text, "cover = \"census\""));
    }
    SECTION("[simulate] needs arrival.method = \"experiments\"") {
        std::string text = replace(
            k_truth, k_truth.substr(k_truth.find("[arrival]"),
                                    k_truth.find("[simulate.trapping]") - k_truth.find("[arrival]")),
            "[arrival]\nfractions = { gravel = 0.5, cushion = 0.3, tussock = 0.2 }\n\n");
        const auto e = refused(text);
        CHECK(e.key() == "simulate");
    }
    SECTION("both tables come together") {
        const std::string text = k_truth.substr(0, k_truth.find("[simulate.retention]"));
        const auto e = refused(text);
        CHECK(e.key() == "simulate.retention");
    }
    SECTION("an unknown key gets a did-you-mean hint") {
        const std::string text = replace(k_truth, "log_size_slope = 0.5", "log_size_slop = 0.5");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.trapping.log_size_slop");
        CHECK(e.line() == line_of(text, "log_size_slop"));
        CHECK(mentions(e, "'log_size_slope'"));
    }
    SECTION("a form without log_size_mean") {
        const std::string text =
            replace(k_truth, "log_size_mean = { cushion = 2.3, tussock = 2.8 }",
                    "log_size_mean = { cushion = 2.3 }");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.trapping.log_size_mean");
        CHECK(e.line() == line_of(text, "log_size_mean"));
        CHECK(mentions(e, "'tussock'"));
    }
    SECTION("form_effect for bare soil") {
        const std::string text =
            replace(k_truth, "form_effect = { cushion = 0.6 }", "form_effect = { gravel = 0.6 }");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.trapping.form_effect.gravel");
        CHECK(e.line() == line_of(text, "form_effect"));
    }
    SECTION("counts and SDs out of range") {
        {
            const std::string text = replace(k_truth, "launched = 25", "launched = 0");
            const auto e = refused(text);
            CHECK(e.key() == "simulate.trapping.launched");
            CHECK(e.line() == line_of(text, "launched = 0"));
        }
        {
            const std::string text = replace(k_truth, "neighbour_sd = 0.3", "neighbour_sd = -0.3");
            const auto e = refused(text);
            CHECK(e.key() == "simulate.trapping.neighbour_sd");
            CHECK(e.line() == line_of(text, "neighbour_sd"));
        }
        {
            const std::string text = replace(k_truth, "seeds_per_station = 5", "seeds_per_station = 0");
            const auto e = refused(text);
            CHECK(e.key() == "simulate.retention.seeds_per_station");
        }
        {
            const std::string text = replace(k_truth, "irregular_share = 0.2", "irregular_share = 1.5");
            const auto e = refused(text);
            CHECK(e.key() == "simulate.retention.irregular_share");
            CHECK(e.line() == line_of(text, "irregular_share"));
        }
    }
    SECTION("a schedule that does not start at 0 or does not increase") {
        {
            const std::string text =
                replace(k_truth, "schedule = [0, 1, 3, 7, 14, 28, 56]", "schedule = [1, 3, 7]");
            const auto e = refused(text);
            CHECK(e.key() == "simulate.retention.schedule");
            CHECK(e.line() == line_of(text, "schedule = [1"));
        }
        {
            const std::string text = replace(k_truth, "[0, 2, 5, 10, 21, 42]", "[0, 2, 2, 10]");
            const auto e = refused(text);
            CHECK(e.key() == "simulate.retention.irregular_schedule");
        }
    }
    SECTION("an irregular share needs an irregular schedule") {
        const std::string text = replace(k_truth, "irregular_schedule = [0, 2, 5, 10, 21, 42]\n", "");
        const auto e = refused(text);
        CHECK(e.key() == "simulate.retention.irregular_schedule");
        CHECK(e.line() == line_of(text, "[simulate.retention]"));
    }
}
