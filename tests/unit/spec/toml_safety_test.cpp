// Model files that reached internal checks of the packaged TOML library (toml++ 3.3.0), found by
// fuzzing (issue 11; lib/src/spec/detail/checked_toml.hpp): each must be a SpecError with the
// file, line and column, and a valid file with the same characters in a string must still read.
// Expected syntax rules: TOML v1.0.0 (toml.io/en/v1.0.0): whitespace is tab or space; bare keys
// are ASCII letters, digits, '_' and '-'; a table header is a key in brackets; a line-ending
// backslash in a multi-line basic string trims the whitespace and line breaks that follow it.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "safesite/spec/model_spec.hpp"
#include "support/spec_text.hpp"

using safesite::SpecError;
using safesite::test::line_of;
using safesite::test::refused;
using safesite::test::replace;

namespace {

std::string demo_model() {
    std::ifstream in(std::filesystem::path(SAFESITE_SOURCE_DIR) / "models" / "ridge.toml");
    std::ostringstream text;
    text << in.rdbuf();
    return text.str();
}

}  // namespace

TEST_CASE("a table header without a name is a SpecError at the header", "[spec][unit]") {
    {
        // The fuzzer's input, whole: `[#` (a header bracket, then a comment).
        const auto e = refused("[#", "dir/m.toml");
        CHECK(e.file() == "dir/m.toml");
        CHECK(e.line() == 1);
        CHECK(e.column() == 2);  // the '#' where the name should start
    }
    {
        // Mid-file, after an array spanning lines whose nested array opens with a comment
        // (valid TOML, so not a header): the error is at the header, not in the array.
        auto text = replace(demo_model(), R"(labels = ["gravel", "cushion", "tussock"])",
                            "labels = [\n  [ # nested\n    \"gravel\"],\n]");
        text = replace(text, "[mesh]", "[ # mesh");
        const auto e = refused(text, "m.toml");
        CHECK(e.line() == line_of(text, "[ # mesh"));
        CHECK(e.column() == 3);
    }
    {
        const auto text = replace(demo_model(), "[mesh]", "[[=mesh]]");
        const auto e = refused(text, "m.toml");
        CHECK(e.line() == line_of(text, "[[=mesh]]"));
        CHECK(e.column() == 3);
    }
}

TEST_CASE("an array closed with a brace is a SpecError at the brace", "[spec][unit]") {
    // Found by tests/fuzz/fuzz_model.cpp: the value parser's precondition broke on `[}`.
    const auto text =
        replace(demo_model(), R"(labels = ["gravel", "cushion", "tussock"])", "labels = [}");
    const auto e = refused(text, "m.toml");
    CHECK(e.line() == line_of(text, "labels = [}"));
    CHECK(e.column() == 11);
    CHECK(refused("a = [1,\n  }", "m.toml").line() == 2);
}

TEST_CASE("a date-time without its time is a SpecError on its line", "[spec][unit]") {
    // Found by fuzzing toml::parse with the checks of checked_toml.hpp: 'T' then a non-digit,
    // with a ':' later on the line, broke the time parser's precondition. The column is where
    // the reader's look-ahead stopped (the ':'), a few characters past the 'x'.
    const auto text = replace(demo_model(), "points = 100", "points = 2024-05-27Tx:");
    const auto e = refused(text, "m.toml");
    CHECK(e.line() == line_of(text, "points = 2024"));
    CHECK(e.column() == 22);
}

TEST_CASE("a non-ASCII letter where whitespace may stand is a SpecError at the letter",
          "[spec][unit]") {
    // One letter from each range where toml++ 3.3.0's whitespace test fell into its unreachable
    // branch (U+00A1–U+0499, U+2C6E–U+3067, U+FBD6–U+FEFE), and a no-break space (U+00A0), which
    // TOML does not count as whitespace.
    for (const std::string letter :
         {"\xC3\xA9", "\xD0\x96", "\xE3\x81\x81", "\xEF\xBB\xBC", "\xC2\xA0"}) {
        CAPTURE(letter);
        {
            const auto text = replace(demo_model(), "points = 100", "points = 100" + letter);
            const auto e = refused(text, "m.toml");
            CHECK(e.line() == line_of(text, "points = 100"));
            CHECK(e.column() == 13);  // right after "points = 100"
        }
        {
            const auto text = replace(demo_model(), "[mesh]", "[mesh]" + letter);
            const auto e = refused(text, "m.toml");
            CHECK(e.line() == line_of(text, "[mesh]"));
            CHECK(e.column() == 7);
        }
    }
}

TEST_CASE("non-ASCII letters inside strings and comments still read", "[spec][unit]") {
    // The line-ending backslash makes toml++ test the first letter of the next line for
    // whitespace: 'é' here was the unreachable branch; now it reads as TOML v1.0.0 says.
    const auto text =
        replace(demo_model(), R"x(name = "Ventaria ficta on Corvane Ridge (invented)")x",
                "name = \"\"\"Ventaria \\\n    \xC3\xA9"
                "bauche\"\"\" # r\xC3\xA9sum\xC3\xA9");
    const auto m = safesite::spec::parse_model_spec(text, "m.toml");
    CHECK(m.name ==
          "Ventaria \xC3\xA9"
          "bauche");
}
