#pragma once
// Reproducible random variates (private to the library: the simulator, the bootstrap and
// stochastic growth draw from it).
//
// Every stream is a std::mt19937_64 seeded through std::seed_seq from (seed, stream id)
// (DEVELOPERS.md, "Randomness"). The variates are computed from the raw 64-bit output with our
// own transformations rather than the std:: distributions, whose algorithms the standard leaves
// to the implementation: the same seed then gives the same files with any standard library.
//
// References (docs/references.md): Box & Muller (1958) for normal deviates; Marsaglia & Tsang
// (2000) for gamma deviates; Knuth (1997, vol. 2, section 3.4.1) for Poisson by products of
// uniforms and binomial by geometric waiting times.

#include <cmath>
#include <cstdint>
#include <numbers>
#include <random>

namespace safesite::core {

class Variates {
public:
    Variates(std::uint64_t seed, std::uint64_t stream) {
        std::seed_seq seq{static_cast<std::uint32_t>(seed), static_cast<std::uint32_t>(seed >> 32),
                          static_cast<std::uint32_t>(stream),
                          static_cast<std::uint32_t>(stream >> 32)};
        m_rng.seed(seq);
    }

    /// The next raw 64 random bits (e.g. to seed another module's streams).
    std::uint64_t bits() { return m_rng(); }

    /// Uniform on [0, 1) with 53 random bits.
    double uniform() { return static_cast<double>(m_rng() >> 11) * 0x1.0p-53; }

    /// Uniform on (0, 1].
    double uniform_positive() { return 1.0 - uniform(); }

    /// Uniform integer in [0, n), n ≥ 1 (multiply-shift on 53 bits; bias < n / 2^53).
    std::uint64_t index(std::uint64_t n) {
        return static_cast<std::uint64_t>(uniform() * static_cast<double>(n));
    }

    bool bernoulli(double p) { return uniform() < p; }

    /// Standard normal by the Box–Muller transform, both values of a pair used.
    double normal() {
        if (m_has_spare) {
            m_has_spare = false;
            return m_spare;
        }
        const double r = std::sqrt(-2.0 * std::log(uniform_positive()));
        const double a = 2.0 * std::numbers::pi * uniform();
        m_spare = r * std::sin(a);
        m_has_spare = true;
        return r * std::cos(a);
    }

    double normal(double mean, double sd) { return mean + sd * normal(); }

    /// Gamma(shape, scale = 1), shape > 0 (Marsaglia & Tsang 2000; for shape < 1 the boost
    /// Gamma(shape + 1) · U^(1/shape) of the same paper).
    double gamma(double shape) {
        if (shape < 1.0) return gamma(shape + 1.0) * std::pow(uniform_positive(), 1.0 / shape);
        const double d = shape - 1.0 / 3.0;
        const double c = 1.0 / std::sqrt(9.0 * d);
        for (;;) {
            double x, v;
            do {
                x = normal();
                v = 1.0 + c * x;
            } while (v <= 0.0);
            v = v * v * v;
            const double u = uniform_positive();
            if (u < 1.0 - 0.0331 * x * x * x * x) return d * v;
            if (std::log(u) < 0.5 * x * x + d * (1.0 - v + std::log(v))) return d * v;
        }
    }

    /// Poisson(mean), mean ≥ 0: products of uniforms on pieces of mean ≤ 30 (the sum of
    /// independent Poisson counts is Poisson with the summed mean). Work O(mean).
    std::int64_t poisson(double mean) {
        std::int64_t k = 0;
        while (mean > 0.0) {
            const double piece = std::min(mean, 30.0);
            mean -= piece;
            const double limit = std::exp(-piece);
            double product = uniform_positive();
            while (product > limit) {
                ++k;
                product *= uniform_positive();
            }
        }
        return k;
    }

    /// Negative binomial with mean μ and dispersion θ (variance μ + μ²/θ), as a Poisson
    /// whose mean is Gamma(θ, μ/θ) distributed.
    std::int64_t negative_binomial(double mean, double theta) {
        if (mean <= 0.0) return 0;
        return poisson(gamma(theta) * mean / theta);
    }

    /// Binomial(n, p) by geometric waiting times between successes; work O(n·min(p, 1−p)).
    std::int64_t binomial(std::int64_t n, double p) {
        if (n <= 0 || p <= 0.0) return 0;
        if (p >= 1.0) return n;
        if (p > 0.5) return n - binomial(n, 1.0 - p);
        const double log_q = std::log1p(-p);
        std::int64_t successes = 0;
        double position = 0.0;  // trials used so far
        for (;;) {
            position += std::floor(std::log(uniform_positive()) / log_q) + 1.0;
            if (position > static_cast<double>(n)) return successes;
            ++successes;
        }
    }

private:
    std::mt19937_64 m_rng;
    bool m_has_spare = false;
    double m_spare = 0.0;
};

}  // namespace safesite::core
