// Dominant eigen-triple: analytic IPMs, matrix-free vs dense, invariants, failures.
#include <catch2/catch.hpp>

#include <cmath>

#include <Eigen/Eigenvalues>

#include "safesite/analysis/eigen_error.hpp"
#include "safesite/analysis/eigen_triple.hpp"
#include "support/kernel_fixtures.hpp"

using namespace safesite::kernel;
using safesite::analysis::dominant_eigen;
using safesite::analysis::EigenError;
using safesite::analysis::EigenMethod;
using safesite::analysis::EigenOptions;

namespace {

// Beta(2,2) and Beta(3,3) densities on [0, 1]: polynomials of degree 2 and 4 that integrate to
// exactly 1 on the mesh interval, so Gauss–Legendre with n ≥ 3 integrates them exactly.
double beta22(double z) { return 6.0 * z * (1.0 - z); }
double beta33(double z) { return 30.0 * z * z * (1.0 - z) * (1.0 - z); }

// Growth "fully inside the mesh": a size-dependent mixture of the two densities above.
Growth inside_growth() {
    return Growth::general([](double to, double from) {
        return (1.0 - from) * beta22(to) + from * beta33(to);
    });
}

}  // namespace

// Analytic IPMs (issue 2 §3; the results follow from column integrals being constant, i.e.
// the constant function is a left eigenfunction: Ellner, Childs & Rees 2016 §2.5, from
// memory). Gauss–Legendre integrates the polynomial kernels exactly, so the only error is
// rounding: 1e-10 relative is a generous bound.
TEST_CASE("analytic IPM (a): constant survival, growth inside, no reproduction: lambda = s",
          "[analysis][unit]") {
    for (std::size_t n : {10u, 120u}) {  // 10: dense route; 120: Krylov route
        KernelDescription d;
        ContinuousClass c;
        c.survival = [](double) { return 0.83; };
        c.growth = inside_growth();
        d.classes.push_back(c);
        d.microsites.push_back({"m", 0.0, 0.0, SizeDensity::general(beta22), 0});
        const KernelOperator op(Mesh(0.0, 1.0, n, QuadratureRule::gauss_legendre), d);
        const auto t = dominant_eigen(op);
        INFO("n = " << n);
        CHECK(t.method == (n < 100 ? EigenMethod::dense : EigenMethod::krylov));
        CHECK(t.lambda == Approx(0.83).epsilon(1e-10));
        CHECK(t.weights.dot(t.w) == Approx(1.0).epsilon(1e-12));
        CHECK(t.weights.cwiseProduct(t.v).dot(t.w) == Approx(1.0).epsilon(1e-12));
    }
}

TEST_CASE("analytic IPM (b): size-independent survival and fecundity: lambda = s + f",
          "[analysis][unit]") {
    for (std::size_t n : {12u, 150u}) {
        KernelDescription d;
        ContinuousClass c;
        c.survival = [](double) { return 0.5; };
        c.growth = inside_growth();
        c.flowering = [](double) { return 0.5; };
        c.seeds = [](double) { return 2.4; };
        d.classes.push_back(c);
        // f = p b a e = 0.5 · 2.4 · 1 · 0.25 = 0.3
        d.microsites.push_back({"m", 1.0, 0.25, SizeDensity::general(beta33), 0});
        const KernelOperator op(Mesh(0.0, 1.0, n, QuadratureRule::gauss_legendre), d);
        const auto t = dominant_eigen(op);
        INFO("n = " << n);
        CHECK(t.lambda == Approx(0.8).epsilon(1e-10));
        // v is constant (every parent contributes s + f); check it is flat.
        CHECK(t.v.maxCoeff() - t.v.minCoeff() <= 1e-8 * t.v.maxCoeff());
    }
}

TEST_CASE("analytic IPM (c): separable fecundity F = c(z') b(z): lambda = integral of b c",
          "[analysis][unit]") {
    // ∫_0^1 (2 + 3 z²) · 6 z (1 − z) dz = 2 + 18 (1/4 − 1/5) = 2.9 (elementary integral).
    for (std::size_t n : {8u, 200u}) {
        KernelDescription d;
        ContinuousClass c;
        c.survival = [](double) { return 0.0; };
        c.seeds = [](double z) { return 2.0 + 3.0 * z * z; };
        d.classes.push_back(c);
        d.microsites.push_back({"m", 1.0, 1.0, SizeDensity::general(beta22), 0});
        const KernelOperator op(Mesh(0.0, 1.0, n, QuadratureRule::gauss_legendre), d);
        const auto t = dominant_eigen(op);
        INFO("n = " << n);
        CHECK(t.lambda == Approx(2.9).epsilon(1e-10));
    }
}

