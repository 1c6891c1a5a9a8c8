#include "safesite/pipeline/model_check.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <map>
#include <numbers>
#include <numeric>
#include <string>
#include <utility>

#include <boost/math/distributions/normal.hpp>

#include "safesite/analysis/eigen_triple.hpp"
#include "safesite/analysis/kernel_sensitivity.hpp"
#include "safesite/kernel/kernel_operator.hpp"
#include "safesite/pipeline/analyse.hpp"
#include "safesite/pipeline/kernel_builder.hpp"
#include "safesite/stats/family.hpp"

namespace safesite::pipeline {

WilsonInterval wilson_interval(std::int64_t k, std::int64_t n, double z) {
    assert(n >= 1 && k >= 0 && k <= n);
    const double nn = static_cast<double>(n);
    const double p = static_cast<double>(k) / nn;
    const double z2 = z * z;
    const double centre = (static_cast<double>(k) + z2 / 2.0) / (nn + z2);
    const double half = z * std::sqrt(nn) / (nn + z2) * std::sqrt(p * (1.0 - p) + z2 / (4.0 * nn));
    return {p, std::max(0.0, centre - half), std::min(1.0, centre + half)};
}

std::size_t equal_count_bin_count(std::size_t n) {
    return std::min<std::size_t>(15, std::max<std::size_t>(1, n / 30));
}

std::vector<std::size_t> equal_count_bins(std::size_t n, std::size_t bins) {
    assert(bins >= 1);
    std::vector<std::size_t> out(n);
    for (std::size_t i = 0; i < n; ++i) out[i] = i * bins / n;
    return out;
}

std::vector<double> blom_positions(std::size_t n) {
    std::vector<double> p(n);
    for (std::size_t i = 0; i < n; ++i)
        p[i] = (static_cast<double>(i + 1) - 0.375) / (static_cast<double>(n) + 0.25);
    return p;
}

std::vector<double> normal_scores(std::size_t n) {
    const boost::math::normal_distribution<double> normal;
    std::vector<double> q = blom_positions(n);
    for (double& x : q) x = boost::math::quantile(normal, x);
    return q;
}

std::vector<std::size_t> subsample_rows(std::size_t n, std::size_t max) {
    std::vector<std::size_t> rows;
    if (n <= max) {
        rows.resize(n);
        std::iota(rows.begin(), rows.end(), std::size_t{0});
        return rows;
    }
    rows.reserve(max);
    for (std::size_t j = 0; j < max; ++j) rows.push_back((2 * j + 1) * n / (2 * max));
    return rows;
}

std::size_t sturges_bins(std::size_t n) {
    if (n <= 1) return 1;
    return static_cast<std::size_t>(std::ceil(std::log2(static_cast<double>(n)))) + 1;
}

std::size_t surface_stride(std::size_t n, std::size_t blocks) {
    const double per_block = 20000.0 / static_cast<double>(std::max<std::size_t>(blocks, 1));
    const auto side = std::min<std::size_t>(
        50, std::max<std::size_t>(5, static_cast<std::size_t>(std::floor(std::sqrt(per_block)))));
    return std::max<std::size_t>(1, (n + side - 1) / side);
}

namespace {

using report::Cell;
using report::TidyTable;

Cell num(double x) { return std::isfinite(x) ? report::number(x) : report::missing(); }
Cell txt(const std::string& s) { return report::text(s); }
Cell count(std::size_t n) { return report::integer(static_cast<std::int64_t>(n)); }

constexpr std::size_t k_curve_points = 60;
constexpr std::size_t k_distribution_bins = 25;

double normal_cdf(double x) { return 0.5 * std::erfc(-x / std::sqrt(2.0)); }
double normal_pdf(double x, double mean, double sd) {
    const double u = (x - mean) / sd;
    return std::exp(-0.5 * u * u) / (sd * std::sqrt(2.0 * std::numbers::pi));
}

/// One stage of the census rows a check is made on: its label, whether the kernel evaluates
/// it with seedling = 1, and which rows belong to it (-1: all, else the seedling flag).
struct Stage {
    std::string label;
    bool seedling = false;
    int flag = -1;
};

std::vector<Stage> stages_of(const KernelLayout& layout) {
    if (layout.juvenile == JuvenileMode::seedling_class)
        return {{"established", false, 0}, {"first-year", true, 1}};
    return {{"all", false, -1}};
}

std::size_t class_of(const KernelLayout& layout, std::size_t m, const Stage& s) {
    return s.seedling ? layout.juvenile_class(m) : layout.established_class(m);
}

std::string class_label(const KernelLayout& layout, std::size_t k) {
    const std::size_t n = layout.microsites.size();
    const std::string& site = layout.microsites[k % n];
    return layout.juvenile == JuvenileMode::seedling_class && k >= n ? site + " (first-year)"
                                                                     : site;
}

/// Row indices of `t` per (microsite, stage), in table order, keeping rows where `keep`.
template <typename Keep>
std::vector<std::vector<std::size_t>> rows_by_group(const stats::Table& t,
                                                    const KernelLayout& layout,
                                                    const std::vector<Stage>& stages,
                                                    Keep keep) {
    const std::size_t n_sites = layout.microsites.size();
    std::vector<std::vector<std::size_t>> out(n_sites * stages.size());
    const auto& site = t.categorical("microsite").values;
    const std::vector<double>* seedling = t.has("seedling") ? &t.numeric("seedling") : nullptr;
    for (std::size_t i = 0; i < t.rows(); ++i) {
        if (!keep(i)) continue;
        const auto it = std::find(layout.microsites.begin(), layout.microsites.end(), site[i]);
        if (it == layout.microsites.end()) continue;
        const auto m = static_cast<std::size_t>(it - layout.microsites.begin());
        for (std::size_t s = 0; s < stages.size(); ++s) {
            const int flag = stages[s].flag;
            if (flag >= 0 && (seedling == nullptr || (*seedling)[i] != static_cast<double>(flag)))
                continue;
            out[m * stages.size() + s].push_back(i);
        }
    }
    return out;
}

bool has_year_effects(const FitResult& fit, const std::string& rate) {
    for (const auto& r : fit.rates)
        if (r.rate == rate) return r.year_handling == "fixed" || r.year_handling == "random";
    return false;
}

/// Observed proportions of survival and flowering in equal-count size bins.
TidyTable binned_table(const census::TransitionData& d, const KernelLayout& layout) {
    TidyTable t{"check_binned",
                {"rate", "microsite", "stage", "bin", "size_lower", "size_upper", "size_mean",
                 "plants", "events", "proportion", "lower", "upper"},
                {}};
    const auto stages = stages_of(layout);
    const std::pair<const char*, const stats::Table*> rates[] = {{"survival", &d.transitions},
                                                                  {"flowering", &d.plants}};
    for (const auto& [rate, table] : rates) {
        const std::string response = std::string(rate) == "survival" ? "survived" : "flowered";
        const auto& size = table->numeric("size");
        const auto& y = table->numeric(response);
        const auto groups = rows_by_group(*table, layout, stages, [&](std::size_t i) {
            return std::isfinite(size[i]) && (y[i] == 0.0 || y[i] == 1.0);
        });
        for (std::size_t g = 0; g < groups.size(); ++g) {
            std::vector<std::size_t> rows = groups[g];
            if (rows.empty()) continue;
            std::stable_sort(rows.begin(), rows.end(),
                             [&](std::size_t a, std::size_t b) { return size[a] < size[b]; });
            const std::size_t n_bins = equal_count_bin_count(rows.size());
            const auto bin = equal_count_bins(rows.size(), n_bins);
            std::size_t start = 0;
            for (std::size_t b = 0; b < n_bins; ++b) {
                std::size_t end = start;
                double sum = 0.0;
                std::int64_t events = 0;
                while (end < rows.size() && bin[end] == b) {
                    sum += size[rows[end]];
                    events += y[rows[end]] == 1.0 ? 1 : 0;
                    ++end;
                }
                const auto n = static_cast<std::int64_t>(end - start);
                if (n == 0) continue;
                const WilsonInterval w = wilson_interval(events, n);
                t.rows.push_back({txt(rate), txt(layout.microsites[g / stages.size()]),
                                  txt(stages[g % stages.size()].label),
                                  count(b + 1), num(size[rows[start]]),
                                  num(size[rows[end - 1]]), num(sum / static_cast<double>(n)),
                                  report::integer(n), report::integer(events), num(w.proportion),
                                  num(w.lower), num(w.upper)});
                start = end;
            }
        }
    }
    return t;
}

Eigen::VectorXd grid(double lo, double hi, std::size_t n) {
    return Eigen::VectorXd::LinSpaced(static_cast<Eigen::Index>(n), lo, hi);
}

std::pair<double, double> finite_range(const std::vector<double>& x) {
    double lo = INFINITY, hi = -INFINITY;
    for (double v : x)
        if (std::isfinite(v)) {
            lo = std::min(lo, v);
            hi = std::max(hi, v);
        }
    if (!(lo < hi)) {  // one value or none: a unit range around it
        const double c = std::isfinite(lo) ? lo : 0.0;
        return {c - 0.5, c + 0.5};
    }
    return {lo, hi};
}

/// The fitted curves over the observed size range, pooled and (for rates with year effects)
/// per census year.
TidyTable curves_table(const census::TransitionData& d, const FitResult& fit) {
    TidyTable t{"check_curves", {"rate", "microsite", "stage", "kernel", "size", "value", "sd"},
                {}};
    const PreparedModel& model = fit.model;
    const KernelLayout& layout = model.layout;
    const auto stages = stages_of(layout);
    const auto [lo, hi] = finite_range(d.plants.numeric("size"));
    const Eigen::VectorXd sizes = grid(lo, hi, k_curve_points);
    const auto [rlo, rhi] = finite_range(d.recruits.numeric("size"));
    const double pad = 0.15 * (rhi - rlo);
    const Eigen::VectorXd recruit_sizes = grid(rlo - pad, rhi + pad, k_curve_points);

    std::vector<const KernelRates*> kernels{&model.pooled};
    for (const auto& y : model.years) kernels.push_back(&y);
    const std::string rates[] = {"survival", "growth", "flowering", "seeds", "recruit_size"};
    for (const KernelRates* k : kernels) {
        const bool pooled = k == &model.pooled;
        const auto curves = evaluate_rates(*k, layout, sizes);
        for (const auto& rate : rates) {
            if (!pooled && !has_year_effects(fit, rate)) continue;
            for (std::size_t m = 0; m < layout.microsites.size(); ++m) {
                const auto mi = static_cast<Eigen::Index>(m);
                if (rate == "recruit_size") {
                    const double mean = curves->recruit_mean[mi], sd = curves->recruit_sd[mi];
                    const std::string stage = stages.back().label;
                    for (Eigen::Index i = 0; i < recruit_sizes.size(); ++i)
                        t.rows.push_back({txt(rate), txt(layout.microsites[m]), txt(stage),
                                          txt(k->label), num(recruit_sizes[i]),
                                          num(normal_pdf(recruit_sizes[i], mean, sd)),
                                          report::missing()});
                    continue;
                }
                for (const auto& s : stages) {
                    const ClassCurves& c = curves->classes.at(class_of(layout, m, s));
                    const Eigen::VectorXd* v = rate == "survival"    ? &c.survival
                                               : rate == "growth"    ? &c.growth_mean
                                               : rate == "flowering" ? &c.flowering
                                                                     : &c.seeds;
                    for (Eigen::Index i = 0; i < sizes.size(); ++i)
                        t.rows.push_back({txt(rate), txt(layout.microsites[m]), txt(s.label),
                                          txt(k->label), num(sizes[i]), num((*v)[i]),
                                          rate == "growth" ? num(c.growth_sd[i])
                                                           : report::missing()});
                }
            }
        }
    }
    return t;
}

/// Index of the year kernel of label `year` (the census year t of a row); npos if none.
std::size_t year_index(const PreparedModel& model, const std::string& year) {
    for (std::size_t k = 0; k < model.years.size(); ++k)
        if (model.years[k].label == year) return k;
    return static_cast<std::size_t>(-1);
}

/// Growth: every survivor's size at t+1 against size at t, with the fitted mean and SD of
/// its own census year's kernel, the standardised residual and its normal score.
TidyTable growth_table(const census::TransitionData& d, const PreparedModel& model) {
    TidyTable t{"check_growth",
                {"microsite", "stage", "year", "size", "size_next", "fitted_mean", "fitted_sd",
                 "residual", "normal_score"},
                {}};
    const KernelLayout& layout = model.layout;
    const auto stages = stages_of(layout);
    const stats::Table& tr = d.transitions;
    const auto& size = tr.numeric("size");
    const auto& next = tr.numeric("size_next");
    const auto& survived = tr.numeric("survived");
    const auto& seedling = tr.numeric("seedling");
    const auto& year = tr.categorical("year").values;
    const auto groups = rows_by_group(tr, layout, stages, [&](std::size_t i) {
        return survived[i] == 1.0 && std::isfinite(size[i]) && std::isfinite(next[i]) &&
               year_index(model, year[i]) < model.years.size();
    });
    for (std::size_t g = 0; g < groups.size(); ++g) {
        const auto& rows = groups[g];
        if (rows.empty()) continue;
        const std::size_t m = g / stages.size();
        // Predict per (year, seedling flag) with the row's own covariates.
        std::vector<double> mean(rows.size()), sd(rows.size());
        std::map<std::pair<std::size_t, bool>, std::vector<std::size_t>> by_kernel;
        for (std::size_t r = 0; r < rows.size(); ++r)
            by_kernel[{year_index(model, year[rows[r]]), seedling[rows[r]] == 1.0}].push_back(r);
        for (const auto& [key, members] : by_kernel) {
            Eigen::VectorXd z(static_cast<Eigen::Index>(members.size()));
            for (std::size_t j = 0; j < members.size(); ++j)
                z[static_cast<Eigen::Index>(j)] = size[rows[members[j]]];
            const KernelRates& k = model.years[key.first];
            const stats::Table cov = covariate_table(layout, z, m, key.second, k.label);
            const Eigen::VectorXd mu = k.growth.mean(cov);
            const Eigen::VectorXd sigma = k.growth.sd(cov);
            for (std::size_t j = 0; j < members.size(); ++j) {
                mean[members[j]] = mu[static_cast<Eigen::Index>(j)];
                sd[members[j]] = sigma[static_cast<Eigen::Index>(j)];
            }
        }
        std::vector<double> residual(rows.size());
        for (std::size_t r = 0; r < rows.size(); ++r)
            residual[r] = (next[rows[r]] - mean[r]) / sd[r];
        // Normal scores by rank of the residual (ties in census order).
        std::vector<std::size_t> order(rows.size());
        std::iota(order.begin(), order.end(), std::size_t{0});
        std::stable_sort(order.begin(), order.end(),
                         [&](std::size_t a, std::size_t b) { return residual[a] < residual[b]; });
        const std::vector<double> scores = normal_scores(rows.size());
        std::vector<double> score(rows.size());
        for (std::size_t j = 0; j < order.size(); ++j) score[order[j]] = scores[j];
        for (std::size_t r : subsample_rows(rows.size(), k_max_scatter_points)) {
            const std::size_t i = rows[r];
            t.rows.push_back({txt(layout.microsites[m]), txt(stages[g % stages.size()].label),
                              txt(year[i]), num(size[i]), num(next[i]), num(mean[r]), num(sd[r]),
                              num(residual[r]), num(score[r])});
        }
    }
    return t;
}

/// Seeds: the counted seeds of every flowering plant against its size.
TidyTable seeds_table(const census::TransitionData& d, const KernelLayout& layout) {
    TidyTable t{"check_seeds", {"microsite", "stage", "year", "size", "seeds"}, {}};
    const auto stages = stages_of(layout);
    const stats::Table& p = d.plants;
    const auto& size = p.numeric("size");
    const auto& seeds = p.numeric("seeds");
    const auto& flowered = p.numeric("flowered");
    const auto& year = p.categorical("year").values;
    const auto groups = rows_by_group(p, layout, stages, [&](std::size_t i) {
        return flowered[i] == 1.0 && std::isfinite(seeds[i]) && std::isfinite(size[i]);
    });
    for (std::size_t g = 0; g < groups.size(); ++g)
        for (std::size_t r : subsample_rows(groups[g].size(), k_max_scatter_points)) {
            const std::size_t i = groups[g][r];
            t.rows.push_back({txt(layout.microsites[g / stages.size()]),
                              txt(stages[g % stages.size()].label), txt(year[i]), num(size[i]),
                              num(seeds[i])});
        }
    return t;
}

/// Recruit sizes: a histogram per microsite (Sturges bins over its range) with the pooled
/// fitted density averaged over each bin.
TidyTable recruit_table(const census::TransitionData& d, const PreparedModel& model) {
    TidyTable t{"check_recruit_sizes",
                {"microsite", "bin", "size_lower", "size_upper", "recruits", "density",
                 "fitted_density"},
                {}};
    const KernelLayout& layout = model.layout;
    const stats::Table& r = d.recruits;
    const auto& size = r.numeric("size");
    const auto& site = r.categorical("microsite").values;
    Eigen::VectorXd one(1);
    one[0] = 0.0;
    const auto curves = evaluate_rates(model.pooled, layout, one);
    for (std::size_t m = 0; m < layout.microsites.size(); ++m) {
        std::vector<double> z;
        for (std::size_t i = 0; i < r.rows(); ++i)
            if (site[i] == layout.microsites[m] && std::isfinite(size[i])) z.push_back(size[i]);
        if (z.empty()) continue;
        const auto [lo, hi] = finite_range(z);
        const std::size_t bins = sturges_bins(z.size());
        const double width = (hi - lo) / static_cast<double>(bins);
        std::vector<std::size_t> counts(bins, 0);
        for (double v : z)
            ++counts[std::min(bins - 1, static_cast<std::size_t>((v - lo) / width))];
        const auto mi = static_cast<Eigen::Index>(m);
        const double mean = curves->recruit_mean[mi], sd = curves->recruit_sd[mi];
        for (std::size_t b = 0; b < bins; ++b) {
            const double a = lo + width * static_cast<double>(b), c = a + width;
            const double fitted =
                (normal_cdf((c - mean) / sd) - normal_cdf((a - mean) / sd)) / width;
            t.rows.push_back({txt(layout.microsites[m]), count(b + 1), num(a), num(c),
                              count(counts[b]),
                              num(static_cast<double>(counts[b]) /
                                  (static_cast<double>(z.size()) * width)),
                              num(fitted)});
        }
    }
    return t;
}

/// Trapping trials with their observed share, and the fitted curve per form × seed type
/// (fixed effects only: a neighbour with a random intercept of 0).
std::pair<TidyTable, TidyTable> trapping_tables(const ExperimentData& e, const ArrivalFit& fit,
                                                const KernelLayout& layout, std::size_t bare) {
    TidyTable obs{"check_trapping",
                  {"form", "seed_type", "neighbour", "neighbour_size", "launched", "trapped",
                   "share"},
                  {}};
    TidyTable curve{"check_trapping_curve", {"form", "seed_type", "neighbour_size", "trapping"},
                    {}};
    std::vector<std::string> forms;
    for (std::size_t m = 0; m < layout.microsites.size(); ++m)
        if (m != bare) forms.push_back(layout.microsites[m]);
    std::map<std::string, std::vector<double>> sizes_by_form;
    std::vector<std::pair<std::string, std::string>> combos;
    for (const auto& tr : e.trapping.trials) {
        obs.rows.push_back({txt(tr.form), txt(tr.seed_type), txt(tr.neighbour),
                            num(tr.neighbour_size), report::integer(tr.launched),
                            report::integer(tr.trapped),
                            num(static_cast<double>(tr.trapped) /
                                static_cast<double>(tr.launched))});
        sizes_by_form[tr.form].push_back(tr.neighbour_size);
        const std::pair<std::string, std::string> c{tr.form, tr.seed_type};
        if (std::find(combos.begin(), combos.end(), c) == combos.end()) combos.push_back(c);
    }
    if (combos.empty()) return {obs, curve};
    // One prediction table holding every form × seed type (so the factor levels are those
    // of the trials), neighbour sizes evenly spaced on the log scale over the form's trials.
    std::vector<arrival::TrappingTrial> grid_trials;
    for (const auto& [form, type] : combos) {
        const auto [lo, hi] = finite_range(sizes_by_form[form]);
        const double a = std::log(std::max(lo, 1e-12)), b = std::log(std::max(hi, 1e-12));
        for (std::size_t i = 0; i < k_curve_points; ++i) {
            const double f = static_cast<double>(i) / static_cast<double>(k_curve_points - 1);
            arrival::TrappingTrial g;
            g.neighbour = e.trapping.trials.front().neighbour;
            g.form = form;
            g.seed_type = type;
            g.neighbour_size = std::exp(a + f * (b - a));
            g.launched = 1;
            g.trapped = 0;
            grid_trials.push_back(g);
        }
    }
    const stats::Table table = arrival::trapping_table(grid_trials, forms);
    const Eigen::VectorXd eta = fit.trapping.linear_predictor(table);
    for (std::size_t i = 0; i < grid_trials.size(); ++i)
        curve.rows.push_back(
            {txt(grid_trials[i].form), txt(grid_trials[i].seed_type),
             num(grid_trials[i].neighbour_size),
             num(stats::inverse_link(fit.trapping.link, eta[static_cast<Eigen::Index>(i)]))});
    return {obs, curve};
}

/// Retention: the share of seeds still present at each check day per microsite × seed type.
TidyTable retention_table(const ExperimentData& e) {
    TidyTable t{"check_retention",
                {"microsite", "seed_type", "day", "seeds", "present", "share", "lower", "upper"},
                {}};
    // Keyed by (microsite, seed type, day); map order sorts days within each group.
    std::vector<std::pair<std::string, std::string>> groups;
    std::map<std::pair<std::size_t, double>, std::pair<std::int64_t, std::int64_t>> counts;
    for (const auto& c : e.retention.checks) {
        const std::pair<std::string, std::string> g{c.microsite, c.seed_type};
        auto it = std::find(groups.begin(), groups.end(), g);
        if (it == groups.end()) it = groups.insert(groups.end(), g);
        auto& n = counts[{static_cast<std::size_t>(it - groups.begin()), c.day}];
        ++n.first;
        if (c.present) ++n.second;
    }
    for (const auto& [key, n] : counts) {
        const WilsonInterval w = wilson_interval(n.second, n.first);
        t.rows.push_back({txt(groups[key.first].first), txt(groups[key.first].second),
                          num(key.second), report::integer(n.first), report::integer(n.second),
                          num(w.proportion), num(w.lower), num(w.upper)});
    }
    return t;
}

/// Observed size distribution per microsite (last census; all census years) against the
/// stable structure of the pooled kernel, as shares of all plants per size bin.
TidyTable distribution_table(const census::TransitionData& d, const AnalysisResult& a,
                             const PreparedModel& model) {
    TidyTable t{"check_size_distribution",
                {"microsite", "source", "bin", "size_lower", "size_upper", "proportion"},
                {}};
    const KernelLayout& layout = model.layout;
    const std::size_t n_sites = layout.microsites.size();
    const double lo = model.mesh.lower, hi = model.mesh.upper;
    const double width = (hi - lo) / static_cast<double>(k_distribution_bins);
    auto bin_of = [&](double z) {
        const double b = std::floor((z - lo) / width);
        return static_cast<std::size_t>(
            std::clamp(b, 0.0, static_cast<double>(k_distribution_bins - 1)));
    };
    const std::string sources[] = {"last_census", "all_years", "stable_pooled"};
    std::vector<std::vector<double>> share(3, std::vector<double>(n_sites * k_distribution_bins));
    // Observed.
    const stats::Table& p = d.plants;
    const auto& size = p.numeric("size");
    const auto& site = p.categorical("microsite").values;
    const auto& year = p.categorical("year");
    const std::string last = year.levels.empty() ? std::string() : year.levels.back();
    for (int s = 0; s < 2; ++s) {
        double total = 0.0;
        for (std::size_t i = 0; i < p.rows(); ++i) {
            if (!std::isfinite(size[i]) || (s == 0 && year.values[i] != last)) continue;
            const auto it = std::find(layout.microsites.begin(), layout.microsites.end(), site[i]);
            if (it == layout.microsites.end()) continue;
            const auto m = static_cast<std::size_t>(it - layout.microsites.begin());
            share[s][m * k_distribution_bins + bin_of(size[i])] += 1.0;
            total += 1.0;
        }
        if (total > 0.0)
            for (double& x : share[s]) x /= total;
    }
    // Stable structure of the pooled kernel: w_k(z_i) h_i summed over the classes of a
    // microsite (first-year and established) and the nodes in a bin.
    const KernelResult& k = a.pooled();
    const auto n = static_cast<std::size_t>(k.nodes.size());
    for (std::size_t c = 0; n > 0 && c < static_cast<std::size_t>(k.w.size()) / n; ++c)
        for (std::size_t i = 0; i < n; ++i) {
            const auto at = static_cast<Eigen::Index>(c * n + i);
            share[2][(c % n_sites) * k_distribution_bins +
                     bin_of(k.nodes[static_cast<Eigen::Index>(i)])] +=
                k.w[at] * k.weights[static_cast<Eigen::Index>(i)];
        }
    for (std::size_t m = 0; m < n_sites; ++m)
        for (std::size_t s = 0; s < 3; ++s)
            for (std::size_t b = 0; b < k_distribution_bins; ++b)
                t.rows.push_back({txt(layout.microsites[m]), txt(sources[s]), count(b + 1),
                                  num(lo + width * static_cast<double>(b)),
                                  num(lo + width * static_cast<double>(b + 1)),
                                  num(share[s][m * k_distribution_bins + b])});
    return t;
}

/// The pooled kernel K(z', z), its sensitivity s(z', z) and elasticity masses, block by
/// block, downsampled to runs of surface_stride() nodes: K and s averaged, elasticity summed.
TidyTable surfaces_table(const PreparedModel& model) {
    TidyTable t{"check_surfaces",
                {"surface", "to_class", "from_class", "size_to", "size_from", "value"},
                {}};
    const kernel::Mesh mesh(model.mesh.lower, model.mesh.upper, model.mesh.points,
                            model.mesh.rule);
    const auto curves = evaluate_rates(model.pooled, model.layout, mesh.points());
    const kernel::KernelOperator op(
        mesh, describe_kernel(curves, baseline_recruitment(model, model.years.size()),
                              model.mesh.eviction));
    const analysis::EigenTriple triple = analysis::dominant_eigen(op);
    const analysis::KernelSensitivity ks(op, triple);
    const std::size_t classes = op.class_count();
    const Eigen::VectorXd& nodes = mesh.points();
    const Eigen::VectorXd& weights = mesh.weights();
    const auto n = static_cast<std::size_t>(nodes.size());

    std::vector<std::pair<std::size_t, std::size_t>> blocks;
    std::map<std::pair<std::size_t, std::size_t>, Eigen::MatrixXd> kernel_blocks;
    for (std::size_t to = 0; to < classes; ++to)
        for (std::size_t from = 0; from < classes; ++from) {
            Eigen::MatrixXd b = op.block(to, from);
            if ((b.array() != 0.0).any()) {
                blocks.emplace_back(to, from);
                kernel_blocks[{to, from}] = std::move(b);
            }
        }
    const std::size_t stride = surface_stride(n, blocks.size());
    const std::size_t cells = (n + stride - 1) / stride;
    auto run_mean = [&](std::size_t c) {
        double s = 0.0;
        const std::size_t end = std::min(n, (c + 1) * stride);
        for (std::size_t i = c * stride; i < end; ++i) s += nodes[static_cast<Eigen::Index>(i)];
        return s / static_cast<double>(end - c * stride);
    };
    const char* surfaces[] = {"kernel", "sensitivity", "elasticity"};
    for (int s = 0; s < 3; ++s) {
        for (const auto& [to, from] : blocks) {
            Eigen::MatrixXd f;
            if (s == 0) {
                // Function values K(z_i, z_j) = A_ij / h_j.
                f = kernel_blocks[{to, from}];
                for (Eigen::Index j = 0; j < f.cols(); ++j) f.col(j) /= weights[j];
            } else if (s == 1) {
                f = ks.sensitivity(to, from);
            } else {
                f = ks.elasticity(to, from);
            }
            for (std::size_t I = 0; I < cells; ++I)
                for (std::size_t J = 0; J < cells; ++J) {
                    const std::size_t i1 = std::min(n, (I + 1) * stride);
                    const std::size_t j1 = std::min(n, (J + 1) * stride);
                    double sum = 0.0;
                    for (std::size_t i = I * stride; i < i1; ++i)
                        for (std::size_t j = J * stride; j < j1; ++j)
                            sum += f(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j));
                    const double cellsize =
                        static_cast<double>((i1 - I * stride) * (j1 - J * stride));
                    t.rows.push_back({txt(surfaces[s]), txt(class_label(model.layout, to)),
                                      txt(class_label(model.layout, from)), num(run_mean(I)),
                                      num(run_mean(J)), num(s == 2 ? sum : sum / cellsize)});
                }
        }
    }
    return t;
}

}  // namespace

std::vector<report::TidyTable> model_check_tables(const FitResult& fit,
                                                  const AnalysisResult& analysis,
                                                  const CheckData* data) {
    std::vector<report::TidyTable> out;
    const PreparedModel& model = fit.model;
    if (data != nullptr) {
        const census::TransitionData& d = data->census;
        out.push_back(binned_table(d, model.layout));
        out.push_back(curves_table(d, fit));
        out.push_back(growth_table(d, model));
        out.push_back(seeds_table(d, model.layout));
        out.push_back(recruit_table(d, model));
        if (data->experiments && fit.arrival) {
            auto [obs, curve] =
                trapping_tables(*data->experiments, *fit.arrival, model.layout, model.bare);
            out.push_back(std::move(obs));
            out.push_back(std::move(curve));
            out.push_back(retention_table(*data->experiments));
        }
        out.push_back(distribution_table(d, analysis, model));
    }
    out.push_back(surfaces_table(model));
    return out;
}

}  // namespace safesite::pipeline
