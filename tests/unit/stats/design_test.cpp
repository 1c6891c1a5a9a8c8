// Design matrices: column names (docs/formats.md), treatment contrasts and the margin rule
// (Chambers & Hastie 1992, §2.4.1), missing rows, and prediction-time consistency of the
// stored polynomial and spline constants. Expected values are computed by hand in the tests.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>

#include <Eigen/Dense>

#include "safesite/stats/design.hpp"

using namespace safesite::stats;
using safesite::DataError;

namespace {

Table plants() {
    Table t;
    t.add_numeric("size", {0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0});
    t.add_numeric("y", {0, 0, 1, 0, 1, 1, 0, 1, 1, 1});
    t.add_categorical("microsite", {"gravel", "cushion", "tussock", "gravel", "cushion",
                                    "tussock", "gravel", "cushion", "tussock", "gravel"},
                      {"gravel", "cushion", "tussock"});
    return t;
}

}  // namespace

TEST_CASE("design column names follow docs/formats.md", "[stats][unit]") {
    const Design d = build_design("y ~ size * microsite + pow(size, 2)", plants());
    CHECK(d.column_names ==
          std::vector<std::string>{"(Intercept)", "size", "microsite[cushion]",
                                   "microsite[tussock]", "pow(size,2)", "size:microsite[cushion]",
                                   "size:microsite[tussock]"});
    REQUIRE(d.X.rows() == 10);
    // Row 2 (size 1.0, cushion): 1, 1, 1, 0, 1, 1, 0.
    Eigen::VectorXd expect(7);
    expect << 1, 1.0, 1, 0, 1.0, 1.0, 0;
    CHECK((d.X.row(1).transpose() - expect).cwiseAbs().maxCoeff() == 0.0);
    CHECK(d.dropped == 0);
    CHECK(d.trials.isOnes());
}

TEST_CASE("reference level by ref() and indicator coding without the margin", "[stats][unit]") {
    const Design a = build_design("y ~ ref(microsite, tussock)", plants());
    CHECK(a.column_names ==
          std::vector<std::string>{"(Intercept)", "microsite[gravel]", "microsite[cushion]"});
    const Design b = build_design("y ~ microsite - 1", plants());
    CHECK(b.column_names == std::vector<std::string>{"microsite[gravel]", "microsite[cushion]",
                                                     "microsite[tussock]"});
    CHECK((b.X.rowwise().sum().array() == 1.0).all());
    // size:microsite without microsite: one slope per level (size is the margin, absent).
    const Design c = build_design("y ~ size:microsite", plants());
    CHECK(c.column_names ==
          std::vector<std::string>{"(Intercept)", "size:microsite[gravel]",
                                   "size:microsite[cushion]", "size:microsite[tussock]"});
    CHECK(c.spec.levels("microsite") == std::vector<std::string>{"gravel", "cushion", "tussock"});
}

TEST_CASE("rows with missing values are dropped and counted", "[stats][unit]") {
    Table t = plants();
    auto size = t.numeric("size");
    size[3] = std::numeric_limits<double>::quiet_NaN();
    t.add_numeric("size", size);
    auto micro = t.categorical("microsite");
    micro.values[7] = "";
    t.add_categorical("microsite", micro.values, micro.levels);
    const Design d = build_design("y ~ size + microsite", t);
    CHECK(d.dropped == 2);
    CHECK(d.rows == std::vector<std::size_t>{0, 1, 2, 4, 5, 6, 8, 9});
    CHECK(d.X.rows() == 8);
    CHECK(d.y.size() == 8);
    // A column not in the formula does not drop rows.
    CHECK(build_design("y ~ microsite", plants()).dropped == 0);
}

TEST_CASE("ratio response fills trials; offsets are summed", "[stats][unit]") {
    Table t;
    t.add_numeric("trapped", {1, 2, 3});
    t.add_numeric("launched", {10, 20, 30});
    t.add_numeric("days", {1, std::exp(1.0), 2});
    t.add_numeric("x", {0, 1, 2});
    const Design d = build_design("trapped / launched ~ x + offset(log(days)) + offset(x)", t);
    CHECK(d.y == Eigen::Vector3d(1, 2, 3));
    CHECK(d.trials == Eigen::Vector3d(10, 20, 30));
    CHECK(d.offset[0] == Approx(0.0).margin(1e-15));
    CHECK(d.offset[1] == Approx(2.0).epsilon(1e-15));
    CHECK(d.offset[2] == Approx(std::log(2.0) + 2.0).epsilon(1e-15));
}

