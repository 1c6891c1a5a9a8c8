// Formula parsing and term expansion. Expected expansions follow the rules of Wilkinson &
// Rogers (1973) (a*b = a + b + a:b; a - b removes b) and of Chambers & Hastie (1992, §2.4)
// for the intercept marks; error positions are counted by hand from the formula text.
#include <catch2/catch.hpp>

#include "safesite/stats/formula.hpp"

using safesite::InputError;
using safesite::stats::Atom;
using safesite::stats::Formula;
using safesite::stats::FormulaError;
using safesite::stats::parse_formula;

namespace {

std::vector<std::string> labels(const Formula& f) {
    std::vector<std::string> out;
    for (const auto& t : f.terms) out.push_back(t.label());
    return out;
}

// Position (1-based) and key of the FormulaError thrown by parsing `text`.
std::pair<std::size_t, std::string> error_at(const std::string& text, const std::string& key = "") {
    try {
        parse_formula(text, key);
    } catch (const FormulaError& e) {
        return {e.column(), e.key()};
    }
    return {0, ""};
}

}  // namespace

TEST_CASE("crossing expands to main effects and interaction, ordered by degree", "[stats][unit]") {
    const Formula f = parse_formula("survived ~ size * microsite");
    CHECK(f.response.text() == "survived");
    CHECK(f.intercept);
    CHECK(labels(f) == std::vector<std::string>{"size", "microsite", "size:microsite"});
    CHECK(labels(parse_formula("y ~ a:b + a")) == std::vector<std::string>{"a", "a:b"});
    CHECK(labels(parse_formula("y ~ a*b*c")) ==
          std::vector<std::string>{"a", "b", "c", "a:b", "a:c", "b:c", "a:b:c"});
}

TEST_CASE("removal, parentheses and duplicate terms", "[stats][unit]") {
    CHECK(labels(parse_formula("y ~ a*b - a")) == std::vector<std::string>{"b", "a:b"});
    CHECK(labels(parse_formula("y ~ (a + b):c")) == std::vector<std::string>{"a:c", "b:c"});
    CHECK(labels(parse_formula("y ~ a + a + b:a + a:b")) == std::vector<std::string>{"a", "b:a"});
    CHECK(labels(parse_formula("y ~ a:a")) == std::vector<std::string>{"a"});
}

TEST_CASE("intercept marks: - 1, + 0, 0 +, -1 +, and + 1 restoring it", "[stats][unit]") {
    CHECK(parse_formula("y ~ size").intercept);
    CHECK_FALSE(parse_formula("y ~ size - 1").intercept);
    CHECK_FALSE(parse_formula("y ~ size + 0").intercept);
    CHECK_FALSE(parse_formula("y ~ 0 + size").intercept);
    CHECK_FALSE(parse_formula("y ~ -1 + size").intercept);
    CHECK(parse_formula("y ~ size - 1 + 1").intercept);
    const Formula only = parse_formula("y ~ 1");
    CHECK(only.intercept);
    CHECK(only.terms.empty());
}

TEST_CASE("function atoms, ratio response and offsets", "[stats][unit]") {
    const Formula f = parse_formula(
        "trapped / launched ~ log(neighbour_size) + form + offset(log(days))");
    CHECK(f.response.ratio);
    CHECK(f.response.value.text() == "trapped");
    CHECK(f.response.trials.text() == "launched");
    CHECK(labels(f) == std::vector<std::string>{"log(neighbour_size)", "form"});
    REQUIRE(f.offsets.size() == 1);
    CHECK(f.offsets[0].text() == "log(days)");
    CHECK(f.columns() ==
          std::vector<std::string>{"trapped", "launched", "neighbour_size", "form", "days"});

    const Formula g = parse_formula(
        "y ~ pow(size, 2) + orthpoly(size, 3) + nspline(size, df = 4) + "
        "nspline(size, knots = [0.5, 1.5]) + ref(microsite, gravel) + pow(log(size), -1)");
    REQUIRE(g.terms.size() == 6);
    CHECK(g.terms[0].atoms[0].key() == "pow(size,2)");
    CHECK(g.terms[1].atoms[0].kind == Atom::Kind::orthpoly);
    CHECK(g.terms[1].atoms[0].degree == 3);
    CHECK(g.terms[2].atoms[0].df == 4);
    CHECK(g.terms[3].atoms[0].df == 3);  // two interior knots give three columns
    CHECK(g.terms[3].atoms[0].knots == std::vector<double>{0.5, 1.5});
    CHECK(g.terms[4].atoms[0].kind == Atom::Kind::reference);
    CHECK(g.terms[4].atoms[0].ref_level == "gravel");
    CHECK(g.terms[4].label() == "microsite");
    CHECK(g.terms[5].label() == "pow(log(size),-1)");
    // Positional df is accepted too.
    CHECK(parse_formula("y ~ nspline(size, 3)").terms[0].atoms[0].df == 3);
    // Quoted reference level with a space.
    CHECK(parse_formula("y ~ ref(site, \"north ridge\")").terms[0].atoms[0].ref_level ==
          "north ridge");
}

TEST_CASE("formula errors are FormulaErrors pointing at the offending character",
          "[stats][unit]") {
    // Character positions counted in the text (1-based); key = formula text by default.
    CHECK(error_at("y size") == std::make_pair(std::size_t{3}, std::string("y size")));
    CHECK(error_at("y ~ size +").first == 11);           // end of text
    CHECK(error_at("y ~ poly(size, 2)").first == 5);     // unknown function
    CHECK(error_at("y ~ size + 3").first == 12);         // number other than 0/1
    CHECK(error_at("y ~ nspline(size, foo = 2)").first == 19);
    CHECK(error_at("y ~ orthpoly(size, 0)").first == 20);  // degree must be >= 1
    CHECK(error_at("y ~ nspline(size, knots = [2, 1])").first == 31);  // the knot "1"
    CHECK(error_at("y ~ (a + b").first == 11);
    CHECK(error_at("y ~ a & b").first == 7);
    CHECK(error_at("y ~ a:offset(b)").first == 6);
    CHECK(error_at("y ~ log(ref(a, b))").first == 9);
    CHECK(error_at("y ~ a +", "rates.growth.formula").second == "rates.growth.formula");
    REQUIRE_THROWS_AS(parse_formula("y ~ a / b"), InputError);  // a FormulaError is an InputError
}
