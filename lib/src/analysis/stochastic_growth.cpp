#include "safesite/analysis/stochastic_growth.hpp"

#include <cmath>
#include <numeric>

#include "core/variates.hpp"
#include "safesite/error.hpp"
#include "safesite/kernel/kernel_operator.hpp"

namespace safesite::analysis {

namespace {
// The stream of year draws; one stream, so that the same seed gives the same years.
constexpr std::uint64_t k_year_stream = 0x5f0c4a57;
}  // namespace

StochasticGrowth stochastic_growth(const std::vector<KernelApply>& kernels,
                                   const Eigen::VectorXd& weights, const Eigen::VectorXd& start,
                                   const StochasticOptions& options,
                                   const std::vector<double>& probabilities) {
    if (kernels.empty()) throw UsageError("stochastic growth: no kernel");
    if (weights.size() == 0 || start.size() != weights.size())
        throw UsageError("stochastic growth: weights and start need the state length");
    if (!(weights.array() > 0.0).all())
        throw UsageError("stochastic growth: state weights must be > 0");
    if (!(start.array() >= 0.0).all() || !(start.sum() > 0.0))
        throw UsageError("stochastic growth: the start vector must be >= 0 and not all 0");
    if (options.years < 100 || options.batches < 2 || options.batches > options.years)
        throw UsageError("stochastic growth: need years >= 100 and 2 <= batches <= years");
    std::vector<double> cumulative(kernels.size());
    if (probabilities.empty()) {
        for (std::size_t k = 0; k < kernels.size(); ++k)
            cumulative[k] = static_cast<double>(k + 1) / static_cast<double>(kernels.size());
    } else {
        if (probabilities.size() != kernels.size())
            throw UsageError("stochastic growth: one probability per kernel");
        double sum = 0.0;
        for (std::size_t k = 0; k < kernels.size(); ++k) {
            if (!(probabilities[k] >= 0.0))
                throw UsageError("stochastic growth: probabilities must be >= 0");
            sum += probabilities[k];
            cumulative[k] = sum;
        }
        if (std::abs(sum - 1.0) > 1e-9)
            throw UsageError("stochastic growth: probabilities must sum to 1");
    }
    cumulative.back() = 1.0;

    core::Variates rng(options.seed, k_year_stream);
    auto draw = [&] {
        const double u = rng.uniform();
        std::size_t k = 0;
        while (k + 1 < cumulative.size() && u >= cumulative[k]) ++k;
        return k;
    };
    Eigen::VectorXd n = start / weights.dot(start);
    Eigen::VectorXd next(n.size());
    auto step = [&] {
        kernels[draw()](n.data(), next.data());
        const double total = weights.dot(next);
        if (!(total > 0.0) || !std::isfinite(total))
            throw NumericalError("stochastic growth: the population vanished or overflowed "
                                 "(total " + std::to_string(total) + ")");
        n = next / total;
        return std::log(total);
    };
    for (std::size_t t = 0; t < options.burn_in; ++t) step();

    const std::size_t per_batch = options.years / options.batches;
    const std::size_t used = per_batch * options.batches;
    std::vector<double> batch(options.batches, 0.0);
    double sum = 0.0;
    for (std::size_t t = 0; t < used; ++t) {
        const double r = step();
        sum += r;
        batch[t / per_batch] += r / static_cast<double>(per_batch);
    }
    StochasticGrowth out;
    out.years = used;
    out.log_lambda = sum / static_cast<double>(used);
    out.lambda = std::exp(out.log_lambda);
    double ss = 0.0;
    for (double b : batch) ss += (b - out.log_lambda) * (b - out.log_lambda);
    const auto B = static_cast<double>(options.batches);
    out.std_error = std::sqrt(ss / (B - 1.0) / B);
    return out;
}

StochasticGrowth stochastic_growth(const std::vector<const kernel::KernelOperator*>& kernels,
                                   const Eigen::VectorXd& start, const StochasticOptions& options,
                                   const std::vector<double>& probabilities) {
    if (kernels.empty() || kernels.front() == nullptr)
        throw UsageError("stochastic growth: no kernel");
    std::vector<KernelApply> apply;
    for (const kernel::KernelOperator* k : kernels) {
        if (k == nullptr || k->rows() != kernels.front()->rows())
            throw UsageError("stochastic growth: kernels of different layouts");
        apply.push_back([k](const double* x, double* y) {
            k->apply(kernel::KernelPart::all, x, y);
        });
    }
    return stochastic_growth(apply, kernels.front()->state_weights(), start, options,
                             probabilities);
}

}  // namespace safesite::analysis
