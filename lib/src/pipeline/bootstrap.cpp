#include "safesite/pipeline/bootstrap.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <limits>
#include <map>
#include <mutex>
#include <thread>

#include "safesite/census/census.hpp"
#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/pipeline/arrival_fit.hpp"
#include "core/variates.hpp"

namespace safesite::pipeline {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

struct Key {
    std::string quantity, kernel, target;
};

// The quantities with intervals, read off one run (the same function for the original data
// and every replicate, so that the two line up by key).
std::vector<std::pair<Key, double>> quantities(const FitResult& fit, const AnalysisResult& a) {
    std::vector<std::pair<Key, double>> out;
    for (const auto& k : a.kernels) out.push_back({{"lambda", k.label, ""}, k.lambda});
    const auto& sites = a.layout.microsites;
    const KernelResult& p = a.pooled();
    // Arrival fractions vary only when they are estimated (from the seed experiments).
    if (fit.arrival)
        for (std::size_t m = 0; m < sites.size(); ++m)
            out.push_back(
                {{"arrival", "pooled", sites[m]}, p.arrival[static_cast<Eigen::Index>(m)]});
    for (std::size_t m = 0; m < sites.size(); ++m)
        out.push_back({{"establishment", "pooled", sites[m]},
                       p.establishment[static_cast<Eigen::Index>(m)]});
    if (!std::isnan(p.juvenile_elasticity))
        out.push_back({{"juvenile_elasticity", "pooled", ""}, p.juvenile_elasticity});
    for (const auto& s : a.scenarios) {
        out.push_back({{"scenario_lambda", "pooled", s.name}, s.lambda_pooled});
        out.push_back({{"scenario_delta_lambda", "pooled", s.name}, s.delta_pooled});
    }
    if (fit.arrival) {
        const arrival::ChainParameters& c = fit.arrival->chain;
        for (std::size_t m = 0; m < c.microsites.size(); ++m)
            if (m != c.bare)
                out.push_back({{"trapping", "", c.microsites[m]},
                               c.trapping[static_cast<Eigen::Index>(m)]});
        for (std::size_t m = 0; m < c.microsites.size(); ++m)
            out.push_back({{"hazard", "", c.microsites[m]},
                           c.hazard_per_day[static_cast<Eigen::Index>(m)]});
    }
    return out;
}

std::string key_text(const Key& k) { return k.quantity + '\x1f' + k.kernel + '\x1f' + k.target; }

// Resampling units: strata → units → member indices (rows, trials or checks).
using Strata = std::vector<std::vector<std::vector<std::size_t>>>;

// Units grouped by a unit id within a stratum label, both in order of first appearance.
template <class Id, class Stratum>
Strata group_units(std::size_t n, Id id, Stratum stratum) {
    std::map<std::string, std::size_t> stratum_index, unit_index;
    Strata out;
    std::vector<std::pair<std::size_t, std::size_t>> where;  // unit → (stratum, position)
    for (std::size_t i = 0; i < n; ++i) {
        const std::string u = id(i);
        auto it = unit_index.find(u);
        if (it == unit_index.end()) {
            const std::string s = stratum(i);
            auto [st, fresh] = stratum_index.emplace(s, out.size());
            if (fresh) out.emplace_back();
            auto& units = out[st->second];
            it = unit_index.emplace(u, where.size()).first;
            where.push_back({st->second, units.size()});
            units.emplace_back();
        }
        const auto [s, pos] = where[it->second];
        out[s][pos].push_back(i);
    }
    return out;
}

// One draw of units with replacement within every stratum: the chosen units, in draw order.
std::vector<const std::vector<std::size_t>*> draw(const Strata& strata,
                                                  core::Variates& rng) {
    std::vector<const std::vector<std::size_t>*> out;
    for (const auto& units : strata)
        for (std::size_t k = 0; k < units.size(); ++k)
            out.push_back(&units[static_cast<std::size_t>(rng.index(units.size()))]);
    return out;
}

std::string copy_id(const std::string& id, std::size_t k) { return id + "#" + std::to_string(k); }

// Everything a replicate needs, read once.
struct Context {
    const spec::ModelSpec* model = nullptr;
    const RunResult* baseline = nullptr;
    census::CensusOptions census_options;
    io::CsvTable census_csv;
    std::size_t plant_column = 0;
    Strata plants;  // cohorts → plants → rows
    std::optional<ExperimentData> experiments;
    Strata neighbours;  // forms → neighbours → trials
    Strata stations;    // microsites → stations → checks
    std::vector<std::string> keys;
};

// `reducible` is set when a baseline kernel (census year or pooled) of the replicate is
// reducible (its λ is then that of the self-renewing part, as in analyse()); scenario kernels
// that are reducible by design are reported by the run itself.
std::vector<double> replicate(const Context& ctx, std::size_t r, std::uint64_t seed,
                              bool& reducible) {
    core::Variates rng(seed, r + 1);

    // Census: plant histories within cohorts, each copy under its own tag.
    std::vector<std::size_t> rows;
    std::vector<std::size_t> copy_of_row;
    const auto plants = draw(ctx.plants, rng);
    for (std::size_t k = 0; k < plants.size(); ++k)
        for (std::size_t row : *plants[k]) {
            rows.push_back(row);
            copy_of_row.push_back(k);
        }
    io::CsvTable csv = ctx.census_csv.select_rows(rows);
    for (std::size_t i = 0; i < rows.size(); ++i)
        csv.set_cell(i, ctx.plant_column,
                     copy_id(csv.cell(i, ctx.plant_column), copy_of_row[i]));
    const census::Census c = census::read_census(csv, ctx.census_options);
    if (!c.valid())
        throw NumericalError("a resampled census did not validate: " + c.report().render());

    // Experiments: neighbours within forms, stations within microsites.
    std::optional<ExperimentData> e;
    if (ctx.experiments) {
        e.emplace();
        e->trapping.file = ctx.experiments->trapping.file;
        e->retention.file = ctx.experiments->retention.file;
        const auto neighbours = draw(ctx.neighbours, rng);
        for (std::size_t k = 0; k < neighbours.size(); ++k)
            for (std::size_t i : *neighbours[k]) {
                arrival::TrappingTrial t = ctx.experiments->trapping.trials[i];
                t.neighbour = copy_id(t.neighbour, k);
                e->trapping.trials.push_back(std::move(t));
            }
        const auto stations = draw(ctx.stations, rng);
        for (std::size_t k = 0; k < stations.size(); ++k)
            for (std::size_t i : *stations[k]) {
                arrival::RetentionCheck x = ctx.experiments->retention.checks[i];
                x.station = copy_id(x.station, k);
                x.seed = copy_id(x.seed, k);
                e->retention.checks.push_back(std::move(x));
            }
    }

    FitResult f = fit(*ctx.model, c, e ? &*e : nullptr);
    PreparedModel& m = f.model;
    m.mesh = ctx.baseline->fit.model.mesh;
    m.break_even = false;
    m.mesh_check = false;
    m.survival_changes.clear();
    m.stochastic_years = 0;
    m.decompose_years = false;
    m.life_cycle = false;
    const AnalysisResult a = analyse(m);
    reducible = std::any_of(a.reducible.begin(), a.reducible.end(),
                            [](const ReducibleKernel& k) { return k.setting == "baseline"; });

    std::map<std::string, double> got;
    for (const auto& [key, value] : quantities(f, a)) got[key_text(key)] = value;
    std::vector<double> out;
    out.reserve(ctx.keys.size());
    for (const auto& k : ctx.keys) {
        const auto it = got.find(k);
        out.push_back(it == got.end() ? k_nan : it->second);
    }
    return out;
}

}  // namespace

