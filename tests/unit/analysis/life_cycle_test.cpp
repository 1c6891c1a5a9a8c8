// Life-cycle measures: probability of flowering before death, age at first flowering, and the
// moments of lifetime seed production (analysis::life_history with LifeCycleRates).
#include <catch2/catch.hpp>

#include <cmath>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/analysis/life_history.hpp"
#include "safesite/error.hpp"
#include "support/kernel_fixtures.hpp"

using namespace safesite::kernel;
using namespace safesite::analysis;

namespace {

// Two stages, juvenile J and adult A, column convention P_ij = from j to i (hand-derived).
//   P = [0.2 0; 0.4 0.6]: J stays J 0.2, J → A 0.4 (dies 0.4); A survives 0.6.
//   N = (I − P)^{-1} = [1.25 0; 1.25 2.5] (lower triangular: 1/0.8, 0.4/(0.8·0.4), 1/0.4).
//   Life expectancy 1ᵀN = (2.5, 2.5).
// Flowering p = (0, 0.5); P0 = P diag(1 − p) = [0.2 0; 0.4 0.3];
//   N0 = [1.25 0; 5/7 10/7];  B = pᵀN0 = (5/14, 5/7).
//   Directly: B_A = 0.5 + 0.5·0.6·B_A ⇒ 5/7; B_J = 0.2 B_J + 0.4 B_A ⇒ 5/14.
//   Age: pᵀN0² − B = (29.375/49, 15/49), A = (47/28, 3/7). Directly: an adult first flowers
//   at age a with probability 0.5·0.3^a, mean 0.3/0.7 = 3/7; a juvenile that gets there
//   needs a geometric number of steps with mean 1/(1 − 0.2) = 1.25, so 1.25 + 3/7 = 47/28.
// Seeds: b = 4 per flowering plant, flowering Bernoulli(p), seed number fixed:
//   ρ1 = p b = (0, 2), ρ2 = p b² = (0, 8).
//   m1ᵀ = ρ1ᵀN = (2.5, 5); g = ρ2 + 2ρ1∘(m1 − ρ1) = (0, 20); m2ᵀ = gᵀN = (25, 50);
//   variance (18.75, 25). Directly for A: R = 4 Σ_{i≤L} X_i, L geometric (mean 2.5,
//   variance 0.6/0.4² = 3.75), X_i Bernoulli(0.5): Var = 16 (2.5·0.25 + 3.75·0.25) = 25.
//   For J: R_J = I·R_A with I Bernoulli(0.5): E = 2.5, E[R²] = 25, Var = 18.75.
struct TwoStage {
    Eigen::MatrixXd P{{0.2, 0.0}, {0.4, 0.6}};
    Eigen::MatrixXd F{{0.0, 1.5}, {0.0, 0.0}};
    LifeCycleRates rates;
    TwoStage() {
        rates.flowering = Eigen::Vector2d(0.0, 0.5);
        rates.reward = Eigen::Vector2d(0.0, 2.0);
        rates.reward_square = Eigen::Vector2d(0.0, 8.0);
    }
};

}  // namespace

