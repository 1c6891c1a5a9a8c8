// Individual-based census simulation (docs/methods/simulation.md).
#include "safesite/sim/census_simulation.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <utility>

#include <fmt/format.h>

#include "detail/streams.hpp"
#include "core/variates.hpp"
#include "safesite/census/size_transform.hpp"
#include "safesite/error.hpp"
#include "safesite/pipeline/fixed_model.hpp"
#include "safesite/pipeline/kernel_rates.hpp"
#include "safesite/sim/arrival_truth.hpp"

namespace safesite::sim {

namespace {

using core::Variates;
using report::Cell;

// Stream ids: detail/streams.hpp (one per kind of draw, so that changing one kind of wart
// does not move the population's draws).
using detail::burn_in_stream;
using detail::neighbour_size_stream;
using detail::place_stream;
using detail::process_stream;
using detail::wart_stream;
using detail::year_stream;

constexpr std::size_t k_max_rows = 5'000'000;

struct Plant {
    std::string tag;       // empty while untagged (burn-in)
    int plot = 0;          // 0-based
    std::size_t microsite = 0;
    double z = 0.0;        // size on the kernel scale
    int age = 0;           // census years since first seen; 0 = new recruit
    double x = 0.0, y = 0.0;
    double neighbour_size = 0.0;  // raw scale; set at tagging under a neighbour form
};

/// One year's draws for every plant of a population.
struct YearDraws {
    std::vector<bool> flowered;
    std::vector<std::int64_t> seeds;
    std::vector<bool> survived;
    std::vector<double> z_next;
    std::vector<Plant> recruits;  // untagged, age 0, in their parent's plot
};

/// The recruitment and seed parameters of the truth that are not in KernelRates.
struct Truth {
    const spec::ModelSpec* model = nullptr;
    pipeline::KernelLayout layout;
    std::vector<double> arrival;        // a_m (Σ ≤ 1 from the arrival chain)
    /// With seed experiments: log(neighbour size) ~ N(mean_m, sd²) per non-bare microsite.
    bool neighbour_sizes = false;
    std::map<std::size_t, double> log_size_mean;
    double log_size_sd = 0.0;
    std::vector<double> establishment;  // e_m
    bool negbin = false;
    double theta = 1.0;
};

double dev(const std::map<std::string, double>& shifts, const std::string& rate) {
    auto it = shifts.find(rate);
    return it == shifts.end() ? 0.0 : it->second;
}

/// Evaluate the bound rates for every plant, grouped by (microsite, seedling) so that each
/// prediction is one table.
struct PlantRates {
    std::vector<double> survival, flowering, seeds, growth_mean, growth_sd;
};

PlantRates evaluate(const Truth& truth, const pipeline::KernelRates& rates,
                    const std::vector<Plant>& plants, const std::string& year) {
    const std::size_t n = plants.size();
    PlantRates out{std::vector<double>(n), std::vector<double>(n), std::vector<double>(n),
                   std::vector<double>(n), std::vector<double>(n)};
    const std::size_t M = truth.layout.microsites.size();
    for (std::size_t m = 0; m < M; ++m) {
        for (int seedling = 0; seedling <= 1; ++seedling) {
            std::vector<std::size_t> idx;
            for (std::size_t i = 0; i < n; ++i) {
                if (plants[i].microsite == m && (plants[i].age == 0) == (seedling == 1)) {
                    idx.push_back(i);
                }
            }
            if (idx.empty()) continue;
            Eigen::VectorXd z(static_cast<Eigen::Index>(idx.size()));
            for (std::size_t k = 0; k < idx.size(); ++k) {
                z[static_cast<Eigen::Index>(k)] = plants[idx[k]].z;
            }
            const stats::Table t =
                pipeline::covariate_table(truth.layout, z, m, seedling == 1, year);
            const Eigen::VectorXd s = rates.survival.mean(t);
            const Eigen::VectorXd p = rates.flowering.mean(t);
            const Eigen::VectorXd b = rates.seeds.mean(t);
            const Eigen::VectorXd gm = rates.growth.mean(t);
            const Eigen::VectorXd gs = rates.growth.sd(t);
            for (std::size_t k = 0; k < idx.size(); ++k) {
                const auto e = static_cast<Eigen::Index>(k);
                out.survival[idx[k]] = s[e];
                out.flowering[idx[k]] = p[e];
                out.seeds[idx[k]] = b[e];
                out.growth_mean[idx[k]] = gm[e];
                out.growth_sd[idx[k]] = gs[e];
            }
        }
    }
    return out;
}

/// Recruit size distribution N(mean_m, sd_m²) per microsite.
std::vector<std::pair<double, double>> recruit_sizes(const Truth& truth,
                                                     const pipeline::KernelRates& rates,
                                                     const std::string& year) {
    std::vector<std::pair<double, double>> out;
    for (std::size_t m = 0; m < truth.layout.microsites.size(); ++m) {
        const stats::Table t =
            pipeline::covariate_table(truth.layout, Eigen::VectorXd::Zero(1), m, true, year);
        out.emplace_back(rates.recruit_size.mean(t)[0], rates.recruit_size.sd(t)[0]);
    }
    return out;
}

/// One year of the life cycle for `plants` under `rates`.
YearDraws step(const Truth& truth, const pipeline::KernelRates& rates,
               const std::vector<Plant>& plants, const std::string& year, int plots,
               Variates& rng) {
    const PlantRates r = evaluate(truth, rates, plants, year);
    const auto sizes = recruit_sizes(truth, rates, year);
    const std::size_t n = plants.size();
    YearDraws d;
    d.flowered.resize(n);
    d.seeds.resize(n);
    d.survived.resize(n);
    d.z_next.resize(n);
    std::vector<std::int64_t> seeds_by_plot(static_cast<std::size_t>(plots), 0);
    for (std::size_t i = 0; i < n; ++i) {
        d.flowered[i] = rng.bernoulli(r.flowering[i]);
        if (d.flowered[i]) {
            d.seeds[i] = truth.negbin ? rng.negative_binomial(r.seeds[i], truth.theta)
                                      : rng.poisson(r.seeds[i]);
        }
        seeds_by_plot[static_cast<std::size_t>(plants[i].plot)] += d.seeds[i];
        d.survived[i] = rng.bernoulli(r.survival[i]);
        d.z_next[i] = rng.normal(r.growth_mean[i], r.growth_sd[i]);
    }
    // Seeds of a plot come to rest in microsite m and establish there with probability
    // q_m = a_m e_m each, independently: the recruit counts (n_1..n_M, rest) are multinomial,
    // drawn as successive conditional binomials.
    const std::size_t M = truth.layout.microsites.size();
    for (int p = 0; p < plots; ++p) {
        std::int64_t remaining = seeds_by_plot[static_cast<std::size_t>(p)];
        double rest = 1.0;
        for (std::size_t m = 0; m < M && remaining > 0; ++m) {
            const double q = truth.arrival[m] * truth.establishment[m];
            const std::int64_t k = rest > 0.0 ? rng.binomial(remaining, std::min(1.0, q / rest)) : 0;
            remaining -= k;
            rest -= q;
            for (std::int64_t j = 0; j < k; ++j) {
                Plant c;
                c.plot = p;
                c.microsite = m;
                c.z = rng.normal(sizes[m].first, sizes[m].second);
                c.age = 0;
                d.recruits.push_back(std::move(c));
            }
        }
    }
    return d;
}

std::map<std::string, double> draw_deviations(const spec::ModelSpec& truth, Variates& rng) {
    std::map<std::string, double> out;
    for (const auto& r : truth.rates) {
        const double sd = r.year_sd.value_or(0.0);
        const double z = rng.normal();  // drawn for every rate: streams stay aligned
        if (sd > 0.0) out[r.name] = sd * z;
    }
    return out;
}

Truth make_truth(const spec::ModelSpec& model, const std::vector<std::string>& years) {
    Truth t;
    t.model = &model;
    t.layout.microsites = model.microsites.labels;
    t.layout.year_levels = years;
    for (const auto& r : model.rates) {
        if (!r.is_fixed()) {
            throw SpecError({r.at.file, r.at.line, 0, "rates." + r.name + ".coefficients"},
                            "the truth of a simulation needs fixed coefficients for every "
                            "rate; rate \"" + r.name + "\" has none");
        }
    }
    const spec::RateSpec& seeds = model.rate("seeds");
    if (seeds.family == "negbin") {
        t.negbin = true;
        if (!seeds.theta) {
            throw SpecError({seeds.at.file, seeds.at.line, 0, "rates.seeds.theta"},
                            "a negbin seeds rate needs theta in a truth file");
        }
        t.theta = *seeds.theta;
    } else if (seeds.family != "poisson") {
        throw SpecError({seeds.at.file, seeds.at.line, 0, "rates.seeds.family"},
                        "seeds family \"" + seeds.family +
                            "\" cannot be simulated; expected poisson or negbin");
    }
    if (model.establishment.method != spec::EstablishmentMethod::fixed ||
        model.establishment.values.size() != model.microsites.labels.size()) {
        throw SpecError({model.file.string(), 0, 0, "establishment.values"},
                        "a truth file needs [establishment] method = \"fixed\" with values "
                        "for every microsite");
    }
    if (model.arrival.method == spec::ArrivalMethod::experiments && model.experiment_truth) {
        // The true arrival chain (arrival_truth.hpp); its fractions are not normalised: the
        // seeds lost on the way (1 − Σ a) recruit nowhere.
        t.arrival = true_arrival(model).fractions;
        t.neighbour_sizes = true;
        for (std::size_t m = 0; m < model.microsites.labels.size(); ++m) {
            if (m == model.microsites.bare_index) continue;
            t.log_size_mean[m] =
                model.experiment_truth->trapping.log_size_mean.at(model.microsites.labels[m]);
        }
        t.log_size_sd = model.experiment_truth->trapping.log_size_sd;
    } else if (model.arrival.method != spec::ArrivalMethod::fractions ||
               model.arrival.fractions.size() != model.microsites.labels.size()) {
        throw SpecError({model.file.string(), model.arrival.at.line, 0, "arrival.fractions"},
                        "simulate needs the arrival fractions given directly in [arrival] "
                        "fractions, or arrival.method = \"experiments\" with the truth of the "
                        "experiments in [simulate.trapping] and [simulate.retention]");
    } else {
        t.arrival = model.arrival.fractions;
    }
    t.establishment = model.establishment.values;
    return t;
}

/// Keep exactly `target` plants: random thinning without replacement, or resampling with
/// replacement when fewer.
void hold_at(std::vector<Plant>& plants, std::size_t target, Variates& rng) {
    if (plants.empty()) {
        throw NumericalError("simulate: the population died out during the burn-in; the truth "
                             "model's λ is far below 1");
    }
    if (plants.size() > target) {
        for (std::size_t i = 0; i < target; ++i) {
            const std::size_t j = i + rng.index(plants.size() - i);
            std::swap(plants[i], plants[j]);
        }
        plants.resize(target);
    } else {
        const std::size_t have = plants.size();
        while (plants.size() < target) plants.push_back(plants[rng.index(have)]);
    }
}

double raw_size(census::SizeTransform t, double z) {
    // Four significant digits, as a field team would write them; the raw size stays inside
    // the transform's domain.
    double x = census::invert(t, z);
    x = std::stod(fmt::format("{:.4g}", x));
    if (!census::in_domain(t, x)) {
        x = t == census::SizeTransform::log ? 1e-4 : (t == census::SizeTransform::log1p ? -0.9999 : 0.0);
    }
    return x;
}

double round2(double v) { return std::round(v * 100.0) / 100.0; }

}  // namespace

CensusSimulation simulate_census(const spec::ModelSpec& model, const SimulationOptions& o) {
    if (o.plants < 1) throw UsageError("simulate: --plants must be at least 1");
    if (o.years < 2) throw UsageError("simulate: --years must be at least 2");
    if (o.plots < 1) throw UsageError("simulate: --plots must be at least 1");
    if (o.burn_in < 0) throw UsageError("simulate: --burn-in must be at least 0");
    if (!(o.notfound_rate >= 0.0 && o.notfound_rate < 1.0) ||
        !(o.missing_seed_rate >= 0.0 && o.missing_seed_rate <= 1.0)) {
        throw UsageError("simulate: wart rates must be probabilities (not-found rate < 1)");
    }
    if (!(o.plot_side_m > 0.0)) throw UsageError("simulate: plot side must be > 0 metres");

    CensusSimulation out;
    for (int k = 0; k < o.years; ++k) out.years.push_back(std::to_string(o.first_year + k));
    const Truth truth = make_truth(model, out.years);
    const auto& labels = model.microsites.labels;

    Variates burn(o.seed, burn_in_stream);
    Variates yearly(o.seed, year_stream);
    Variates life(o.seed, process_stream);
    Variates warts(o.seed, wart_stream);
    Variates place(o.seed, place_stream);
    Variates neighbour(o.seed, neighbour_size_stream);  // used only with seed experiments

    // Burn-in: plants with recruit sizes, microsites by the arrival fractions, uniform plots;
    // years with deviations from their own stream under year label "burn-in".
    const std::string burn_label = "burn-in";
    std::vector<std::string> burn_levels = out.years;
    burn_levels.push_back(burn_label);
    Truth burn_truth = truth;
    burn_truth.layout.year_levels = burn_levels;
    std::vector<Plant> pop;
    {
        const auto pooled = pipeline::fixed_kernel_rates(model, burn_label, {}, burn_levels);
        const auto sizes = recruit_sizes(burn_truth, pooled, burn_label);
        const double total = std::accumulate(truth.arrival.begin(), truth.arrival.end(), 0.0);
        for (std::size_t i = 0; i < o.plants; ++i) {
            Plant p;
            p.plot = static_cast<int>(burn.index(static_cast<std::uint64_t>(o.plots)));
            double u = burn.uniform() * total;
            p.microsite = labels.size() - 1;
            for (std::size_t m = 0; m < labels.size(); ++m) {
                if (u < truth.arrival[m]) {
                    p.microsite = m;
                    break;
                }
                u -= truth.arrival[m];
            }
            p.z = burn.normal(sizes[p.microsite].first, sizes[p.microsite].second);
            pop.push_back(p);
        }
    }
    for (int b = 0; b < o.burn_in; ++b) {
        const auto rates =
            pipeline::fixed_kernel_rates(model, burn_label, draw_deviations(model, burn), burn_levels);
        YearDraws d = step(burn_truth, rates, pop, burn_label, o.plots, burn);
        std::vector<Plant> next;
        for (std::size_t i = 0; i < pop.size(); ++i) {
            if (!d.survived[i]) continue;
            Plant p = pop[i];
            p.z = d.z_next[i];
            ++p.age;
            next.push_back(p);
        }
        for (auto& r : d.recruits) next.push_back(std::move(r));
        pop.swap(next);
        hold_at(pop, o.plants, burn);
    }

    // Tag everything at the first census; tags "P<plot>-<number>" numbered per plot.
    std::vector<int> next_number(static_cast<std::size_t>(o.plots), 1);
    auto tag_plant = [&](Plant& p) {
        p.tag = fmt::format("P{}-{:04d}", p.plot + 1, next_number[static_cast<std::size_t>(p.plot)]++);
        if (o.coordinates) {
            p.x = round2(place.uniform() * o.plot_side_m);
            p.y = round2(place.uniform() * o.plot_side_m);
        }
        // The neighbour a plant grows under, drawn once and kept for life (raw scale, 4
        // significant digits as in the trapping trials).
        if (truth.neighbour_sizes && p.microsite != model.microsites.bare_index) {
            const double log_size =
                neighbour.normal(truth.log_size_mean.at(p.microsite), truth.log_size_sd);
            p.neighbour_size = std::stod(fmt::format("{:.4g}", std::exp(log_size)));
        }
    };
    // Tag in plot order so that tag numbers follow plots.
    std::stable_sort(pop.begin(), pop.end(),
                     [](const Plant& a, const Plant& b) { return a.plot < b.plot; });
    for (auto& p : pop) tag_plant(p);

    // Tables.
    out.census.name = "census";
    out.census.columns = {"plant", "year", "plot", "microsite", "size",
                          "status", "flowered", "seeds", "seedling"};
    if (truth.neighbour_sizes) out.census.columns.push_back("neighbour_size");
    if (o.coordinates) {
        out.census.columns.push_back("x");
        out.census.columns.push_back("y");
    }
    out.truth_years.name = "truth-years";
    out.truth_years.columns = {"rate", "year", "deviation", "year_sd"};

    auto row = [&](const Plant& p, int year, const std::string& status, Cell size, Cell flowered,
                   Cell seeds, bool seedling) {
        std::vector<Cell> r = {report::text(p.tag),
                               report::integer(year),
                               report::text(fmt::format("P{}", p.plot + 1)),
                               report::text(labels[p.microsite]),
                               std::move(size),
                               report::text(status),
                               std::move(flowered),
                               std::move(seeds),
                               report::integer(seedling ? 1 : 0)};
        if (truth.neighbour_sizes) {
            r.push_back(p.microsite == model.microsites.bare_index
                            ? report::missing()
                            : report::number(p.neighbour_size));
        }
        if (o.coordinates) {
            r.push_back(report::number(p.x));
            r.push_back(report::number(p.y));
        }
        out.census.rows.push_back(std::move(r));
        if (out.census.rows.size() > k_max_rows) {
            throw NumericalError(fmt::format(
                "simulate: the census passed {} rows in {}: the truth model's λ is far above 1; "
                "use a truth with λ near 1, fewer plants or years, or --max-new-per-plot",
                k_max_rows, year));
        }
    };

    std::vector<Plant> died;  // died between the previous census and this one
    for (int k = 0; k < o.years; ++k) {
        const int year = o.first_year + k;
        const std::string& label = out.years[static_cast<std::size_t>(k)];
        const auto shifts = draw_deviations(model, yearly);
        for (const auto& r : model.rates) {
            if (r.year_sd.value_or(0.0) > 0.0) {
                const double d = dev(shifts, r.name);
                out.deviations[r.name][label] = d;
                out.truth_years.rows.push_back({report::text(r.name), report::integer(year),
                                                report::number(d),
                                                report::number(*r.year_sd)});
            }
        }
        const auto rates = pipeline::fixed_kernel_rates(model, label, shifts, out.years);
        YearDraws d = step(truth, rates, pop, label, o.plots, life);

        // Rows of this census: plants found dead, then the living.
        for (const auto& p : died) {
            row(p, year, "dead", report::missing(), report::missing(), report::missing(), false);
        }
        std::size_t recruits_now = 0;
        for (std::size_t i = 0; i < pop.size(); ++i) {
            const Plant& p = pop[i];
            const bool first_row = p.age == 0;
            if (first_row && k > 0) ++recruits_now;
            // Warts are drawn for every plant in the same order whatever the outcome.
            const bool lost = warts.bernoulli(o.notfound_rate);
            const bool uncounted = warts.bernoulli(o.missing_seed_rate);
            if (lost && !first_row && k > 0) {
                row(p, year, "notfound", report::missing(), report::missing(), report::missing(),
                    false);
                continue;
            }
            Cell seeds = report::missing();
            if (d.flowered[i] && !uncounted) seeds = report::integer(d.seeds[i]);
            row(p, year, "alive", report::number(raw_size(model.size_transform, p.z)),
                report::integer(d.flowered[i] ? 1 : 0), seeds, first_row);
        }
        out.alive.push_back(pop.size());
        out.recruits.push_back(recruits_now);
        if (k + 1 == o.years) {
            out.untagged.push_back(0);
            break;
        }

        // Survival, growth and recruits to the next census.
        std::vector<Plant> next;
        died.clear();
        for (std::size_t i = 0; i < pop.size(); ++i) {
            Plant p = pop[i];
            if (!d.survived[i]) {
                died.push_back(p);
                continue;
            }
            p.z = d.z_next[i];
            ++p.age;
            next.push_back(std::move(p));
        }
        // Tag the recruits, at most max_new_per_plot per plot (a random subset).
        std::size_t untagged = 0;
        for (int plot = 0; plot < o.plots; ++plot) {
            std::vector<Plant> here;
            for (auto& r : d.recruits) {
                if (r.plot == plot) here.push_back(r);
            }
            if (o.max_new_per_plot > 0 && here.size() > o.max_new_per_plot) {
                untagged += here.size() - o.max_new_per_plot;
                for (std::size_t i = 0; i < o.max_new_per_plot; ++i) {
                    const std::size_t j = i + life.index(here.size() - i);
                    std::swap(here[i], here[j]);
                }
                here.resize(o.max_new_per_plot);
            }
            for (auto& r : here) {
                tag_plant(r);
                next.push_back(std::move(r));
            }
        }
        out.untagged.push_back(untagged);
        pop.swap(next);
    }
    return out;
}

}  // namespace safesite::sim
