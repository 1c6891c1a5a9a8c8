// Formulas are checked when the model file is read, and every error is located in the user's
// own text: the model file, the line of the key, the key, and the column of the offending
// character as it stands in the file (style guide 4.15: checked by type and location fields;
// hints only by the suggested name). Columns are counted by hand from the test texts; TOML
// columns are 1-based (toml.io, and toml++'s source_position).
#include <catch2/catch.hpp>

#include <string>

#include "safesite/spec/mesh_memory.hpp"
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

SpecError refused(const std::string& text) { return safesite::test::refused(text, "m.toml"); }

/// 1-based column of `what` within its line of `text` (ASCII texts).
std::size_t column_of(const std::string& text, const std::string& what) {
    const auto at = text.find(what);
    const auto line_start = text.rfind('\n', at);
    return at - (line_start == std::string::npos ? 0 : line_start + 1) + 1;
}

}  // namespace

TEST_CASE("an unknown column is located at its first character in the file", "[spec][unit]") {
    const auto text = replace(k_base, "\"flowered ~ size\"", "\"flowered ~ sise\"");
    const auto e = refused(text);
    CHECK(e.file() == "m.toml");
    CHECK(e.key() == "rates.flowering.formula");
    CHECK(e.line() == line_of(text, "flowered ~ sise"));
    CHECK(e.column() == column_of(text, "sise"));
    CHECK(mentions(e, "'size'"));  // the hint
}

TEST_CASE("a syntax error at the end points just past the user's text", "[spec][unit]") {
    // "survived ~ size +" has 17 characters; the parser expects a term at character 18, the
    // closing quote's column. Nothing the pipeline appends (" + year") is counted.
    const auto text = replace(k_base, "\"survived ~ size\"", "\"survived ~ size +\"");
    const auto e = refused(text);
    CHECK(e.key() == "rates.survival.formula");
    CHECK(e.line() == line_of(text, "survived ~ size +"));
    CHECK(e.column() == column_of(text, "survived ~ size +") + 17);
    CHECK(mentions(e, "character 18"));
    // The same with year = "fixed": the error stays inside the user's text.
    const auto fixed = replace(text, "formula = \"survived ~ size +\"",
                               "formula = \"survived ~ size +\"\nyear = \"fixed\"");
    CHECK(refused(fixed).column() == column_of(fixed, "survived ~ size +") + 17);
}

TEST_CASE("syntax errors name the position of the offending token", "[spec][unit]") {
    {
        const auto text = replace(k_base, "\"size_next ~ size\"", "\"size_next ~ (size\"");
        const auto e = refused(text);
        CHECK(e.key() == "rates.growth.formula");
        CHECK(e.column() == column_of(text, "(size") + 5);  // the end, where ')' is expected
    }
    {
        const auto text = replace(k_base, "\"size_next ~ size\"", "\"size_next ~ sqrt(size)\"");
        const auto e = refused(text);
        CHECK(e.column() == column_of(text, "sqrt"));
    }
    {
        const auto text = replace(k_base, "\"seeds ~ size\"", "\"seeds size\"");
        const auto e = refused(text);
        CHECK(e.key() == "rates.seeds.formula");
        CHECK(e.column() == column_of(text, "size\"\n\n[rates.recruit"));  // '~' expected
    }
}

TEST_CASE("candidate formulas are keyed by their index from 1", "[spec][unit]") {
    const auto text = replace(k_base, "formula = \"survived ~ size\"",
                              "formula = \"survived ~ size\"\n"
                              "candidates = [\"survived ~ 1\", \"survived ~ micrsite\"]");
    const auto e = refused(text);
    CHECK(e.key() == "rates.survival.candidates[2]");
    CHECK(e.line() == line_of(text, "candidates"));
    CHECK(e.column() == column_of(text, "micrsite"));
    CHECK(mentions(e, "'microsite'"));
}

