// Stochastic growth rate by simulation (analysis/stochastic_growth.hpp).
// Checks: (1) commuting scalar kernels, where log λ_s = E[log c] exactly (the population total
// is multiplied by c_Y each year; Tuljapurkar 1990, ch. 1, the scalar case); (2) Tuljapurkar's
// small-noise approximation for an i.i.d. environment,
//   log λ_s ≈ log λ̄ − τ² / (2 λ̄²),  τ² = Σ S_ij S_kl Cov(a_ij, a_kl),
// with λ̄ and S = v wᵀ / (vᵀ w) of the mean matrix (Tuljapurkar 1982, part II; Caswell 2001
// §14.3.5; the equation and section numbers are from memory); (3) reproducibility.
#include <catch2/catch.hpp>

#include <cmath>

#include <Eigen/Dense>

#include "safesite/analysis/stochastic_growth.hpp"
#include "safesite/error.hpp"

using namespace safesite;
using analysis::KernelApply;

namespace {
KernelApply matrix_kernel(const Eigen::MatrixXd& A) {
    return [A](const double* x, double* y) {
        Eigen::Map<Eigen::VectorXd>(y, A.rows()) =
            A * Eigen::Map<const Eigen::VectorXd>(x, A.cols());
    };
}
}  // namespace

TEST_CASE("stochastic growth: scalar kernels give E[log c]", "[analysis][unit]") {
    const Eigen::MatrixXd I = Eigen::MatrixXd::Identity(3, 3);
    const std::vector<KernelApply> k = {matrix_kernel(0.8 * I), matrix_kernel(1.25 * I)};
    analysis::StochasticOptions o;
    o.years = 20000;
    o.seed = 3;
    const auto g = analysis::stochastic_growth(k, Eigen::VectorXd::Ones(3),
                                               Eigen::VectorXd::Ones(3), o);
    // E[log c] = (log 0.8 + log 1.25)/2 = 0. The draws are i.i.d., so the exact standard error
    // is sd(log c)/√T = log(1.25)/√20000 ≈ 0.00158; batch means must be near it.
    const double se = std::log(1.25) / std::sqrt(20000.0);
    CHECK(std::abs(g.log_lambda) < 4 * se);
    CHECK(g.std_error > 0.5 * se);
    CHECK(g.std_error < 2.0 * se);
    CHECK(g.lambda == Approx(std::exp(g.log_lambda)).epsilon(1e-15));
    CHECK(g.years == 20000);

    // Unequal probabilities: E[log c] = 0.25 log 0.8 + 0.75 log 1.25.
    const auto h = analysis::stochastic_growth(k, Eigen::VectorXd::Ones(3),
                                               Eigen::VectorXd::Ones(3), o, {0.25, 0.75});
    const double expected = 0.25 * std::log(0.8) + 0.75 * std::log(1.25);
    CHECK(std::abs(h.log_lambda - expected) < 4 * se);
}

TEST_CASE("stochastic growth: Tuljapurkar's small-noise approximation", "[analysis][unit]") {
    // Two matrices A ± D, each with probability ½ (invented 2-stage plant, not tuned).
    Eigen::Matrix2d A, D;
    A << 0.2, 1.5,
         0.4, 0.7;
    D << 0.0, 0.45,
         0.1, 0.0;
    const std::vector<KernelApply> k = {matrix_kernel(A + D), matrix_kernel(A - D)};
    analysis::StochasticOptions o;
    o.years = 400000;
    o.batches = 100;
    o.seed = 11;
    const auto g = analysis::stochastic_growth(k, Eigen::Vector2d::Ones(),
                                               Eigen::Vector2d::Ones(), o);
    // Mean matrix: λ̄, right and left eigenvectors (dense, Eigen).
    Eigen::EigenSolver<Eigen::Matrix2d> right(A), left(A.transpose());
    Eigen::Index i = 0, j = 0;
    right.eigenvalues().real().maxCoeff(&i);
    left.eigenvalues().real().maxCoeff(&j);
    const double lambda = right.eigenvalues().real()[i];
    const Eigen::Vector2d w = right.eigenvectors().col(i).real();
    const Eigen::Vector2d v = left.eigenvectors().col(j).real();
    const Eigen::Matrix2d S = v * w.transpose() / v.dot(w);
    // Cov(a_ij, a_kl) = D_ij D_kl (each entry is ±D with equal probability), so τ² = (S:D)².
    const double tau2 = std::pow((S.array() * D.array()).sum(), 2);
    const double approx = std::log(lambda) - tau2 / (2 * lambda * lambda);
    INFO("simulated " << g.log_lambda << " ± " << g.std_error << ", approximation " << approx
                      << ", log of the mean matrix's λ " << std::log(lambda));
    // The correction τ²/(2λ̄²) is larger than the Monte Carlo error, so the check sees it; the
    // approximation's own error is of higher order in the noise (Tuljapurkar 1982): allow 4 se
    // plus 20 % of the correction.
    const double correction = tau2 / (2 * lambda * lambda);
    CHECK(correction > 10 * g.std_error);
    CHECK(std::abs(g.log_lambda - approx) < 4 * g.std_error + 0.2 * correction);
}

TEST_CASE("stochastic growth: same seed, same estimate; bad input refused", "[analysis][unit]") {
    Eigen::Matrix2d A;
    A << 0.2, 1.5, 0.4, 0.7;
    const std::vector<KernelApply> k = {matrix_kernel(A), matrix_kernel(0.9 * A)};
    analysis::StochasticOptions o;
    o.years = 1000;
    o.seed = 5;
    const auto a = analysis::stochastic_growth(k, Eigen::Vector2d::Ones(), Eigen::Vector2d::Ones(), o);
    const auto b = analysis::stochastic_growth(k, Eigen::Vector2d::Ones(), Eigen::Vector2d::Ones(), o);
    CHECK(a.log_lambda == b.log_lambda);
    o.seed = 6;
    const auto c = analysis::stochastic_growth(k, Eigen::Vector2d::Ones(), Eigen::Vector2d::Ones(), o);
    CHECK(c.log_lambda != a.log_lambda);
    o.years = 10;
    CHECK_THROWS_AS(analysis::stochastic_growth(k, Eigen::Vector2d::Ones(), Eigen::Vector2d::Ones(), o),
                    UsageError);
    o.years = 1000;
    CHECK_THROWS_AS(analysis::stochastic_growth(k, Eigen::Vector2d::Ones(), Eigen::Vector2d::Ones(), o,
                                                {0.5, 0.6}),
                    UsageError);
}
