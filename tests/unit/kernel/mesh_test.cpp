// Mesh and quadrature rules.
#include <catch2/catch.hpp>

#include <cmath>

#include <boost/math/quadrature/gauss.hpp>

#include "safesite/kernel/kernel_error.hpp"
#include "safesite/kernel/mesh.hpp"

using safesite::kernel::KernelError;
using safesite::kernel::Mesh;
using safesite::kernel::QuadratureRule;

TEST_CASE("midpoint mesh: equal cells, nodes at the cell centres", "[kernel][unit]") {
    // Definition of the midpoint rule (Easterling et al. 2000, eq. 5).
    const Mesh mesh(-1.0, 3.0, 8);
    REQUIRE(mesh.size() == 8);
    CHECK(mesh.rule() == QuadratureRule::midpoint);
    CHECK(mesh.points()[0] == Approx(-0.75).margin(1e-15));
    CHECK(mesh.points()[7] == Approx(2.75).margin(1e-15));
    CHECK(mesh.weights().sum() == Approx(4.0).margin(1e-14));
    CHECK((mesh.weights().array() == 0.5).all());
}

// Compare our run-time Gauss–Legendre nodes and weights with Boost.Math's compile-time tables
// (boost/math/quadrature/gauss.hpp, which store the non-negative half) for several N. The
// tables are given to more digits than double, so agreement to a few ulps (1e-14) is expected.
template <unsigned N>
void check_against_boost_table() {
    using Table = boost::math::quadrature::gauss<double, N>;
    const Mesh mesh(-1.0, 1.0, N, QuadratureRule::gauss_legendre);
    const auto& x = Table::abscissa();
    const auto& w = Table::weights();
    const std::size_t half = N / 2;  // index of the first non-negative node in our ascending list
    for (std::size_t k = 0; k < x.size(); ++k) {
        INFO("N = " << N << ", k = " << k);
        const auto up = static_cast<Eigen::Index>(half + k);
        const auto down = static_cast<Eigen::Index>(N - 1 - half - k);
        CHECK(mesh.points()[up] == Approx(x[k]).margin(1e-14));
        CHECK(mesh.weights()[up] == Approx(w[k]).margin(1e-14));
        CHECK(mesh.points()[down] == Approx(-x[k]).margin(1e-14));
        CHECK(mesh.weights()[down] == Approx(w[k]).margin(1e-14));
    }
}

TEST_CASE("Gauss-Legendre nodes and weights match Boost.Math's tables", "[kernel][unit]") {
    check_against_boost_table<7>();
    check_against_boost_table<10>();
    check_against_boost_table<20>();
    check_against_boost_table<30>();
}

TEST_CASE("Gauss-Legendre on [L, U] integrates polynomials of degree 2n-1 exactly",
          "[kernel][unit]") {
    // Exactness for degree ≤ 2n − 1 is the defining property of the rule (common practice).
    const Mesh mesh(2.0, 5.0, 6, QuadratureRule::gauss_legendre);
    double sum = 0.0;
    for (Eigen::Index i = 0; i < 6; ++i) sum += mesh.weights()[i] * std::pow(mesh.points()[i], 11);
    const double exact = (std::pow(5.0, 12) - std::pow(2.0, 12)) / 12.0;
    CHECK(sum == Approx(exact).epsilon(1e-13));
    for (Eigen::Index i = 1; i < 6; ++i) CHECK(mesh.points()[i] > mesh.points()[i - 1]);
}

TEST_CASE("bad meshes are refused with the parameter named", "[kernel][unit]") {
    REQUIRE_THROWS_AS(Mesh(1.0, 1.0, 10), KernelError);
    try {
        Mesh(2.0, 1.0, 10);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "mesh");
        CHECK(e.parameter() == "upper");
    }
    try {
        Mesh(0.0, 1.0, 1, QuadratureRule::gauss_legendre);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "mesh");
        CHECK(e.parameter() == "size");
    }
    try {
        Mesh(std::nan(""), 1.0, 10);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.parameter() == "lower");
    }
}