TEST_CASE("the response must be the rate's column", "[spec][unit]") {
    const auto text = replace(k_base, "\"seeds ~ size\"", "\"flowered ~ size\"");
    const auto e = refused(text);
    CHECK(e.key() == "rates.seeds.formula");
    CHECK(e.column() == column_of(text, "flowered ~ size\"\n\n[rates.recruit"));
}

TEST_CASE("columns of the wrong kind and of another table are refused", "[spec][unit]") {
    {  // log of a categorical column
        const auto text = replace(k_base, "\"size_next ~ size\"", "\"size_next ~ log(plot)\"");
        const auto e = refused(text);
        CHECK(e.key() == "rates.growth.formula");
        CHECK(e.column() == column_of(text, "plot)"));
    }
    {  // size_next is a column of the transitions, not of the plants (flowering)
        const auto text = replace(k_base, "\"flowered ~ size\"", "\"flowered ~ size_next\"");
        const auto e = refused(text);
        CHECK(e.key() == "rates.flowering.formula");
        CHECK(e.column() == column_of(text, "size_next\"\n"));
    }
    {  // ref() of a numeric column
        const auto text = replace(k_base, "\"survived ~ size\"", "\"survived ~ ref(size, 1)\"");
        CHECK(refused(text).column() == column_of(text, "size, 1"));
    }
}

TEST_CASE("a misspelt microsite in ref() is located at the level", "[spec][unit]") {
    const auto text =
        replace(k_base, "\"survived ~ size\"", "\"survived ~ size + ref(microsite, cushon)\"");
    const auto e = refused(text);
    CHECK(e.key() == "rates.survival.formula");
    CHECK(e.column() == column_of(text, "cushon"));
    CHECK(mentions(e, "'cushion'"));
    // A known label is accepted.
    CHECK_NOTHROW(parse_model_spec(
        replace(k_base, "\"survived ~ size\"", "\"survived ~ size + ref(microsite, cushion)\""),
        "m.toml"));
}

TEST_CASE("a formula written with escapes is located at its value", "[spec][unit]") {
    // "\u0073" is 's': the text is "flowered ~ sise" but the file's characters differ, so the
    // column is the opening quote's and the reason gives the character in the formula.
    const auto text = replace(k_base, "\"flowered ~ size\"", "\"flowered ~ \\u0073ise\"");
    const auto e = refused(text);
    CHECK(e.key() == "rates.flowering.formula");
    CHECK(e.column() == column_of(text, "\"flowered ~ \\u"));
    CHECK(mentions(e, "character 12"));
}

TEST_CASE("literal strings are located like basic strings", "[spec][unit]") {
    const auto text = replace(k_base, "\"flowered ~ size\"", "'flowered ~ sise'");
    CHECK(refused(text).column() == column_of(text, "sise"));
}

TEST_CASE("arrival formulas: columns, levels and terms the chain can predict from",
          "[spec][unit]") {
    const std::string experiments = R"([arrival]
method = "experiments"
cover = { cushion = 0.2, tussock = 0.1 }
exposure_days = 30
relanding = 0.5
seed_type = "winged"
trapping_formula = "trapped / launched ~ log(neighbour_size) + form"
retention_formula = "left ~ microsite"
)";
    const auto good = replace(
        replace(k_base,
                "[arrival]\nfractions = { gravel = 0.5, cushion = 0.3, tussock = 0.2 }\n",
                experiments),
        "census = \"census.csv\"\n",
        "census = \"census.csv\"\ntrapping = \"t.csv\"\nretention = \"r.csv\"\n");
    CHECK_NOTHROW(parse_model_spec(good, "m.toml"));
    {
        const auto text = replace(good, "+ form\"", "+ frm\"");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.trapping_formula");
        CHECK(e.column() == column_of(text, "frm"));
        CHECK(mentions(e, "'form'"));
    }
    {  // launched is the trials' count: the response may read it, the terms may not
        const auto text = replace(good, "+ form\"", "+ launched\"");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.trapping_formula");
        CHECK(e.column() == column_of(text, "launched\"\nretention"));
    }
    {  // the bare microsite is not a neighbour form
        const auto text = replace(good, "+ form\"", "+ ref(form, gravel)\"");
        CHECK(refused(text).column() == column_of(text, "gravel)"));
    }
    {
        const auto text =
            replace(good, "\"left ~ microsite\"", "\"left ~ ref(microsite, tusock)\"");
        const auto e = refused(text);
        CHECK(e.key() == "arrival.retention_formula");
        CHECK(e.column() == column_of(text, "tusock"));
    }
}

