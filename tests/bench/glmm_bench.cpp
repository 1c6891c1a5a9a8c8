// Benchmark (issue #6): a binomial survival mixed model with 20 000 rows and random
// intercepts for 10 years and 2 000 plants (crossed), Laplace approximation. Goal: under 2 s
// on one core. Prints its figures; never fails on time.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <random>

#include "safesite/stats/mixed_model.hpp"

using namespace safesite::stats;

int main() {
    constexpr int years = 10, plants = 2000, n = years * plants;
    std::seed_seq seq{20261201, 0};
    std::mt19937_64 rng(seq);
    std::normal_distribution<double> normal(0.0, 1.0);
    std::vector<double> ye(years), pe(plants);
    for (double& v : ye) v = 0.5 * normal(rng);
    for (double& v : pe) v = 0.7 * normal(rng);
    Eigen::MatrixXd X(n, 4);
    Eigen::VectorXd y(n), trials = Eigen::VectorXd::Ones(n);
    GroupingFactor year, plant;
    year.name = "year";
    plant.name = "plant";
    for (int t = 0; t < years; ++t) year.level_names.push_back(std::to_string(2010 + t));
    for (int p = 0; p < plants; ++p) {
        // Two appends, not `"p" + std::string`: g++ 12 gives a false -Wrestrict there
        // (GCC bug 105329).
        std::string label = "p";
        label += std::to_string(p);
        plant.level_names.push_back(label);
    }
    for (int i = 0; i < n; ++i) {
        const int t = i / plants, p = i % plants;
        year.level.push_back(t);
        plant.level.push_back(p);
        const int microsite = p % 3;  // three microsites, fixed per plant
        X(i, 0) = 1.0;
        X(i, 1) = 1.5 + 0.6 * normal(rng);  // log size
        X(i, 2) = microsite == 1 ? 1.0 : 0.0;
        X(i, 3) = microsite == 2 ? 1.0 : 0.0;
        const double eta = -1.0 + 0.9 * X(i, 1) + 0.4 * X(i, 2) - 0.3 * X(i, 3) + ye[t] + pe[p];
        y[i] = std::bernoulli_distribution(1.0 / (1.0 + std::exp(-eta)))(rng) ? 1.0 : 0.0;
    }
    MixedOptions opt;
    opt.family = Family::binomial;
    const auto start = std::chrono::steady_clock::now();
    const std::clock_t cpu_start = std::clock();
    const MixedFit fit = fit_mixed_core(X, y, trials, Eigen::VectorXd(), {year, plant}, opt,
                                        {"(Intercept)", "size", "microsite[b]", "microsite[c]"});
    const double seconds =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    const double cpu_seconds = static_cast<double>(std::clock() - cpu_start) / CLOCKS_PER_SEC;
    std::printf("glmm_bench: binomial logit, %d rows, %d years x %d plants (crossed)\n", n, years,
                plants);
    // The fit is single-threaded: CPU time is the one-core figure; wall time also counts
    // waiting for a shared machine.
    std::printf("  fit: %.3f s CPU, %.3f s wall (goal < 2 s on one core), %d objective "
                "evaluations, %s\n",
                cpu_seconds, seconds, fit.iterations, fit.converged ? "converged" : "NOT converged");
    for (Eigen::Index j = 0; j < fit.fixed.size(); ++j)
        std::printf("  %-14s %8.4f (se %.4f)\n", fit.fixed_names[j].c_str(), fit.fixed[j],
                    fit.fixed_se[j]);
    for (const auto& vc : fit.variance_components)
        std::printf("  SD %-6s %-12s %.4f (se %.4f)\n", vc.group.c_str(), vc.term.c_str(), vc.sd,
                    vc.sd_se);
    std::printf("  log-likelihood %.4f, AIC %.4f\n", fit.log_likelihood, fit.aic);
    return fit.converged ? 0 : 1;
}
