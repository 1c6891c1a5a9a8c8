// Loggerhead sea turtle stage matrix: Crouse, Crowder & Caswell (1987) Ecology 68:1412–1423,
// the 7-stage matrix (also Caswell 2001, Matrix Population Models, 2nd ed., worked example).
// Data and the comparison values are in tests/data/crouse-1987-loggerhead.csv (header: λ,
// stable stage distribution, reproductive values and elasticities computed with numpy 1.24).
#include <catch2/catch.hpp>

#include "safesite/analysis/eigen_triple.hpp"
#include "support/stage_matrix_csv.hpp"

using safesite::analysis::dominant_eigen;

namespace {
Eigen::MatrixXd loggerhead() {
    return safesite::test::read_stage_matrix(std::string(SAFESITE_TEST_DATA) +
                                             "/crouse-1987-loggerhead.csv");
}
}  // namespace

TEST_CASE("loggerhead: lambda, stable structure and reproductive values",
          "[analysis][reference]") {
    const Eigen::MatrixXd A = loggerhead();
    REQUIRE(A.rows() == 7);
    const auto t = dominant_eigen(A);

    // Published λ = 0.9450 (Crouse et al. 1987): four decimals, so |λ − 0.9450| ≤ 0.5e-4.
    CHECK(t.lambda == Approx(0.9450).margin(0.5e-4));
    // Header value 0.945030981 (9 decimals): rounding ≤ 0.5e-9; allow 1e-9.
    CHECK(t.lambda == Approx(0.945030981).margin(1e-9));

    // Stable stage distribution (sums to 1), header gives 6 decimals: 1e-5 covers the
    // rounding (0.5e-6) with a wide margin, as issue 2 asks.
    const double w_ref[7] = {0.206505, 0.669750, 0.114600, 0.006624, 0.000363, 0.000311,
                             0.001848};
    CHECK(t.w.sum() == Approx(1.0).margin(1e-14));
    for (int i = 0; i < 7; ++i) {
        INFO("stage " << i + 1);
        CHECK(t.w[i] == Approx(w_ref[i]).margin(1e-5));
    }
    // Reproductive values scaled to stage 1 = 1; the header prints 4 decimals, so the
    // tolerance is the rounding half-unit 0.5e-4 (not 1e-5: the source is not that precise).
    const double v_ref[7] = {1.0000, 1.4007, 5.9955, 115.8445, 568.7809, 507.3730, 587.6693};
    const Eigen::VectorXd v = t.v / t.v[0];
    for (int i = 0; i < 7; ++i) {
        INFO("stage " << i + 1);
        CHECK(v[i] == Approx(v_ref[i]).margin(0.5e-4 + 1e-9));
    }
    CHECK(t.v.dot(t.w) == Approx(1.0).margin(1e-12));
}

#include "safesite/analysis/kernel_sensitivity.hpp"

TEST_CASE("loggerhead: the 13 non-zero elasticities", "[analysis][reference]") {
    // Values from the data file header (5 decimals; rounding ≤ 0.5e-5, so 1e-5 as issue 2
    // asks is met with room). Row, column are 1-based stages (t+1, t).
    const Eigen::MatrixXd A = loggerhead();
    const auto op = safesite::kernel::KernelOperator::from_stage_matrix(A);
    const auto t = dominant_eigen(op);
    const safesite::analysis::KernelSensitivity ks(op, t);
    const Eigen::MatrixXd E = ks.elasticity_matrix();
    struct Cell {
        int row, col;
        double value;
    };
    const Cell ref[13] = {{1, 5, 0.01205}, {1, 6, 0.00032}, {1, 7, 0.03863}, {2, 1, 0.05100},
                          {2, 2, 0.18069}, {3, 2, 0.05100}, {3, 3, 0.11869}, {4, 3, 0.05100},
                          {4, 4, 0.13851}, {5, 4, 0.05100}, {6, 5, 0.03895}, {7, 6, 0.03863},
                          {7, 7, 0.22952}};
    int nonzero = 0;
    for (Eigen::Index i = 0; i < 7; ++i)
        for (Eigen::Index j = 0; j < 7; ++j) nonzero += E(i, j) != 0.0 ? 1 : 0;
    CHECK(nonzero == 13);
    for (const Cell& c : ref) {
        INFO("elasticity (" << c.row << "," << c.col << ")");
        CHECK(E(c.row - 1, c.col - 1) == Approx(c.value).margin(1e-5));
    }
    // Elasticities sum to 1 (Caswell 2001 §9.2): rounding only.
    CHECK(E.sum() == Approx(1.0).margin(1e-12));
}