TEST_CASE("replicates: the least for the level and the most, with file:line and key",
          "[spec][unit]") {
    // B_min = ceil(2 / (1 - level)) + 1, derived by hand in model_spec.hpp: the type-7 quantile
    // at p = (1 - level)/2 needs (B - 1) p >= 1 (Hyndman & Fan 1996, definition 7).
    CHECK(safesite::spec::min_replicates(0.95) == 41);
    CHECK(safesite::spec::min_replicates(0.90) == 21);
    CHECK(safesite::spec::min_replicates(0.99) == 201);
    CHECK(safesite::spec::min_replicates(0.5) == 5);
    {
        const auto text = k_base + "\n[uncertainty]\nreplicates = 1\n";
        const auto e = refused(text);
        CHECK(e.key() == "uncertainty.replicates");
        CHECK(e.line() == line_of(text, "replicates = 1"));
        CHECK(mentions(e, "41"));
    }
    {  // the minimum follows the level, wherever it is written in the table
        const auto text = k_base + "\n[uncertainty]\nreplicates = 100\nlevel = 0.99\n";
        const auto e = refused(text);
        CHECK(e.key() == "uncertainty.replicates");
        CHECK(mentions(e, "201"));
    }
    CHECK(refused(k_base + "\n[uncertainty]\nreplicates = 10001\n").key() ==
          "uncertainty.replicates");
    CHECK_NOTHROW(parse_model_spec(k_base + "\n[uncertainty]\nreplicates = 41\n", "m.toml"));
    CHECK_NOTHROW(parse_model_spec(k_base + "\n[uncertainty]\nreplicates = 0\n", "m.toml"));
    CHECK(refused(k_base + "\n[uncertainty]\nseed = -1\n").key() == "uncertainty.seed");
}

TEST_CASE("the memory estimate of the kernels and the mesh limit", "[spec][unit]") {
    using safesite::spec::mesh_memory_bytes;
    // bytes = 8 (K C + 4 C^2) n^2, by hand:
    // n = 100, C = 6, K = 10: 8 (60 + 144) 10^4 = 16 320 000.
    CHECK(mesh_memory_bytes(100, 6, 10) == Approx(16320000.0).margin(0.5));
    CHECK(mesh_memory_bytes(10, 1, 2) == Approx(8.0 * (2.0 + 4.0) * 100.0).margin(1e-9));

    const auto m = parse_model_spec(k_base, "m.toml");
    // Three microsites with the seedling class (the defaults) are six classes.
    CHECK(safesite::spec::kernel_classes(m) == 6);
    const auto est = safesite::spec::mesh_memory(m, 2);
    // Largest n with 8 (2·6 + 4·36) n^2 <= 2e9: floor(sqrt(2e9 / 1248)) = 1265.
    CHECK(est.largest_points == 1265);

    const auto text = replace(k_base, "points = 50", "points = 10000");
    const auto e = refused(text);
    CHECK(e.key() == "mesh.points");
    CHECK(e.line() == line_of(text, "points = 10000"));
    CHECK(mentions(e, "1265"));
    CHECK_NOTHROW(parse_model_spec(replace(k_base, "points = 50", "points = 1265"), "m.toml"));
    CHECK(refused(replace(k_base, "points = 50", "points = 1266")).key() == "mesh.points");
}
