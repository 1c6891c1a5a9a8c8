// Error rendering: compiler-style location prefixes (style guide 4.7), common practice.
#include <catch2/catch.hpp>

#include "safesite/error.hpp"

TEST_CASE("input errors render file:line:column and keep the location as fields", "[core][unit]") {
    safesite::DataError e({"census.csv", 14, 5, "size"}, "size \"12,3\" is not a number");
    CHECK(std::string(e.what()) == "census.csv:14:5: size \"12,3\" is not a number");
    CHECK(e.line() == 14);
    CHECK(e.column() == 5);
    CHECK(e.key() == "size");
    safesite::SpecError s({"model.toml", 3, 0, "mesh.bins"}, "unknown key");
    CHECK(std::string(s.what()) == "model.toml:3: unknown key");
    safesite::SpecError none({}, "no location");
    CHECK(std::string(none.what()) == "no location");
}
