// Mesh bounds from the data range and census-derived cover (docs/methods/pipeline.md).
// The rules are ours (common practice for the margin, Ellner, Childs & Rees 2016 §2.6);
// expected values are worked by hand from the small tables below.
#include <catch2/catch.hpp>

#include <cmath>

#include "safesite/error.hpp"
#include "safesite/pipeline/data_rules.hpp"

using namespace safesite;

TEST_CASE("mesh bounds span the sizes at t, t+1 and of recruits, widened by the margin",
          "[pipeline][unit]") {
    stats::Table tr;
    tr.add_numeric("size", {1.0, 2.0, 3.0});
    tr.add_numeric("size_next", {NAN, 4.0, 2.5});
    stats::Table rec;
    rec.add_numeric("size", {0.0, 0.5});
    // Range [0, 4], r = 4, margin 0.1 → [−0.4, 4.4].
    const auto [lo, hi] = pipeline::derive_mesh_bounds(tr, rec, 0.1);
    CHECK(lo == Approx(-0.4).margin(1e-14));
    CHECK(hi == Approx(4.4).margin(1e-14));
    stats::Table flat;
    flat.add_numeric("size", {1.0, 1.0});
    flat.add_numeric("size_next", {1.0, NAN});
    stats::Table none;
    CHECK_THROWS_AS(pipeline::derive_mesh_bounds(flat, none, 0.1), DataError);
    CHECK_THROWS_AS(pipeline::derive_mesh_bounds(tr, rec, -1.0), UsageError);
}

TEST_CASE("census cover is the share of plant records per non-bare microsite",
          "[pipeline][unit]") {
    stats::Table tr;
    tr.add_categorical("microsite", {"gravel", "cushion", "cushion", "tussock", "gravel"},
                       {"gravel", "cushion", "tussock"});
    const Eigen::VectorXd c =
        pipeline::census_cover(tr, {"gravel", "cushion", "tussock"}, 0);
    CHECK(c[0] == 0.0);
    CHECK(c[1] == Approx(0.4).epsilon(1e-15));
    CHECK(c[2] == Approx(0.2).epsilon(1e-15));
}
