// Simulated seed experiments (docs/methods/arrival.md, "Simulated experiments").
#include "safesite/arrival/experiment_simulation.hpp"

#include <cmath>
#include <numbers>
#include <random>

#include "safesite/error.hpp"

namespace safesite::arrival {
namespace {

// Stream ids: each kind of draw has its own stream, so adding trials to one experiment does not
// shift the other's variates.
enum Stream : std::uint32_t { neighbours_stream = 1, trapping_stream = 2, retention_stream = 3 };

// A reproducible stream from (seed, replicate, stream) (DEVELOPERS.md, randomness) and the
// variates we need, built from the raw 64-bit output so the results do not depend on the
// standard library's distribution implementations.
class Variates {
public:
    Variates(std::uint64_t seed, std::uint64_t replicate, Stream stream) {
        std::seed_seq seq{static_cast<std::uint32_t>(seed), static_cast<std::uint32_t>(seed >> 32),
                          static_cast<std::uint32_t>(replicate),
                          static_cast<std::uint32_t>(replicate >> 32),
                          static_cast<std::uint32_t>(stream)};
        m_rng.seed(seq);
    }
    /// Uniform on [0, 1) with 53 random bits.
    double uniform() { return static_cast<double>(m_rng() >> 11) * 0x1.0p-53; }
    /// Standard normal by the Box–Muller transform (Box & Muller 1958, from memory); one value
    /// per call (the second is discarded: simplicity over speed).
    double normal() {
        const double u1 = 1.0 - uniform();  // (0, 1]
        const double u2 = uniform();
        return std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * std::numbers::pi * u2);
    }
    /// Exponential with the given rate (> 0) by inversion; +∞ for rate 0.
    double exponential(double rate) {
        if (rate <= 0.0) return INFINITY;
        return -std::log1p(-uniform()) / rate;
    }
    /// Binomial(n, p) as a sum of n Bernoulli draws (n is a few dozen seeds per trial).
    std::int64_t binomial(std::int64_t n, double p) {
        std::int64_t k = 0;
        for (std::int64_t i = 0; i < n; ++i) k += uniform() < p ? 1 : 0;
        return k;
    }

private:
    std::mt19937_64 m_rng;
};

double lookup(const std::map<std::string, double>& m, const std::string& key) {
    auto it = m.find(key);
    return it == m.end() ? 0.0 : it->second;
}

void check_schedule(const std::vector<double>& days, const char* name) {
    if (days.size() < 2 || days.front() != 0.0)
        throw UsageError(std::string("retention design: ") + name +
                         " must start at day 0 and have at least two checks");
    for (std::size_t i = 1; i < days.size(); ++i)
        if (!(days[i] > days[i - 1]))
            throw UsageError(std::string("retention design: ") + name +
                             " days must strictly increase");
}

}  // namespace

double trapping_probability(const TrappingTruth& truth, const std::string& form,
                            const std::string& seed_type, double neighbour_size,
                            double neighbour_effect) {
    if (!(neighbour_size > 0.0))
        throw UsageError("trapping probability: neighbour size must be > 0");
    const double eta = truth.intercept + truth.log_size_slope * std::log(neighbour_size) +
                       lookup(truth.form_effect, form) +
                       lookup(truth.seed_type_effect, seed_type) + neighbour_effect;
    return 1.0 / (1.0 + std::exp(-eta));
}

std::vector<Neighbour> simulate_neighbours(const std::vector<std::string>& forms, int per_form,
                                           double log_size_mean, double log_size_sd,
                                           std::uint64_t seed, std::uint64_t replicate) {
    if (per_form < 1 || !(log_size_sd >= 0.0))
        throw UsageError("simulate_neighbours: need per_form ≥ 1 and log_size_sd ≥ 0");
    Variates v(seed, replicate, neighbours_stream);
    std::vector<Neighbour> out;
    for (const auto& f : forms) {
        for (int k = 1; k <= per_form; ++k) {
            Neighbour n;
            n.id = f + "-" + std::to_string(k);
            n.form = f;
            n.size = std::exp(log_size_mean + log_size_sd * v.normal());
            out.push_back(std::move(n));
        }
    }
    return out;
}

std::vector<TrappingTrial> simulate_trapping(const TrappingTruth& truth,
                                             const TrappingDesign& design, std::uint64_t seed,
                                             std::uint64_t replicate) {
    if (design.launched <= 0) throw UsageError("trapping design: launched must be > 0");
    if (design.seed_types.empty()) throw UsageError("trapping design: no seed types");
    if (!(truth.neighbour_sd >= 0.0))
        throw UsageError("trapping truth: neighbour_sd must be ≥ 0");
    Variates v(seed, replicate, trapping_stream);
    std::vector<TrappingTrial> out;
    for (const auto& n : design.neighbours) {
        const double b = truth.neighbour_sd * v.normal();
        for (const auto& type : design.seed_types) {
            TrappingTrial t;
            t.neighbour = n.id;
            t.form = n.form;
            t.neighbour_size = n.size;
            t.seed_type = type;
            t.launched = design.launched;
            t.trapped = v.binomial(design.launched,
                                   trapping_probability(truth, n.form, type, n.size, b));
            out.push_back(std::move(t));
        }
    }
    return out;
}

std::vector<RetentionCheck> simulate_retention(const RetentionTruth& truth,
                                               const RetentionDesign& design, std::uint64_t seed,
                                               std::uint64_t replicate) {
    if (design.stations_per_microsite < 1 || design.seeds_per_station < 1)
        throw UsageError("retention design: need ≥ 1 station per microsite and ≥ 1 seed per "
                         "station");
    if (!(design.irregular_share >= 0.0 && design.irregular_share <= 1.0))
        throw UsageError("retention design: irregular_share must be in [0, 1]");
    if (!(truth.station_sd >= 0.0)) throw UsageError("retention truth: station_sd must be ≥ 0");
    check_schedule(design.schedule, "schedule");
    if (design.irregular_share > 0.0) check_schedule(design.irregular_schedule, "irregular schedule");

    Variates v(seed, replicate, retention_stream);
    std::vector<RetentionCheck> out;
    for (const auto& micro : design.microsites) {
        auto hm = truth.hazard_per_day.find(micro);
        for (int s = 1; s <= design.stations_per_microsite; ++s) {
            const std::string station = micro + "-s" + std::to_string(s);
            const double frailty = std::exp(truth.station_sd * v.normal());
            for (const auto& type : design.seed_types) {
                if (hm == truth.hazard_per_day.end() || hm->second.count(type) == 0)
                    throw UsageError("retention truth: no hazard for microsite \"" + micro +
                                     "\" and seed type \"" + type + "\"");
                const double h = hm->second.at(type);
                if (!(h >= 0.0 && std::isfinite(h)))
                    throw UsageError("retention truth: hazard must be finite and ≥ 0");
                for (int k = 1; k <= design.seeds_per_station; ++k) {
                    const bool irregular = v.uniform() < design.irregular_share;
                    const auto& days = irregular ? design.irregular_schedule : design.schedule;
                    const double departure = v.exponential(h * frailty);
                    const std::string id = station + "-" + type + "-" + std::to_string(k);
                    for (double d : days) {
                        // Placement (day 0) always finds the seed (D = 0 has probability 2^-53).
                        const bool present = d == 0.0 || departure > d;
                        out.push_back({id, station, micro, type, d, present, 0});
                        if (!present) break;
                    }
                }
            }
        }
    }
    return out;
}

}  // namespace safesite::arrival