double quantile_type7(std::vector<double> x, double p) {
    if (!(p >= 0.0 && p <= 1.0)) throw UsageError("quantile: p must be in [0, 1]");
    x.erase(std::remove_if(x.begin(), x.end(), [](double v) { return !std::isfinite(v); }),
            x.end());
    if (x.empty()) return k_nan;
    std::sort(x.begin(), x.end());
    // Hyndman & Fan (1996) type 7: h = (n − 1) p, Q = x_⌊h⌋ + (h − ⌊h⌋)(x_⌊h⌋+1 − x_⌊h⌋).
    const double h = static_cast<double>(x.size() - 1) * p;
    const auto lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, x.size() - 1);
    return x[lo] + (h - static_cast<double>(lo)) * (x[hi] - x[lo]);
}

BootstrapResult bootstrap(const spec::ModelSpec& model, const RunResult& baseline,
                          const BootstrapOptions& options) {
    if (options.replicates < 2) throw UsageError("bootstrap: at least 2 replicates are needed");
    if (!(options.level > 0.0 && options.level < 1.0))
        throw UsageError("bootstrap: the level must be in (0, 1)");
    if (!model.data.census)
        throw UsageError("bootstrap: resampling needs a census ([data] census)");

    Context ctx;
    ctx.model = &model;
    ctx.baseline = &baseline;
    ctx.census_options = spec::to_census_options(model);
    ctx.census_csv = io::CsvTable::read(*model.data.census);
    ctx.plant_column = ctx.census_csv.require("plant", ctx.census_options.columns);
    {
        const std::size_t year = ctx.census_csv.require("year", ctx.census_options.columns);
        const io::CsvTable& t = ctx.census_csv;
        // Cohort = first census year of the plant (the rows of a valid census are readable).
        std::map<std::string, std::int64_t> first;
        for (std::size_t i = 0; i < t.rows(); ++i) {
            const std::string tag = t.text(i, ctx.plant_column);
            const std::int64_t y = t.integer(i, year);
            auto [it, fresh] = first.emplace(tag, y);
            if (!fresh) it->second = std::min(it->second, y);
        }
        ctx.plants = group_units(
            t.rows(), [&](std::size_t i) { return t.text(i, ctx.plant_column); },
            [&](std::size_t i) { return std::to_string(first.at(t.text(i, ctx.plant_column))); });
    }
    if (baseline.fit.arrival) {
        ctx.experiments = read_experiments(model);
        const auto& trials = ctx.experiments->trapping.trials;
        const auto& checks = ctx.experiments->retention.checks;
        ctx.neighbours = group_units(
            trials.size(), [&](std::size_t i) { return trials[i].neighbour; },
            [&](std::size_t i) { return trials[i].form; });
        ctx.stations = group_units(
            checks.size(), [&](std::size_t i) { return checks[i].station; },
            [&](std::size_t i) { return checks[i].microsite; });
    }

    BootstrapResult out;
    out.requested = options.replicates;
    out.level = options.level;
    const auto base = quantities(baseline.fit, baseline.analysis);
    for (const auto& [key, value] : base) {
        ctx.keys.push_back(key_text(key));
        BootstrapInterval b;
        b.quantity = key.quantity;
        b.kernel = key.kernel;
        b.target = key.target;
        b.estimate = value;
        out.intervals.push_back(b);
    }

    const std::size_t B = options.replicates;
    out.values.assign(B, std::vector<double>(ctx.keys.size(), k_nan));
    std::vector<std::string> errors(B);
    std::vector<char> reducible(B, 0);  // char, not bool: written by several threads
    std::atomic<std::size_t> next{0};
    std::mutex progress_lock;
    std::size_t done = 0;  // replicates finished, guarded by progress_lock
    auto work = [&] {
        for (std::size_t r = next++; r < B; r = next++) {
            try {
                bool red = false;
                out.values[r] = replicate(ctx, r, options.seed, red);
                reducible[r] = red ? 1 : 0;
            } catch (const std::exception& e) {
                errors[r] = e.what();
            }
            if (options.progress) {
                const std::lock_guard<std::mutex> hold(progress_lock);
                options.progress(++done, B);
            }
        }
    };
    unsigned threads = options.threads > 0 ? options.threads
                                           : std::max(1u, std::thread::hardware_concurrency());
    threads = static_cast<unsigned>(std::min<std::size_t>(threads, B));
    std::vector<std::thread> pool;
    for (unsigned t = 1; t < threads; ++t) pool.emplace_back(work);
    work();
    for (auto& t : pool) t.join();

    for (std::size_t r = 0; r < B; ++r)
        if (!errors[r].empty()) {
            ++out.failed;
            if (out.warnings.size() < 3)
                out.warnings.push_back("bootstrap replicate " + std::to_string(r + 1) +
                                       " failed: " + errors[r]);
        }
    if (out.failed > 0)
        out.warnings.push_back(std::to_string(out.failed) + " of " + std::to_string(B) +
                               " bootstrap replicates failed and are left out of the intervals");
    const auto n_reducible =
        static_cast<std::size_t>(std::count(reducible.begin(), reducible.end(), char{1}));
    if (n_reducible > 0)
        out.warnings.push_back(
            std::to_string(n_reducible) + " of " + std::to_string(B) +
            " bootstrap replicates had a reducible baseline kernel (a census-year or pooled kernel "
            "whose classes do not all lead to each other); their λ is that of the self-renewing "
            "part "
            "(docs/methods/kernel.md, \"Reducible kernels\")");

    const double p_lo = (1.0 - options.level) / 2.0, p_hi = (1.0 + options.level) / 2.0;
    for (std::size_t q = 0; q < out.intervals.size(); ++q) {
        std::vector<double> x;
        for (const auto& v : out.values)
            if (std::isfinite(v[q])) x.push_back(v[q]);
        BootstrapInterval& b = out.intervals[q];
        b.replicates = x.size();
        b.lower = quantile_type7(x, p_lo);
        b.upper = quantile_type7(x, p_hi);
        if (x.size() >= 2) {
            double mean = 0.0;
            for (double v : x) mean += v;
            mean /= static_cast<double>(x.size());
            double ss = 0.0;
            for (double v : x) ss += (v - mean) * (v - mean);
            b.std_error = std::sqrt(ss / static_cast<double>(x.size() - 1));
        } else {
            b.std_error = k_nan;
        }
    }
    return out;
}

