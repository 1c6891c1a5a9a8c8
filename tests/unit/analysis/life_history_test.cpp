// Life history from the fundamental operator (I − P)^{-1}.
#include <catch2/catch.hpp>

#include <cmath>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/analysis/life_history.hpp"
#include "safesite/error.hpp"
#include "support/kernel_fixtures.hpp"
#include "support/stage_matrix_csv.hpp"

using namespace safesite::kernel;
using namespace safesite::analysis;

TEST_CASE("life history of the size-independent IPM: closed forms", "[analysis][unit]") {
    // Survival s = 0.5 and fecundity f = 0.3 for every size, kernels integrated exactly by
    // Gauss–Legendre: λ = s + f = 0.8, life expectancy Σ_t s^t = 1/(1 − s) = 2 (current
    // census included), R0 = f/(1 − s) = 0.6 (Caswell 2001 §5.3, geometric series), and
    // T = log R0 / log λ (Ellner, Childs & Rees 2016 §3.3). Only rounding error: 1e-10.
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
    const auto lh = life_history(op, t.lambda);
    CHECK(lh.net_reproductive_rate == Approx(0.6).epsilon(1e-10));
    REQUIRE(lh.generation_time.has_value());
    CHECK(*lh.generation_time == Approx(std::log(0.6) / std::log(0.8)).epsilon(1e-10));
    CHECK(lh.life_expectancy.minCoeff() == Approx(2.0).epsilon(1e-10));
    CHECK(lh.life_expectancy.maxCoeff() == Approx(2.0).epsilon(1e-10));
}

TEST_CASE("life history: operator route equals the dense P, F route on the same kernel",
          "[analysis][unit]") {
    const auto d = safesite::test::random_description(2, 1, 21);
    const KernelOperator op(Mesh(0.0, 10.0, 15, QuadratureRule::gauss_legendre), d);
    const auto t = dominant_eigen(op);
    const auto a = life_history(op, t.lambda);
    // The dense route works on plain matrices (ω = 1). Use the similar matrices
    // Ω A Ω^{-1}, whose entries are mass transitions; R0 is similarity-invariant and the
    // life expectancy per individual is the same.
    const Eigen::VectorXd om = op.state_weights();
    const Eigen::MatrixXd P = om.asDiagonal() * op.to_dense(KernelPart::survival_growth) *
                              om.cwiseInverse().asDiagonal();
    const Eigen::MatrixXd F = om.asDiagonal() * op.to_dense(KernelPart::reproduction) *
                              om.cwiseInverse().asDiagonal();
    const auto b = life_history(P, F, t.lambda);
    CHECK(a.net_reproductive_rate == Approx(b.net_reproductive_rate).epsilon(1e-10));
    CHECK((a.life_expectancy - b.life_expectancy).cwiseAbs().maxCoeff() <= 1e-10);
    // R0 > 1 exactly when λ > 1 (Cushing & Zhou 1994, from memory).
    CHECK((a.net_reproductive_rate > 1.0) == (t.lambda > 1.0));
}

TEST_CASE("life history of the loggerhead matrix: life expectancy as a series, R0 below 1",
          "[analysis][unit]") {
    // Crouse, Crowder & Caswell (1987) matrix; fertilities are row 1, the rest is P.
    const Eigen::MatrixXd A = safesite::test::read_stage_matrix(std::string(SAFESITE_TEST_DATA) +
                                                                "/crouse-1987-loggerhead.csv");
    Eigen::MatrixXd F = Eigen::MatrixXd::Zero(7, 7);
    F.row(0) = A.row(0);
    const Eigen::MatrixXd P = A - F;
    const auto lh = life_history(P, F, 0.945030981);
    // Independent check: eᵀ N = Σ_t eᵀ P^t (ρ(P) ≈ 0.81, 400 terms leave < 1e-30).
    Eigen::RowVectorXd term = Eigen::RowVectorXd::Ones(7), sum = Eigen::RowVectorXd::Zero(7);
    for (int k = 0; k < 400; ++k) {
        sum += term;
        term = term * P;
    }
    for (int j = 0; j < 7; ++j) CHECK(lh.life_expectancy[j] == Approx(sum[j]).epsilon(1e-12));
    CHECK(lh.net_reproductive_rate < 1.0);  // λ < 1 ⇔ R0 < 1
}

TEST_CASE("life history refuses P with spectral radius >= 1", "[analysis][unit]") {
    // Immortal plants: survival 1 and the boundary eviction policy keep all mass: ρ(P) = 1.
    KernelDescription d;
    ContinuousClass c;
    c.survival = [](double) { return 1.0; };
    c.growth = Growth::gaussian([](double z) { return z; }, [](double) { return 0.5; });
    d.classes.push_back(c);
    d.microsites.push_back({"m", 1.0, 0.1, SizeDensity::gaussian(1.0, 0.5), 0});
    const KernelOperator op(Mesh(0.0, 4.0, 20), d);
    REQUIRE_THROWS_AS(life_history(op, 1.0), safesite::NumericalError);
}