TEST_CASE("life cycle of a two-stage matrix: hand-derived values", "[analysis][unit]") {
    // Exact rational values (derivation above); only rounding error: 1e-12.
    const TwoStage t;
    const auto lh = life_history(t.P, t.F, 1.0, &t.rates);
    REQUIRE(lh.cycle.has_value());
    const LifeCycle& c = *lh.cycle;
    CHECK(lh.life_expectancy[0] == Approx(2.5).epsilon(1e-12));
    CHECK(lh.life_expectancy[1] == Approx(2.5).epsilon(1e-12));
    CHECK(c.flowering_probability[0] == Approx(5.0 / 14.0).epsilon(1e-12));
    CHECK(c.flowering_probability[1] == Approx(5.0 / 7.0).epsilon(1e-12));
    CHECK(c.first_flowering_age[0] == Approx(47.0 / 28.0).epsilon(1e-12));
    CHECK(c.first_flowering_age[1] == Approx(3.0 / 7.0).epsilon(1e-12));
    CHECK(c.reward_mean[0] == Approx(2.5).epsilon(1e-12));
    CHECK(c.reward_mean[1] == Approx(5.0).epsilon(1e-12));
    CHECK(c.reward_second_moment[0] - c.reward_mean[0] * c.reward_mean[0] ==
          Approx(18.75).epsilon(1e-12));
    CHECK(c.reward_second_moment[1] - c.reward_mean[1] * c.reward_mean[1] ==
          Approx(25.0).epsilon(1e-12));

    // A cohort born half J, half A (hand-derived from the values above):
    // B = (5/14 + 5/7)/2 = 15/28; age = (½·5/14·47/28 + ½·5/7·3/7)/(15/28) = 71/84;
    // mean seeds 3.75; variance ½·25 + ½·50 − 3.75² = 23.4375.
    const auto h = cohort_life_cycle(lh, Eigen::Vector2d(0.5, 0.5));
    CHECK(h.life_expectancy == Approx(2.5).epsilon(1e-12));
    CHECK(h.flowering_probability == Approx(15.0 / 28.0).epsilon(1e-12));
    CHECK(h.first_flowering_age == Approx(71.0 / 84.0).epsilon(1e-12));
    CHECK(h.reward_mean == Approx(3.75).epsilon(1e-12));
    CHECK(h.reward_variance == Approx(23.4375).epsilon(1e-12));
}

TEST_CASE("life cycle of the size-independent IPM: closed forms", "[analysis][unit]") {
    // Survival s = 0.5 and flowering p = 0.5 at every size; growth integrated exactly by
    // Gauss–Legendre (polynomial density), so every state is alike. Closed forms (derived here,
    // geometric series; common practice):
    //   life expectancy 1/(1 − s) = 2;
    //   B = p / (1 − (1 − p) s) = 2/3; age at first flowering (1 − p)s / (1 − (1 − p)s) = 1/3;
    //   lifetime reward with a constant reward r = 1.2 per census: mean r/(1 − s) = 2.4,
    //   variance r² s/(1 − s)² = 2.88 (r² times the variance of the geometric lifetime).
    //   The request for this check proposed r² s (1 + s)/(1 − s)²; derived carefully, the
    //   second moment is r² (1 + s)/(1 − s)² and the variance r² s/(1 − s)².
    KernelDescription d;
    ContinuousClass c;
    c.survival = [](double) { return 0.5; };
    c.growth = Growth::general([](double to, double from) {
        return (1.0 - from) * 6.0 * to * (1.0 - to) + from * 30.0 * to * to * (1 - to) * (1 - to);
    });
    c.flowering = [](double) { return 0.5; };
    c.seeds = [](double) { return 2.4; };
    d.classes.push_back(c);
    d.microsites.push_back(
        {"m", 1.0, 0.25, SizeDensity::general([](double z) { return 6.0 * z * (1.0 - z); }), 0});
    const KernelOperator op(Mesh(0.0, 1.0, 30, QuadratureRule::gauss_legendre), d);
    const auto t = dominant_eigen(op);
    LifeCycleRates r;
    r.flowering = Eigen::VectorXd::Constant(op.rows(), 0.5);
    r.reward = Eigen::VectorXd::Constant(op.rows(), 1.2);
    r.reward_square = r.reward.cwiseProduct(r.reward);
    const auto lh = life_history(op, t.lambda, &r);
    REQUIRE(lh.cycle.has_value());
    const LifeCycle& cy = *lh.cycle;
    // Rounding only (quadrature exact): 1e-10.
    for (Eigen::Index j = 0; j < op.rows(); ++j) {
        CHECK(lh.life_expectancy[j] == Approx(2.0).epsilon(1e-10));
        CHECK(cy.flowering_probability[j] == Approx(2.0 / 3.0).epsilon(1e-10));
        CHECK(cy.first_flowering_age[j] == Approx(1.0 / 3.0).epsilon(1e-10));
        CHECK(cy.reward_mean[j] == Approx(2.4).epsilon(1e-10));
        CHECK(cy.reward_second_moment[j] - cy.reward_mean[j] * cy.reward_mean[j] ==
              Approx(2.88).epsilon(1e-10));
    }
    // A cohort at the recruit-size distribution: numbers ω_i c(z_i), which sum to 1.
    const Eigen::VectorXd birth = op.state_weights().cwiseProduct(op.recruit_density(0));
    const auto h = cohort_life_cycle(lh, birth / birth.sum());
    CHECK(h.reward_variance == Approx(2.88).epsilon(1e-10));
    CHECK(h.first_flowering_age == Approx(1.0 / 3.0).epsilon(1e-10));
}

