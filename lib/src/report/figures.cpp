#include "safesite/report/figures.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <numeric>
#include <utility>

#include <fmt/format.h>

#include "safesite/error.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/caution.hpp"
#include "safesite/report/model_check_figures.hpp"
#include "safesite/report/svg_chart.hpp"

namespace safesite::report {

namespace {

namespace fs = std::filesystem;

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

/// The category of the seeds lost in the arrival figure.
constexpr const char* k_lost_category = "lost (in no microsite)";

/// The table of that name, or nullptr.
const TidyTable* find_table(const std::vector<TidyTable>& tables, const std::string& name) {
    for (const auto& t : tables) {
        if (t.name == name) return &t;
    }
    return nullptr;
}

/// Column indices by name; nullopt when the table is absent, has no rows, or lacks a column.
std::optional<std::vector<std::size_t>> columns(const TidyTable* table,
                                                const std::vector<std::string>& names) {
    if (table == nullptr || table->rows.empty()) return std::nullopt;
    std::vector<std::size_t> idx;
    for (const auto& n : names) {
        const auto it = std::find(table->columns.begin(), table->columns.end(), n);
        if (it == table->columns.end()) return std::nullopt;
        idx.push_back(static_cast<std::size_t>(it - table->columns.begin()));
    }
    return idx;
}

/// A cell as a label, as written in the CSV ("2015", "pooled"; "" when missing).
std::string label(const std::vector<Cell>& row, std::size_t column) {
    return column < row.size() ? format_cell(row[column]) : std::string();
}

/// A cell as a number: decimals and integers; NaN for text and missing cells.
double value(const std::vector<Cell>& row, std::size_t column) {
    if (column >= row.size()) return k_nan;
    if (const auto* d = std::get_if<double>(&row[column])) return *d;
    if (const auto* i = std::get_if<std::int64_t>(&row[column])) return static_cast<double>(*i);
    return k_nan;
}

/// Interval bounds of `intervals` rows of one quantity, by "kernel|target"; and the level.
struct Intervals {
    std::map<std::string, std::pair<double, double>> bounds;
    double level = k_nan;
    const std::pair<double, double>* find(const std::string& kernel,
                                          const std::string& target) const {
        const auto it = bounds.find(kernel + "|" + target);
        return it == bounds.end() ? nullptr : &it->second;
    }
};

Intervals read_intervals(const std::vector<TidyTable>& tables, const std::string& quantity) {
    Intervals out;
    const TidyTable* t = find_table(tables, "intervals");
    const auto c = columns(t, {"quantity", "kernel", "target", "lower", "upper", "level"});
    if (!c) return out;
    for (const auto& row : t->rows) {
        if (label(row, (*c)[0]) != quantity) continue;
        const double lo = value(row, (*c)[3]), hi = value(row, (*c)[4]);
        if (!std::isfinite(lo) || !std::isfinite(hi)) continue;
        out.bounds[label(row, (*c)[1]) + "|" + label(row, (*c)[2])] = {lo, hi};
        if (!std::isfinite(out.level)) out.level = value(row, (*c)[5]);
    }
    return out;
}

/// " with 95 % bootstrap intervals" (empty without intervals).
std::string interval_note(const Intervals& iv) {
    if (iv.bounds.empty()) return {};
    const std::string level =
        std::isfinite(iv.level) ? fmt::format("{:g} % ", 100.0 * iv.level) : std::string();
    return " with " + level + "bootstrap intervals";
}

/// Canvas height for a chart with `bands` categories on its y axis: about 48 px a band
/// between the fixed margins, at least 260 px (common practice: bars neither thin nor fat).
SvgChart::Layout banded_layout(std::size_t bands, double width) {
    SvgChart::Layout layout;
    layout.width = width;
    layout.height = std::max(260.0, 130.0 + 48.0 * static_cast<double>(bands));
    return layout;
}

/// Labels in order of first appearance.
void add_unique(std::vector<std::string>& list, const std::string& s) {
    if (std::find(list.begin(), list.end(), s) == list.end()) list.push_back(s);
}

std::size_t index_of(const std::vector<std::string>& list, const std::string& s) {
    return static_cast<std::size_t>(std::find(list.begin(), list.end(), s) - list.begin());
}

/// The figure of a finished chart, with the caution kept in its description.
Figure finish(SvgChart& chart, std::string name) {
    chart.set_note(k_caution);
    return Figure{std::move(name), chart.to_svg(), {}};
}

/// (x, y) pairs sorted by x (stable) and split into the two coordinate lists.
std::pair<std::vector<double>, std::vector<double>> sorted_by_x(
    std::vector<std::pair<double, double>> points) {
    std::stable_sort(points.begin(), points.end(),
                     [](const auto& a, const auto& b) { return a.first < b.first; });
    std::pair<std::vector<double>, std::vector<double>> out;
    for (const auto& [x, y] : points) {
        out.first.push_back(x);
        out.second.push_back(y);
    }
    return out;
}

}  // namespace

std::optional<Figure> lambda_by_year_figure(const std::vector<TidyTable>& tables) {
    const TidyTable* t = find_table(tables, "lambda");
    const auto c = columns(t, {"kernel", "lambda"});
    if (!c) return std::nullopt;
    std::vector<std::string> years;
    std::vector<double> lambdas;
    double pooled = k_nan;
    for (const auto& row : t->rows) {
        const std::string kernel = label(row, (*c)[0]);
        if (kernel == "pooled") {
            pooled = value(row, (*c)[1]);
        } else {
            years.push_back(kernel);
            lambdas.push_back(value(row, (*c)[1]));
        }
    }
    const bool any_year =
        std::any_of(lambdas.begin(), lambdas.end(), [](double v) { return std::isfinite(v); });
    if (!any_year && !std::isfinite(pooled)) return std::nullopt;
    const Intervals iv = read_intervals(tables, "lambda");

    SvgChart chart("Population growth rate \u03bb per census year",
                   "\u03bb per census-year kernel (t \u2192 t+1)" + interval_note(iv) +
                       "; dashed: pooled; grey: \u03bb = 1.");
    chart.set_x_categories(years);
    chart.set_x_label("census year t (kernel t \u2192 t+1)");
    chart.set_y_label("\u03bb (per year)");
    const std::size_t s_year = chart.add_series("census year", Swatch::point_line);
    const std::size_t s_pooled = chart.add_series("pooled", Swatch::line, Dash::dashed);
    const double n = static_cast<double>(std::max<std::size_t>(years.size(), 1));
    if (const auto* b = iv.find("pooled", "")) chart.add_band_y(s_pooled, b->first, b->second);
    chart.add_line(s_pooled, {-0.5, n - 0.5}, {pooled, pooled});
    chart.add_reference_y(1.0, "\u03bb = 1");
    std::vector<double> x(years.size());
    std::iota(x.begin(), x.end(), 0.0);
    chart.add_line(s_year, x, lambdas);
    for (std::size_t i = 0; i < years.size(); ++i) {
        if (const auto* b = iv.find(years[i], "")) {
            chart.add_whisker(s_year, x[i], b->first, x[i], b->second);
        }
    }
    chart.add_points(s_year, x, lambdas);
    return finish(chart, "lambda_by_year");
}

std::optional<Figure> scenarios_figure(const std::vector<TidyTable>& tables) {
    const TidyTable* t = find_table(tables, "scenarios");
    const auto c = columns(t, {"scenario", "kernel", "delta_lambda"});
    if (!c) return std::nullopt;
    std::vector<std::string> names;
    std::vector<double> deltas;
    for (const auto& row : t->rows) {
        if (label(row, (*c)[1]) != "pooled") continue;
        names.push_back(label(row, (*c)[0]));
        deltas.push_back(value(row, (*c)[2]));
    }
    if (names.empty()) return std::nullopt;
    const Intervals iv = read_intervals(tables, "scenario_delta_lambda");

    SvgChart chart("Change in pooled \u03bb under each scenario",
                   "\u0394\u03bb = scenario \u03bb \u2212 baseline \u03bb (pooled kernel)" +
                       interval_note(iv) + "; right of 0: \u03bb rises.",
                   banded_layout(names.size(), 720.0));
    chart.set_y_categories(names);
    chart.set_x_label("\u0394\u03bb (pooled kernel)");
    const std::size_t s = chart.add_series("", Swatch::bar);
    chart.add_reference_x(0.0, "\u0394\u03bb = 0");
    for (std::size_t i = 0; i < names.size(); ++i) {
        const double y = static_cast<double>(i);
        chart.add_hbar(s, y, 0.0, deltas[i], 0.55);
        if (const auto* b = iv.find("pooled", names[i])) {
            chart.add_whisker(s, b->first, y, b->second, y);
        }
    }
    return finish(chart, "scenarios");
}

std::optional<Figure> retention_curves_figure(const std::vector<TidyTable>& tables) {
    const TidyTable* t = find_table(tables, "retention_curve");
    const auto c = columns(t, {"microsite", "seed_type", "day", "retained"});
    if (!c) return std::nullopt;
    // The focal seed type: from `hazards` (focal = 1), else the only seed type of the curves.
    std::string focal;
    bool found = false;
    const TidyTable* h = find_table(tables, "hazards");
    if (const auto hc = columns(h, {"seed_type", "focal"})) {
        for (const auto& row : h->rows) {
            if (value(row, (*hc)[1]) == 1.0) {
                focal = label(row, (*hc)[0]);
                found = true;
                break;
            }
        }
    }
    if (!found) {
        std::vector<std::string> types;
        for (const auto& row : t->rows) add_unique(types, label(row, (*c)[1]));
        if (types.size() != 1) return std::nullopt;
        focal = types.front();
    }
    std::vector<std::string> sites;
    std::map<std::string, std::vector<std::pair<double, double>>> curves;
    for (const auto& row : t->rows) {
        if (label(row, (*c)[1]) != focal) continue;
        const std::string site = label(row, (*c)[0]);
        add_unique(sites, site);
        curves[site].emplace_back(value(row, (*c)[2]), value(row, (*c)[3]));
    }
    if (sites.empty()) return std::nullopt;

    SvgChart chart("Seed retention by microsite, seed type \u201c" + focal + "\u201d",
                   "R(t) = exp(\u2212h t), share of seeds still in place t days after placement "
                   "(without re-landing).");
    chart.set_x_label("days since placement, t");
    chart.set_y_label("share of seeds retained, R(t)");
    chart.include_x(0.0);
    chart.include_y(0.0);
    chart.include_y(1.0);
    for (std::size_t i = 0; i < sites.size(); ++i) {
        const auto [x, y] = sorted_by_x(curves[sites[i]]);
        const std::size_t s = chart.add_series(sites[i], Swatch::line, series_dash(i));
        chart.add_line(s, x, y);
    }
    return finish(chart, "retention_curves");
}

std::optional<Figure> arrival_figure(const std::vector<TidyTable>& tables) {
    const TidyTable* t = find_table(tables, "arrival");
    const auto c = columns(t, {"scenario", "microsite", "fraction"});
    if (!c) return std::nullopt;
    std::vector<std::string> scenarios, sites;
    for (const auto& row : t->rows) {
        add_unique(scenarios, label(row, (*c)[0]));
        add_unique(sites, label(row, (*c)[1]));
    }
    // The seeds lost per scenario: 1 − Σ a_m over its microsites, when every a_m is finite.
    std::vector<double> lost(scenarios.size(), 1.0);
    for (const auto& row : t->rows)
        lost[index_of(scenarios, label(row, (*c)[0]))] -= value(row, (*c)[2]);
    for (double& l : lost)
        if (std::isfinite(l) && std::fabs(l) < 1e-12) l = 0.0;  // rounding of a full sum
    std::vector<std::string> categories = sites;
    categories.push_back(k_lost_category);
    // Room for a legend of scenario names; about 24 px a bar.
    SvgChart::Layout layout = banded_layout(categories.size() * scenarios.size() / 2, 800.0);
    SvgChart chart("Arrival fractions per microsite and seeds lost",
                   "Share of all seeds produced that lie in each microsite at germination time; "
                   "below the line, the share lost (in no microsite: 1 \u2212 \u03a3 a\u2098). "
                   "In each group the bars follow the legend from the top.",
                   layout);
    chart.set_y_categories(categories);
    chart.set_x_label("share of all seeds produced");
    chart.include_x(0.0);
    std::vector<std::size_t> series;
    for (const auto& s : scenarios) series.push_back(chart.add_series(s, Swatch::bar));
    // Bars of one group share 80 % of its band, in legend order from the top.
    const double k = static_cast<double>(scenarios.size());
    const double thickness = 0.8 / k;
    auto bar = [&](std::size_t j, double group, double a) {
        const double centre = group - 0.4 + (static_cast<double>(j) + 0.5) * thickness;
        chart.add_hbar(series[j], centre, 0.0, a, thickness * 0.92, fmt::format("{:.3g}", a));
    };
    for (const auto& row : t->rows) {
        bar(index_of(scenarios, label(row, (*c)[0])),
            static_cast<double>(index_of(sites, label(row, (*c)[1]))), value(row, (*c)[2]));
    }
    const double lost_group = static_cast<double>(sites.size());
    for (std::size_t j = 0; j < scenarios.size(); ++j) bar(j, lost_group, lost[j]);
    chart.add_reference_y(lost_group - 0.5, "");
    return finish(chart, "arrival");
}

std::optional<Figure> perturbation_figure(const std::vector<TidyTable>& tables) {
    const TidyTable* t = find_table(tables, "perturbation");
    const auto c = columns(t, {"kernel", "change", "lambda"});
    if (!c) return std::nullopt;
    std::vector<std::pair<double, double>> points;
    for (const auto& row : t->rows) {
        if (label(row, (*c)[0]) != "pooled") continue;
        points.emplace_back(100.0 * value(row, (*c)[1]), value(row, (*c)[2]));
    }
    if (points.empty()) return std::nullopt;
    const auto [x, y] = sorted_by_x(std::move(points));
    SvgChart chart("Pooled \u03bb under a change in juvenile survival",
                   "Pooled \u03bb when juvenile survival s_J becomes min(1, (1 + \u03b4) s_J); "
                   "grey: \u03bb = 1 and no change.");
    chart.set_x_label("change \u03b4 in juvenile survival (%)");
    chart.set_y_label("pooled \u03bb (per year)");
    const std::size_t s = chart.add_series("", Swatch::point_line);
    chart.add_reference_y(1.0, "\u03bb = 1");
    chart.add_reference_x(0.0, "no change");
    chart.add_line(s, x, y);
    chart.add_points(s, x, y);
    return finish(chart, "perturbation");
}

std::vector<Figure> all_figures(const std::vector<TidyTable>& tables) {
    std::vector<Figure> out;
    for (auto* make : {&lambda_by_year_figure, &scenarios_figure, &retention_curves_figure,
                       &arrival_figure, &perturbation_figure}) {
        if (auto f = make(tables)) out.push_back(std::move(*f));
    }
    for (auto& f : model_check_figures(tables)) out.push_back(std::move(f));
    return out;
}

std::vector<fs::path> write_figures(const fs::path& dir, const std::vector<Figure>& figures) {
    std::vector<fs::path> written;
    if (figures.empty()) return written;
    const fs::path folder = dir / "figures";
    ensure_output_folder(folder);
    for (const auto& f : figures) {
        const fs::path p = folder / (f.name + ".svg");
        write_output_file(p, f.svg);
        written.push_back(p);
    }
    return written;
}

}  // namespace safesite::report