std::vector<report::TidyTable> bootstrap_tables(const BootstrapResult& result) {
    auto num = [](double x) { return std::isnan(x) ? report::missing() : report::number(x); };
    report::TidyTable intervals{"intervals",
                                {"quantity", "kernel", "target", "estimate", "lower", "upper",
                                 "std_error", "replicates", "level"},
                                {}};
    for (const auto& b : result.intervals)
        intervals.rows.push_back({report::text(b.quantity), report::text(b.kernel),
                                  report::text(b.target), num(b.estimate), num(b.lower),
                                  num(b.upper), num(b.std_error),
                                  report::integer(static_cast<std::int64_t>(b.replicates)),
                                  report::number(result.level)});
    report::TidyTable reps{"bootstrap_replicates",
                           {"replicate", "quantity", "kernel", "target", "value"},
                           {}};
    for (std::size_t r = 0; r < result.values.size(); ++r)
        for (std::size_t q = 0; q < result.intervals.size(); ++q) {
            const auto& b = result.intervals[q];
            reps.rows.push_back({report::integer(static_cast<std::int64_t>(r + 1)),
                                 report::text(b.quantity), report::text(b.kernel),
                                 report::text(b.target), num(result.values[r][q])});
        }
    return {intervals, reps};
}

}  // namespace safesite::pipeline