TEST_CASE("life cycle invariants on a random structured kernel", "[analysis][unit]") {
    // Invariants (common practice): 0 ≤ B ≤ 1; B ≥ p (flowering now counts); age ≥ 0;
    // variance ≥ 0; with ρ1 = 1 (ρ2 = 1) the lifetime reward is the life expectancy; and the
    // operator route (weights ω) equals the plain-matrix route on Ω P Ω^{-1} (fixed seed 21).
    const auto d = safesite::test::random_description(2, 1, 21);
    const KernelOperator op(Mesh(0.0, 10.0, 15, QuadratureRule::gauss_legendre), d);
    const auto t = dominant_eigen(op);
    const Eigen::Index n = op.rows();
    LifeCycleRates r;
    r.flowering = Eigen::VectorXd::LinSpaced(n, 0.0, 0.9);
    r.reward = Eigen::VectorXd::Ones(n);
    r.reward_square = Eigen::VectorXd::Ones(n);
    const auto a = life_history(op, t.lambda, &r);
    REQUIRE(a.cycle.has_value());
    const LifeCycle& c = *a.cycle;
    CHECK((c.reward_mean - a.life_expectancy).cwiseAbs().maxCoeff() <= 1e-10);
    CHECK(c.flowering_probability.minCoeff() >= 0.0);
    CHECK(c.flowering_probability.maxCoeff() <= 1.0 + 1e-12);
    CHECK((c.flowering_probability - r.flowering).minCoeff() >= -1e-12);
    for (Eigen::Index j = 0; j < n; ++j)
        if (c.flowering_probability[j] > 0.0) CHECK(c.first_flowering_age[j] >= 0.0);
    CHECK((c.reward_second_moment - c.reward_mean.cwiseProduct(c.reward_mean)).minCoeff() >=
          -1e-10);

    const Eigen::VectorXd om = op.state_weights();
    const Eigen::MatrixXd P =
        om.asDiagonal() * op.to_dense(KernelPart::survival_growth) * om.cwiseInverse().asDiagonal();
    const Eigen::MatrixXd F =
        om.asDiagonal() * op.to_dense(KernelPart::reproduction) * om.cwiseInverse().asDiagonal();
    const auto b = life_history(P, F, t.lambda, &r);
    REQUIRE(b.cycle.has_value());
    CHECK((c.flowering_probability - b.cycle->flowering_probability).cwiseAbs().maxCoeff() <=
          1e-10);
    CHECK((c.reward_second_moment - b.cycle->reward_second_moment).cwiseAbs().maxCoeff() <= 1e-9);
}

TEST_CASE("life cycle: inadmissible rates and birth distributions are usage errors",
          "[analysis][unit]") {
    TwoStage t;
    t.rates.flowering[1] = 1.5;
    REQUIRE_THROWS_AS(life_history(t.P, t.F, 1.0, &t.rates), safesite::UsageError);
    TwoStage u;
    u.rates.reward_square[1] = 1.0;  // below ρ1² = 4
    REQUIRE_THROWS_AS(life_history(u.P, u.F, 1.0, &u.rates), safesite::UsageError);
    const TwoStage v;
    const auto lh = life_history(v.P, v.F, 1.0, &v.rates);
    REQUIRE_THROWS_AS(cohort_life_cycle(lh, Eigen::Vector2d(0.5, 0.6)), safesite::UsageError);
    const auto plain = life_history(v.P, v.F, 1.0);
    REQUIRE_THROWS_AS(cohort_life_cycle(plain, Eigen::Vector2d(0.5, 0.5)), safesite::UsageError);
}
