// Break-even bare-soil establishment (docs/methods/pipeline.md, "Break-even").
// Checked on the size-independent model with survival s and fecundity b per plant, whose
// dominant eigenvalue is λ = s + b Σ_m a_m e_m (issue 2, analytic case (b); Ellner, Childs &
// Rees 2016 §2.6 for the size-independent special case). Moving the seeds under form f to bare
// soil keeps λ when (a_bare + a_f) e* = a_bare e_bare + a_f e_f.
#include <catch2/catch.hpp>

#include <cmath>

#include "safesite/error.hpp"
#include "safesite/pipeline/break_even.hpp"

using safesite::pipeline::BreakEven;
using safesite::pipeline::solve_break_even;

TEST_CASE("break-even establishment matches the closed form of a scalar model",
          "[pipeline][unit]") {
    const double s = 0.6, b = 40.0;
    const double a_bare = 0.5, a_f = 0.3, a_g = 0.2;
    const double e_bare = 0.01, e_f = 0.03, e_g = 0.02;
    const double lambda0 = s + b * (a_bare * e_bare + a_f * e_f + a_g * e_g);
    auto lambda_moved = [&](double e) { return s + b * ((a_bare + a_f) * e + a_g * e_g); };
    const auto be = solve_break_even(lambda_moved, lambda0);
    REQUIRE(be.status == BreakEven::Status::found);
    const double exact = (a_bare * e_bare + a_f * e_f) / (a_bare + a_f);  // 0.0175
    // TOMS 748 stops at a 40-bit bracket (≈ 1e-12 relative); 1e-10 leaves room.
    CHECK(be.value == Approx(exact).epsilon(1e-10));
    CHECK(be.status_name() == "found");
}

TEST_CASE("break-even reports 'none in range' and 'always' honestly", "[pipeline][unit]") {
    // λ(e) = 0.5 + 0.2 e < 1 on [0, 1]: no bare-soil establishment keeps λ0 = 1.
    const auto none = solve_break_even([](double e) { return 0.5 + 0.2 * e; }, 1.0);
    CHECK(none.status == BreakEven::Status::none_in_range);
    CHECK(std::isnan(none.value));
    CHECK(none.status_name() == "none in range");
    // λ(e) ≥ 1 everywhere: every e works.
    const auto always = solve_break_even([](double e) { return 1.2 + e; }, 1.0);
    CHECK(always.status == BreakEven::Status::always);
    CHECK(always.value == 0.0);
    CHECK_THROWS_AS(solve_break_even([](double) { return NAN; }, 1.0), safesite::NumericalError);
    CHECK_THROWS_AS(solve_break_even([](double e) { return e; }, 1.0, 1.0, 0.5),
                    safesite::UsageError);
}
