// The matrix exponential behind the arrival chain (Eigen's MatrixFunctions, scaling and
// squaring, Higham 2005) on the classic hard example of Moler & Van Loan.
//
// Source: Moler, C. & Van Loan, C. (2003) Nineteen dubious ways to compute the exponential of
// a matrix, twenty-five years later. SIAM Review 45:3–49, section 1 (the example also opens the
// 1978 paper): A = [[−49, 24], [−64, 31]] with
//   e^A = [[−0.735759, 0.551819], [−1.471518, 1.103638]]  (printed to 6 decimals; from memory).
// The printed values follow from the eigendecomposition A = V diag(−1, −17) V⁻¹ with
// V = [[1, 3], [2, 4]], which the test also evaluates in closed form to full precision.
#include <catch2/catch.hpp>

#include <cmath>

#include <Eigen/Core>
#include <unsupported/Eigen/MatrixFunctions>


TEST_CASE("exp of Moler & Van Loan's example matrix", "[arrival][reference]") {
    Eigen::Matrix2d a;
    a << -49.0, 24.0, -64.0, 31.0;
    const Eigen::Matrix2d e = a.exp();

    // Printed values (6 decimals): tolerance half a unit in the last place, 5e-7.
    CHECK(e(0, 0) == Approx(-0.735759).margin(5e-7));
    CHECK(e(0, 1) == Approx(0.551819).margin(5e-7));
    CHECK(e(1, 0) == Approx(-1.471518).margin(5e-7));
    CHECK(e(1, 1) == Approx(1.103638).margin(5e-7));

    // Closed form V diag(e^−1, e^−17) V⁻¹, V⁻¹ = [[−2, 1.5], [1, −0.5]]. Scaling and squaring is
    // backward stable to about u‖A‖ (Higham 2005); with ‖A‖ ≈ 100 and entries of order 1, a
    // 1e-12 absolute tolerance leaves a margin of ~50 over that bound.
    Eigen::Matrix2d v, vinv;
    v << 1.0, 3.0, 2.0, 4.0;
    vinv << -2.0, 1.5, 1.0, -0.5;
    const Eigen::Matrix2d exact =
        v * Eigen::Vector2d(std::exp(-1.0), std::exp(-17.0)).asDiagonal() * vinv;
    CHECK((e - exact).cwiseAbs().maxCoeff() < 1e-12);
}
