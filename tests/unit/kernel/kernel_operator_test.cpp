// The matrix-free kernel operator: application vs assembled matrix, parts, eviction, errors.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <random>

#include "safesite/kernel/kernel_error.hpp"
#include "safesite/kernel/kernel_operator.hpp"
#include "support/kernel_fixtures.hpp"

using namespace safesite::kernel;

namespace {

Eigen::VectorXd random_vector(Eigen::Index n, unsigned seed) {
    std::mt19937_64 rng(seed);
    std::uniform_real_distribution<double> u(-1.0, 1.0);
    Eigen::VectorXd x(n);
    for (Eigen::Index i = 0; i < n; ++i) x[i] = u(rng);
    return x;
}

// Standard normal CDF written independently of the library (erfc identity, common practice).
double phi_cdf(double x) { return 0.5 * std::erfc(-x / std::sqrt(2.0)); }

}  // namespace

TEST_CASE("operator application equals the assembled matrix, also transposed and by part",
          "[kernel][unit]") {
    for (std::size_t microsites = 1; microsites <= 3; ++microsites) {
        const auto d = safesite::test::random_description(microsites, 1, 11 + microsites);
        // Add a direct stage -> class flow and a class -> stage flow to cover those terms.
        auto d2 = d;
        d2.stages[0].to_classes.push_back({1, 0.05, SizeDensity::gaussian(2.0, 0.7)});
        d2.stages[0].from_classes.push_back({0, [](double z) { return 0.01 * z; }});
        const Mesh mesh(0.0, 10.0, 17, QuadratureRule::gauss_legendre);
        const KernelOperator op(mesh, d2);
        const Eigen::Index N = op.rows();
        REQUIRE(N == static_cast<Eigen::Index>(d2.classes.size() * 17 + 1));
        const Eigen::MatrixXd A = op.to_dense();
        const Eigen::VectorXd x = random_vector(N, 5);
        Eigen::VectorXd y(N), yt(N);
        op.perform_op(x.data(), y.data());
        op.perform_transposed_op(x.data(), yt.data());
        INFO("microsites = " << microsites);
        // Same sums in a different order: agreement to rounding (1e-12 relative).
        CHECK((y - A * x).norm() <= 1e-12 * (A * x).norm());
        CHECK((yt - A.transpose() * x).norm() <= 1e-12 * (A.transpose() * x).norm());
        CHECK(op.applications() == 2);
        op.reset_applications();
        CHECK(op.applications() == 0);

        const Eigen::MatrixXd P = op.to_dense(KernelPart::survival_growth);
        const Eigen::MatrixXd F = op.to_dense(KernelPart::reproduction);
        CHECK((P + F - A).cwiseAbs().maxCoeff() <= 1e-15 * A.cwiseAbs().maxCoeff());
        Eigen::VectorXd yp(N), yf(N);
        op.apply(KernelPart::survival_growth, x.data(), yp.data());
        op.apply(KernelPart::reproduction, x.data(), yf.data());
        CHECK((yp - P * x).norm() <= 1e-12 * (P * x).norm());
        CHECK((yf - F * x).norm() <= 1e-12 * (F * x).norm());
        op.apply_transposed(KernelPart::reproduction, x.data(), yf.data());
        CHECK((yf - F.transpose() * x).norm() <= 1e-12 * (F.transpose() * x).norm());
        CHECK((A.array() >= 0.0).all());
    }
}

TEST_CASE("stage matrix input keeps the matrix as given", "[kernel][unit]") {
    Eigen::MatrixXd M(3, 3);
    M << 0.1, 0.0, 5.0, 0.5, 0.3, 0.0, 0.0, 0.4, 0.9;
    const auto op = KernelOperator::from_stage_matrix(M);
    CHECK(op.rows() == 3);
    CHECK(op.class_count() == 0);
    CHECK(op.stage_count() == 3);
    CHECK((op.to_dense() - M).cwiseAbs().maxCoeff() == 0.0);
    CHECK((op.state_weights().array() == 1.0).all());
}