// Matrix-free (Spectra) against Eigen's dense EigenSolver on the assembled matrix, for random
// positive kernels (fixed seeds) with 1 to 4 microsites and one discrete stage. Both are
// backward-stable to ~1e-15; 1e-10 relative leaves room for the Arnoldi tolerance (1e-13).
TEST_CASE("matrix-free lambda, w, v equal the dense EigenSolver on the assembled matrix",
          "[analysis][unit]") {
    for (std::size_t microsites = 1; microsites <= 4; ++microsites) {
        const auto d = safesite::test::random_description(microsites, 1, 100 + microsites);
        const KernelOperator op(Mesh(0.0, 10.0, 60, QuadratureRule::gauss_legendre), d);
        const auto t = dominant_eigen(op);
        REQUIRE(t.method == EigenMethod::krylov);
        CHECK(t.applications > 0);

        const Eigen::MatrixXd A = op.to_dense();
        Eigen::EigenSolver<Eigen::MatrixXd> es(A);
        const Eigen::VectorXcd ev = es.eigenvalues();
        Eigen::Index lead = 0;
        for (Eigen::Index i = 1; i < ev.size(); ++i)
            if (std::abs(ev[i]) > std::abs(ev[lead])) lead = i;
        INFO("microsites = " << microsites << ", lambda = " << t.lambda);
        CHECK(std::abs(ev[lead].imag()) <= 1e-12);
        CHECK(t.lambda == Approx(ev[lead].real()).epsilon(1e-10));

        // Same vectors from the dense route of our own code (forced by a high threshold).
        EigenOptions dense;
        dense.dense_threshold = 1000;
        const auto td = dominant_eigen(op, dense);
        REQUIRE(td.method == EigenMethod::dense);
        CHECK(td.lambda == Approx(t.lambda).epsilon(1e-10));
        CHECK((td.w - t.w).norm() <= 1e-8 * t.w.norm());
        CHECK((td.v - t.v).norm() <= 1e-8 * t.v.norm());
        // Invariants: residual small, w ≥ 0, Σ ω w = 1, ⟨v, w⟩ = 1.
        CHECK(t.residual <= 1e-10 * t.lambda);
        CHECK(t.w.minCoeff() >= 0.0);
        CHECK(t.weights.dot(t.w) == Approx(1.0).epsilon(1e-12));
        CHECK(t.weights.cwiseProduct(t.v).dot(t.w) == Approx(1.0).epsilon(1e-12));
    }
}

TEST_CASE("no unique positive dominant eigenvalue is a typed numerical error",
          "[analysis][unit]") {
    // Zero kernel: everything dies, nothing reproduces.
    {
        KernelDescription d;
        ContinuousClass c;
        c.survival = [](double) { return 0.0; };
        d.classes.push_back(c);
        d.microsites.push_back({"m", 1.0, 0.0, SizeDensity::gaussian(0.5, 0.1), 0});
        for (std::size_t n : {10u, 200u}) {
            const KernelOperator op(Mesh(0.0, 1.0, n), d);
            REQUIRE_THROWS_AS(dominant_eigen(op), EigenError);
            try {
                dominant_eigen(op);
            } catch (const EigenError& e) {
                CHECK(e.reason() == EigenError::Reason::not_positive);
            }
        }
    }
    // Periodic (imprimitive) stage matrix: eigenvalues ±1 (Caswell 2001 §4.5.2, from memory).
    {
        Eigen::MatrixXd M(2, 2);
        M << 0.0, 2.0, 0.5, 0.0;
        REQUIRE_THROWS_AS(dominant_eigen(M), EigenError);
        try {
            dominant_eigen(M);
        } catch (const EigenError& e) {
            CHECK(e.reason() == EigenError::Reason::not_unique);
            CHECK(e.lambda() == Approx(1.0).epsilon(1e-12));
        }
    }
    // No reproduction and no stasis: plants only move up one stage, then die (nilpotent).
    {
        Eigen::MatrixXd M = Eigen::MatrixXd::Zero(4, 4);
        M(1, 0) = 0.5;
        M(2, 1) = 0.5;
        M(3, 2) = 0.5;
        try {
            dominant_eigen(M);
            FAIL("no error");
        } catch (const EigenError& e) {
            CHECK(e.reason() == EigenError::Reason::not_positive);
        }
    }
}

TEST_CASE("mesh convergence: lambda changes by less than 1e-6 from 200 to 400 Gauss-Legendre "
          "points", "[analysis][unit]") {
    // Smooth test IPM (Gaussian growth and recruits, logistic rates); issue 2 §3 asks for
    // |λ(200) − λ(400)| < 1e-6 (Gauss–Legendre converges fast for smooth kernels, Ellner,
    // Childs & Rees 2016 §6.8).
    for (unsigned seed : {7u, 8u}) {
        const auto d = safesite::test::random_description(2, 1, seed);
        const auto t200 =
            dominant_eigen(KernelOperator(Mesh(0.0, 10.0, 200, QuadratureRule::gauss_legendre), d));
        const auto t400 =
            dominant_eigen(KernelOperator(Mesh(0.0, 10.0, 400, QuadratureRule::gauss_legendre), d));
        INFO("seed " << seed << ": " << t200.lambda << " vs " << t400.lambda);
        CHECK(std::abs(t200.lambda - t400.lambda) < 1e-6);
    }
}
