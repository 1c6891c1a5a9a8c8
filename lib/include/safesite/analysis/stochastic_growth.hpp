#pragma once
/// \file stochastic_growth.hpp
/// The stochastic growth rate of a population whose yearly kernel is drawn at random from a
/// set of kernels (e.g. the census years' kernels, each year equally likely and independent
/// of the others: an i.i.d. environment).
///
/// \f[ \log\lambda_s = \lim_{T\to\infty} \frac{1}{T} \log \lVert K_{Y_{T-1}} \cdots K_{Y_0}
///     n_0 \rVert \f]
/// (Tuljapurkar 1990; Caswell 2001 §14.3), estimated by simulation: start from n_0, apply a
/// randomly drawn kernel each year, renormalise, and average the one-year log growth
/// r_t = log(‖K n_t‖ / ‖n_t‖) over T years after a burn-in. The norm is the total number of
/// individuals, ‖n‖ = Σ_i ω_i n_i with the state weights ω of the kernel's quadrature.
/// The standard error is by batch means (the series r_t is autocorrelated through n_t): the
/// T values are cut into B consecutive batches, and se = sd(batch means) / √B (Law & Kelton
/// 2000 §9.5.3; Caswell 2001 §14.3.2 uses the same simulation estimator).

#include <cstddef>
#include <cstdint>
#include <functional>
#include <vector>

#include <Eigen/Core>

namespace safesite::kernel {
class KernelOperator;
}

namespace safesite::analysis {

/// y = K x for one kernel (x, y of the common state length).
using KernelApply = std::function<void(const double* x, double* y)>;

/// Settings of the simulation.
struct StochasticOptions {
    std::size_t years = 20000;   ///< T ≥ 100, simulated years averaged over
    std::size_t burn_in = 500;   ///< years simulated and discarded first (transient)
    std::size_t batches = 50;    ///< B for the batch-means standard error, 2 ≤ B ≤ T
    std::uint64_t seed = 1;      ///< the draw of years depends only on (seed, kernel count)
};

/// The estimate.
struct StochasticGrowth {
    double log_lambda = 0.0;   ///< log λ_s, per year
    double lambda = 0.0;       ///< λ_s = exp(log λ_s)
    double std_error = 0.0;    ///< batch-means standard error of log λ_s
    std::size_t years = 0;     ///< T
};

/// log λ_s of the i.i.d. environment in which kernel k is drawn with probability
/// `probabilities[k]` (empty: equally likely). `weights` are the state weights ω (length of the
/// state vector, > 0), `start` the initial state (≥ 0, not all 0; e.g. the stable structure of
/// the mean kernel). Throws UsageError for mismatched sizes, invalid options or probabilities,
/// and NumericalError when the population vanishes or becomes non-finite.
StochasticGrowth stochastic_growth(const std::vector<KernelApply>& kernels,
                                   const Eigen::VectorXd& weights, const Eigen::VectorXd& start,
                                   const StochasticOptions& options,
                                   const std::vector<double>& probabilities = {});

/// The same for kernel operators of one layout (weights from the first operator).
StochasticGrowth stochastic_growth(const std::vector<const kernel::KernelOperator*>& kernels,
                                   const Eigen::VectorXd& start, const StochasticOptions& options,
                                   const std::vector<double>& probabilities = {});

}  // namespace safesite::analysis