TEST_CASE("orthpoly columns are orthonormal, span the powers and predict consistently",
          "[stats][unit]") {
    const Table t = plants();
    const Design d = build_design("y ~ orthpoly(size, 3)", t);
    CHECK(d.column_names == std::vector<std::string>{"(Intercept)", "orthpoly(size,3)[1]",
                                                     "orthpoly(size,3)[2]",
                                                     "orthpoly(size,3)[3]"});
    const Eigen::MatrixXd P = d.X.rightCols(3);
    // Orthonormal and orthogonal to the constant on the training rows (by construction).
    CHECK((P.transpose() * P - Eigen::Matrix3d::Identity()).cwiseAbs().maxCoeff() < 1e-12);
    CHECK((P.transpose() * Eigen::VectorXd::Ones(10)).cwiseAbs().maxCoeff() < 1e-12);
    // Same column space as 1, x, x², x³: the projection residual of x³ is zero.
    const Eigen::VectorXd x3 = Eigen::Map<const Eigen::VectorXd>(t.numeric("size").data(), 10)
                                   .array().cube().matrix();
    const Eigen::VectorXd coef = d.X.colPivHouseholderQr().solve(x3);
    CHECK((d.X * coef - x3).norm() < 1e-10 * x3.norm());
    // Prediction on new rows (reordered, repeated) equals the training rows.
    const std::vector<std::size_t> pick{7, 2, 2, 9, 0};
    const Table nd = t.select_rows(pick);
    const Eigen::MatrixXd Xn = d.spec.model_matrix(nd, d.spec.complete_rows(nd, false));
    for (std::size_t i = 0; i < pick.size(); ++i)
        CHECK((Xn.row(static_cast<Eigen::Index>(i)) -
               d.X.row(static_cast<Eigen::Index>(pick[i]))).cwiseAbs().maxCoeff() == 0.0);
}

TEST_CASE("nspline: quantile knots, natural boundary behaviour, consistent prediction",
          "[stats][unit]") {
    const Table t = plants();
    const Design d = build_design("y ~ nspline(size, df = 3)", t);
    CHECK(d.column_names == std::vector<std::string>{"(Intercept)", "nspline(size,3)[1]",
                                                     "nspline(size,3)[2]",
                                                     "nspline(size,3)[3]"});
    const LearnedAtom& la = d.spec.atoms().at(0);
    CHECK(la.lower == 0.5);
    CHECK(la.upper == 5.0);
    // Type-7 quantiles of 0.5..5.0 (step 0.5) at 1/3 and 2/3: 0.5 + 3·0.5 = 2.0, 3.5.
    REQUIRE(la.interior_knots.size() == 2);
    CHECK(la.interior_knots[0] == Approx(2.0).epsilon(1e-14));
    CHECK(la.interior_knots[1] == Approx(3.5).epsilon(1e-14));

    // Evaluate the basis on a fine grid within and beyond the boundary knots.
    Table grid;
    std::vector<double> g;
    for (int i = 0; i <= 160; ++i) g.push_back(-1.0 + 0.05 * i);  // -1 .. 7
    grid.add_numeric("size", g);
    const Eigen::MatrixXd B = d.spec.model_matrix(grid, d.spec.complete_rows(grid, false));
    // Linear outside [0.5, 5]: second differences vanish (beyond the boundary knots).
    // C² inside: second differences are continuous, third differences jump only at knots.
    for (Eigen::Index j = 1; j < 4; ++j) {
        for (int i = 1; i + 1 <= 160; ++i) {
            const double x = g[static_cast<std::size_t>(i)];
            const double second = B(i - 1, j) - 2 * B(i, j) + B(i + 1, j);
            if (x < 0.5 - 0.05 - 1e-9 || x > 5.0 + 0.05 + 1e-9)
                CHECK(std::abs(second) < 1e-12);
        }
    }
    // Known knots give the same basis as quantile knots at the same places.
    const Design k = build_design("y ~ nspline(size, knots = [2, 3.5])", t);
    CHECK(k.column_names[1] == "nspline(size,3)[1]");
    CHECK((k.X - d.X).cwiseAbs().maxCoeff() < 1e-14);
    // Prediction on new rows equals the training rows.
    const std::vector<std::size_t> pick{9, 0, 4};
    const Table nd = t.select_rows(pick);
    const Eigen::MatrixXd Xn = d.spec.model_matrix(nd, d.spec.complete_rows(nd, false));
    for (std::size_t i = 0; i < pick.size(); ++i)
        CHECK((Xn.row(static_cast<Eigen::Index>(i)) -
               d.X.row(static_cast<Eigen::Index>(pick[i]))).cwiseAbs().maxCoeff() == 0.0);
}

TEST_CASE("design errors: unknown column, wrong type, unknown level, log of non-positive",
          "[stats][unit]") {
    const Table t = plants();
    try {
        build_design("y ~ size + microsit", t);
        FAIL("no error");
    } catch (const FormulaError& e) {
        CHECK(e.column() == 12);
        CHECK(e.key() == "y ~ size + microsit");
        // The reason lists the available columns.
        for (const auto& name : t.names()) CHECK(e.reason().find(name) != std::string::npos);
    }
    try {
        build_design("y ~ log(microsite)", t);
        FAIL("no error");
    } catch (const FormulaError& e) {
        CHECK(e.column() == 9);
    }
    try {
        build_design("y ~ ref(microsite, sand)", t);
        FAIL("no error");
    } catch (const FormulaError& e) {
        CHECK(e.column() == 20);  // the unknown level itself
    }
    try {
        build_design("y ~ orthpoly(microsite, 2)", t);
        FAIL("no error");
    } catch (const FormulaError& e) {
        CHECK(e.column() == 14);
    }
    Table neg = t;
    auto size = neg.numeric("size");
    size[4] = -1.0;
    neg.add_numeric("size", size);
    try {
        build_design("y ~ log(size)", neg);
        FAIL("no error");
    } catch (const DataError& e) {
        CHECK(e.key() == "size");
    }
    // New data with a level the model has never seen.
    const Design d = build_design("y ~ microsite", t);
    Table nd;
    nd.add_categorical("microsite", {"gravel", "scree"});
    try {
        d.spec.complete_rows(nd, false);
        FAIL("no error");
    } catch (const DataError& e) {
        CHECK(e.key() == "microsite");
    }
}