TEST_CASE("Gaussian growth: evicted fraction is the exact normal tail; boundary keeps mass",
          "[kernel][unit]") {
    // Williams, Miller & Ellner (2012): the evicted fraction of a Gaussian growth kernel is
    // Φ((L − μ)/σ) + 1 − Φ((U − μ)/σ); the boundary policy returns it to the edge cells.
    KernelDescription d;
    ContinuousClass c;
    c.survival = [](double) { return 1.0; };
    c.growth = Growth::gaussian([](double z) { return z + 0.5; }, [](double) { return 0.8; });
    d.classes.push_back(c);
    d.microsites.push_back({"only", 0.0, 0.0, SizeDensity::gaussian(1.0, 0.5), 0});
    const Mesh mesh(0.0, 6.0, 200, QuadratureRule::gauss_legendre);
    for (EvictionPolicy policy : {EvictionPolicy::boundary, EvictionPolicy::discard}) {
        d.eviction = policy;
        const KernelOperator op(mesh, d);
        const Eigen::MatrixXd P = op.block(0, 0);
        const Eigen::VectorXd& z = mesh.points();
        const Eigen::VectorXd& w = mesh.weights();
        for (Eigen::Index j : {Eigen::Index{0}, Eigen::Index{100}, Eigen::Index{199}}) {
            const double mu = z[j] + 0.5;
            const double tails = phi_cdf((0.0 - mu) / 0.8) + 1.0 - phi_cdf((6.0 - mu) / 0.8);
            CHECK(op.evicted_growth(0)[j] == Approx(tails).margin(1e-14));
            // Surviving mass that stays on the mesh: sum_i w_i P_ij / w_j. The quadrature error
            // of 200-point Gauss–Legendre on this smooth Gaussian is far below 1e-10.
            const double kept = w.dot(P.col(j)) / w[j];
            const double expected = policy == EvictionPolicy::boundary ? 1.0 : 1.0 - tails;
            INFO("policy " << static_cast<int>(policy) << ", j = " << j);
            CHECK(kept == Approx(expected).margin(1e-10));
        }
        CHECK(op.evicted_recruits(0) == Approx(phi_cdf(-2.0) + 1.0 - phi_cdf(10.0)).margin(1e-14));
    }
}

TEST_CASE("kernel values out of range are refused with block and parameter named",
          "[kernel][unit]") {
    const Mesh mesh(0.0, 10.0, 20);
    auto base = safesite::test::random_description(2, 1, 3);

    auto d = base;
    d.classes[1].seeds = [](double z) { return z > 5.0 ? -1.0 : 1.0; };
    try {
        KernelOperator(mesh, d);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "class 1 (established)");
        CHECK(e.parameter() == "seeds");
        CHECK(e.index() == 10);  // first node above 5 on the 20-point midpoint mesh
    }

    d = base;
    d.classes[2].survival = [](double) { return std::numeric_limits<double>::quiet_NaN(); };
    try {
        KernelOperator(mesh, d);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "class 2 (established)");
        CHECK(e.parameter() == "survival");
        CHECK(e.index() == 0);
    }

    d = base;
    d.classes[0].growth.sd = [](double) { return 0.0; };
    REQUIRE_THROWS_AS(KernelOperator(mesh, d), KernelError);
    try {
        KernelOperator(mesh, d);
    } catch (const KernelError& e) {
        CHECK(e.parameter() == "growth sd");
    }

    d = base;
    d.microsites[1].arrival = 1.5;
    try {
        KernelOperator(mesh, d);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "microsite 1 (site1)");
        CHECK(e.parameter() == "arrival");
    }

    d = base;
    d.microsites[0].establishment = -0.1;
    try {
        KernelOperator(mesh, d);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.parameter() == "establishment");
    }

    d = base;
    d.classes[0].next_class = 2;  // class 2 belongs to microsite 1: plants never move
    try {
        KernelOperator(mesh, d);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "class 0 (juvenile)");
        CHECK(e.parameter() == "next_class");
    }

    d = base;
    d.stages[0].stay = std::numeric_limits<double>::infinity();
    try {
        KernelOperator(mesh, d);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "stage 0 (bank0)");
        CHECK(e.parameter() == "stay");
    }

    Eigen::MatrixXd M = Eigen::MatrixXd::Ones(3, 3);
    M(1, 2) = -0.5;
    try {
        KernelOperator::from_stage_matrix(M);
        FAIL("no error");
    } catch (const KernelError& e) {
        CHECK(e.block() == "stage matrix");
        CHECK(e.parameter() == "entry (2,3)");
    }
}
