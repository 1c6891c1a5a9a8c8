// The [census] row-policy keys (issue 11): alive_without_size (keep | error, default keep) and
// alive_after_dead (error | notfound, default error) are read, reach the census options, and an
// unknown value is a SpecError at the key's line with the dotted key path.
#include <catch2/catch.hpp>

#include <string>

#include "safesite/spec/model_spec.hpp"
#include "support/spec_text.hpp"

using safesite::census::AliveAfterDead;
using safesite::census::AliveWithoutSize;
using safesite::spec::parse_model_spec;
using safesite::test::line_of;
using safesite::test::replace;

namespace {

// The shared base model with two microsites.
const std::string k_model =
    replace(replace(safesite::test::base_model_text(),
                    "labels = [\"gravel\", \"cushion\", \"tussock\"]",
                    "labels = [\"gravel\", \"cushion\"]"),
            "fractions = { gravel = 0.5, cushion = 0.3, tussock = 0.2 }",
            "fractions = { gravel = 0.6, cushion = 0.4 }");

}  // namespace

TEST_CASE("the [census] row policies default to keep and error", "[spec][unit]") {
    const auto spec = parse_model_spec(k_model, "m.toml");
    CHECK(spec.census.alive_without_size == AliveWithoutSize::keep);
    CHECK(spec.census.alive_after_dead == AliveAfterDead::error);
}

TEST_CASE("the [census] row policies are read and reach the census options", "[spec][unit]") {
    const auto spec = parse_model_spec(
        k_model + "[census]\nalive_without_size = \"error\"\nalive_after_dead = \"notfound\"\n",
        "m.toml");
    const auto o = safesite::spec::to_census_options(spec);
    CHECK(o.alive_without_size == AliveWithoutSize::error);
    CHECK(o.alive_after_dead == AliveAfterDead::notfound);
}

TEST_CASE("an unknown value of a [census] row policy is refused at its key", "[spec][unit]") {
    for (const std::string key : {"alive_without_size", "alive_after_dead"}) {
        const std::string text = k_model + "[census]\n" + key + " = \"drop\"\n";
        const auto e = safesite::test::refused(text, "m.toml");
        CHECK(e.file() == "m.toml");
        CHECK(e.key() == "census." + key);
        CHECK(e.line() == line_of(text, key + " = "));
    }
}
