// Establishment estimator ê_m = R_{m,t+1} / (S_t a_m), per year and pooled as a ratio of sums
// (docs/methods/pipeline.md; the estimator follows from E[R] = S a e, Duncan et al. 2009).
// The expected numbers are worked by hand from the inputs below; they are exact in binary
// floating point up to rounding, hence the 1e-12 relative margins.
#include <catch2/catch.hpp>

#include <cmath>

#include "safesite/error.hpp"
#include "safesite/pipeline/establishment.hpp"

using safesite::pipeline::estimate_establishment;
using safesite::pipeline::SeedsAndRecruits;

TEST_CASE("establishment per year and pooled is recruits over seeds times arrival",
          "[pipeline][unit]") {
    const std::vector<std::string> sites{"gravel", "cushion"};
    Eigen::VectorXd a(2);
    a << 0.8, 0.2;
    // Year 2001: 900 counted + 100 predicted seeds = 1000; 8 recruits on gravel, 10 under
    // cushions → ê = 8/800 = 0.01 and 10/200 = 0.05.
    // Year 2002: 3000 seeds; 12 and 30 recruits → 12/2400 = 0.005 and 30/600 = 0.05.
    // Pooled: (8+12)/(0.8·4000) = 0.00625 and (10+30)/(0.2·4000) = 0.05.
    std::vector<SeedsAndRecruits> data{{"2001", 900.0, 100.0, {8.0, 10.0}},
                                       {"2002", 3000.0, 0.0, {12.0, 30.0}}};
    const auto est = estimate_establishment(data, sites, a);
    REQUIRE(est.by_year.size() == 2);
    CHECK(est.by_year[0][0] == Approx(0.01).epsilon(1e-12));
    CHECK(est.by_year[0][1] == Approx(0.05).epsilon(1e-12));
    CHECK(est.by_year[1][0] == Approx(0.005).epsilon(1e-12));
    CHECK(est.pooled[0] == Approx(0.00625).epsilon(1e-12));
    CHECK(est.pooled[1] == Approx(0.05).epsilon(1e-12));
    // Long form: 2 years × 2 microsites, then 2 pooled rows.
    REQUIRE(est.rows.size() == 6);
    CHECK(est.rows[4].year == "pooled");
    CHECK(est.rows[4].seeds == Approx(4000.0).epsilon(1e-12));
    CHECK(est.rows[5].recruits == Approx(40.0).epsilon(1e-12));
    CHECK(est.warnings.empty());
    CHECK(est.for_year("2002")[0] == Approx(0.005).epsilon(1e-12));
    CHECK_THROWS_AS(est.for_year("1999"), safesite::UsageError);
}

TEST_CASE("establishment flags undefined and implausible estimates", "[pipeline][unit]") {
    const std::vector<std::string> sites{"gravel", "cushion"};
    Eigen::VectorXd a(2);
    a << 1.0, 0.0;
    // No seed reaches the cushions and none recruits there: undefined per year, pooled 0
    // (it cannot change λ because a_m e_m = 0), with a warning.
    std::vector<SeedsAndRecruits> data{{"2001", 10.0, 0.0, {20.0, 0.0}}};
    const auto est = estimate_establishment(data, sites, a);
    CHECK(std::isnan(est.by_year[0][1]));
    CHECK(est.pooled[1] == 0.0);
    // 20 recruits from 10 seeds: ê = 2 > 1 is reported, not hidden.
    CHECK(est.pooled[0] == Approx(2.0).epsilon(1e-12));
    CHECK(est.warnings.size() >= 2);
    CHECK(est.for_year("2001")[1] == 0.0);

    // Recruits where no seed can arrive: the closed-population estimator has no answer.
    std::vector<SeedsAndRecruits> bad{{"2001", 10.0, 0.0, {1.0, 3.0}}};
    CHECK_THROWS_AS(estimate_establishment(bad, sites, a), safesite::NumericalError);
    Eigen::VectorXd wrong(1);
    wrong << 1.0;
    CHECK_THROWS_AS(estimate_establishment(data, sites, wrong), safesite::UsageError);
}
