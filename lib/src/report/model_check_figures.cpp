#include "safesite/report/model_check_figures.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <memory>
#include <utility>

#include <fmt/format.h>

#include "safesite/report/caution.hpp"
#include "safesite/report/svg_chart.hpp"

namespace safesite::report {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

const TidyTable* find(const std::vector<TidyTable>& tables, const std::string& name) {
    for (const auto& t : tables)
        if (t.name == name) return &t;
    return nullptr;
}

/// A table's rows read by column name; `ok` is false when the table is absent, empty or
/// lacks a column.
struct Reader {
    const TidyTable* table = nullptr;
    std::map<std::string, std::size_t> at;
    bool ok = false;
    Reader(const std::vector<TidyTable>& tables, const std::string& name,
           const std::vector<std::string>& columns) {
        table = find(tables, name);
        if (table == nullptr || table->rows.empty()) return;
        for (const auto& c : columns) {
            const auto it = std::find(table->columns.begin(), table->columns.end(), c);
            if (it == table->columns.end()) return;
            at[c] = static_cast<std::size_t>(it - table->columns.begin());
        }
        ok = true;
    }
    std::string text(const std::vector<Cell>& row, const std::string& c) const {
        const std::size_t i = at.at(c);
        return i < row.size() ? format_cell(row[i]) : std::string();
    }
    double num(const std::vector<Cell>& row, const std::string& c) const {
        const std::size_t i = at.at(c);
        if (i >= row.size()) return k_nan;
        if (const auto* d = std::get_if<double>(&row[i])) return *d;
        if (const auto* n = std::get_if<std::int64_t>(&row[i])) return static_cast<double>(*n);
        return k_nan;
    }
};

/// Panels keyed by a label, kept in order of first appearance.
class Panels {
public:
    SvgChart& at(const std::string& key) {
        for (std::size_t i = 0; i < m_keys.size(); ++i)
            if (m_keys[i] == key) return *m_charts[i];
        SvgChart::Layout layout;
        layout.width = 480.0;
        layout.height = 320.0;
        layout.margin_left = 66.0;
        layout.margin_right = 16.0;
        layout.margin_top = 40.0;
        layout.margin_bottom = 54.0;
        layout.font_size = 12.0;
        layout.target_ticks = 5;
        m_keys.push_back(key);
        m_charts.push_back(std::make_unique<SvgChart>(key, std::string(), layout));
        return *m_charts.back();
    }
    bool has(const std::string& key) const {
        return std::find(m_keys.begin(), m_keys.end(), key) != m_keys.end();
    }
    bool empty() const { return m_keys.empty(); }
    const std::vector<std::string>& keys() const { return m_keys; }

    Figure finish(const std::string& name, const std::string& title, const std::string& caption) {
        std::vector<std::string> svgs;
        for (const auto& c : m_charts) svgs.push_back(c->to_svg());
        const std::size_t columns = std::min<std::size_t>(2, std::max<std::size_t>(svgs.size(), 1));
        return Figure{name, compose_panels(title, caption, svgs, columns, k_caution),
                      k_model_check_section};
    }

private:
    std::vector<std::string> m_keys;
    std::vector<std::unique_ptr<SvgChart>> m_charts;
};

/// Panel label of a microsite and stage ("all" is not shown).
std::string panel_key(const std::string& microsite, const std::string& stage) {
    return stage.empty() || stage == "all" ? microsite : microsite + ", " + stage;
}

std::string series_name(const std::string& stage, const std::string& what) {
    return stage.empty() || stage == "all" ? what : stage + ": " + what;
}

/// Series indices of a panel by name (created on first use).
struct SeriesMap {
    std::map<std::string, std::map<std::string, std::size_t>> by_panel;
    std::size_t get(SvgChart& chart, const std::string& panel, const std::string& name,
                    Swatch swatch, Dash dash = Dash::solid) {
        auto& m = by_panel[panel];
        const auto it = m.find(name);
        if (it != m.end()) return it->second;
        const std::size_t s = chart.add_series(name, swatch, dash);
        m[name] = s;
        return s;
    }
};

/// (x, y) sorted by x.
void sort_xy(std::vector<double>& x, std::vector<double>& y) {
    std::vector<std::size_t> o(x.size());
    for (std::size_t i = 0; i < o.size(); ++i) o[i] = i;
    std::stable_sort(o.begin(), o.end(), [&](std::size_t a, std::size_t b) { return x[a] < x[b]; });
    std::vector<double> xs, ys;
    for (std::size_t i : o) {
        xs.push_back(x[i]);
        ys.push_back(y[i]);
    }
    x = std::move(xs);
    y = std::move(ys);
}

/// Curves of check_curves for one rate: key "panel|kernel" → (size, value, sd) sorted.
struct Curve {
    std::vector<double> x, y, sd;
};
std::vector<std::pair<std::string, Curve>> read_curves(const std::vector<TidyTable>& tables,
                                                       const std::string& rate) {
    std::vector<std::pair<std::string, Curve>> out;
    const Reader r(tables, "check_curves",
                   {"rate", "microsite", "stage", "kernel", "size", "value", "sd"});
    if (!r.ok) return out;
    for (const auto& row : r.table->rows) {
        if (r.text(row, "rate") != rate) continue;
        const std::string key = r.text(row, "microsite") + "|" + r.text(row, "stage") + "|" +
                                r.text(row, "kernel");
        auto it = std::find_if(out.begin(), out.end(),
                               [&](const auto& p) { return p.first == key; });
        if (it == out.end()) it = out.insert(out.end(), {key, Curve{}});
        it->second.x.push_back(r.num(row, "size"));
        it->second.y.push_back(r.num(row, "value"));
        it->second.sd.push_back(r.num(row, "sd"));
    }
    return out;
}

/// Split "microsite|stage|kernel".
std::vector<std::string> split_key(const std::string& key) {
    std::vector<std::string> parts;
    std::size_t start = 0;
    while (true) {
        const auto bar = key.find('|', start);
        parts.push_back(key.substr(start, bar == std::string::npos ? std::string::npos
                                                                   : bar - start));
        if (bar == std::string::npos) break;
        start = bar + 1;
    }
    while (parts.size() < 3) parts.emplace_back();
    return parts;
}

/// Panels of a scatter table (check_growth) with x and y from two columns.
std::optional<Figure> growth_scatter(const std::vector<TidyTable>& tables, const std::string& name,
                                     const std::string& x_col, const std::string& y_col,
                                     const std::string& title, const std::string& caption,
                                     const std::string& x_label, const std::string& y_label,
                                     int kind) {
    const Reader r(tables, "check_growth", {"microsite", "stage", x_col, y_col});
    if (!r.ok) return std::nullopt;
    Panels panels;
    std::map<std::string, std::pair<std::vector<double>, std::vector<double>>> points;
    for (const auto& row : r.table->rows) {
        const std::string key = panel_key(r.text(row, "microsite"), r.text(row, "stage"));
        panels.at(key);
        points[key].first.push_back(r.num(row, x_col));
        points[key].second.push_back(r.num(row, y_col));
    }
    // kind 0: growth with the fitted mean and bands; 1: residuals; 2: normal quantile plot.
    std::map<std::string, Curve> pooled;
    if (kind == 0)
        for (auto& [key, c] : read_curves(tables, "growth")) {
            const auto p = split_key(key);
            if (p[2] == "pooled") pooled[panel_key(p[0], p[1])] = c;
        }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        chart.set_x_label(x_label);
        chart.set_y_label(y_label);
        const auto& [x, y] = points[key];
        const std::size_t s_dots = chart.add_series(
            kind == 2 ? "residuals" : fmt::format("plants ({} shown)", x.size()), Swatch::point);
        if (kind == 0 && pooled.count(key)) {
            const Curve& c = pooled[key];
            const std::size_t s_fit = chart.add_series("fitted mean, pooled", Swatch::line);
            for (double k : {2.0, 1.0}) {
                std::vector<double> px, py;
                for (std::size_t i = 0; i < c.x.size(); ++i) {
                    px.push_back(c.x[i]);
                    py.push_back(c.y[i] + k * c.sd[i]);
                }
                for (std::size_t i = c.x.size(); i-- > 0;) {
                    px.push_back(c.x[i]);
                    py.push_back(c.y[i] - k * c.sd[i]);
                }
                chart.add_area(s_fit, px, py, k == 2.0 ? 0.12 : 0.22);
            }
            chart.add_dots(s_dots, x, y, 0.3);
            chart.add_line(s_fit, c.x, c.y);
        } else {
            chart.add_dots(s_dots, x, y, 0.35);
        }
        if (kind == 1) {
            chart.add_reference_y(0.0, "0");
            chart.add_reference_y(2.0, "+2");
            chart.add_reference_y(-2.0, "\u22122");
        }
        if (kind == 2) {
            double lo = INFINITY, hi = -INFINITY;
            for (std::size_t i = 0; i < x.size(); ++i) {
                if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
                lo = std::min({lo, x[i], y[i]});
                hi = std::max({hi, x[i], y[i]});
            }
            const std::size_t s_line = chart.add_series("1:1 (normal)", Swatch::line, Dash::dashed);
            if (lo < hi) chart.add_line(s_line, {lo, hi}, {lo, hi});
        }
    }
    return panels.finish(name, title, caption);
}

}  // namespace

std::optional<Figure> check_binary_figure(const std::vector<TidyTable>& tables,
                                          const std::string& rate) {
    const Reader r(tables, "check_binned",
                   {"rate", "microsite", "stage", "size_mean", "proportion", "lower", "upper"});
    if (!r.ok) return std::nullopt;
    Panels panels;
    SeriesMap series;
    for (const auto& row : r.table->rows) {
        if (r.text(row, "rate") != rate) continue;
        const std::string stage = r.text(row, "stage");
        const std::string key = panel_key(r.text(row, "microsite"), stage);
        SvgChart& chart = panels.at(key);
        const std::size_t s =
            series.get(chart, key, series_name(stage, "observed (binned)"), Swatch::point);
        const double x = r.num(row, "size_mean");
        chart.add_whisker(s, x, r.num(row, "lower"), x, r.num(row, "upper"));
        chart.add_points(s, {x}, {r.num(row, "proportion")});
    }
    if (panels.empty()) return std::nullopt;
    for (auto& [key, c] : read_curves(tables, rate)) {
        const auto p = split_key(key);
        const std::string panel = panel_key(p[0], p[1]);
        if (!panels.has(panel)) continue;
        SvgChart& chart = panels.at(panel);
        const std::size_t s =
            series.get(chart, panel, series_name(p[1], "fitted"), Swatch::line);
        if (p[2] == "pooled") {
            chart.add_line(s, c.x, c.y);
        } else {
            chart.add_trace(s, c.x, c.y, 0.3);
        }
    }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        chart.include_y(0.0);
        chart.include_y(1.0);
        chart.set_x_label("size at t (kernel scale)");
        chart.set_y_label(rate == "survival" ? "share surviving to t+1" : "share flowering at t");
    }
    const std::string what = rate == "survival" ? "Survival" : "Flowering";
    return panels.finish(
        "check_" + rate, what + " against size: observed and fitted",
        "Points: observed share of plants in equal-count size bins (at the bin's mean size), "
        "with Wilson 95 % intervals; line: the fitted pooled curve; faint lines: the fitted "
        "curve of each census year (when year effects are fitted). One panel per microsite.");
}

std::optional<Figure> check_growth_figure(const std::vector<TidyTable>& tables) {
    return growth_scatter(
        tables, "check_growth", "size", "size_next", "Growth: size at t+1 against size at t",
        "Points: surviving plants (a deterministic subsample of at most 2000 per panel when "
        "there are more); line: the fitted pooled mean; bands: \u00b11 and \u00b12 fitted "
        "standard deviations around it.",
        "size at t", "size at t+1", 0);
}

std::optional<Figure> check_growth_residuals_figure(const std::vector<TidyTable>& tables) {
    return growth_scatter(
        tables, "check_growth_residuals", "size", "residual",
        "Growth: standardised residuals against size",
        "Standardised residual (size at t+1 \u2212 fitted mean) / fitted SD of each plant's "
        "census-year fit; about 95 % should lie between \u22122 and +2 at every size.",
        "size at t", "standardised residual", 1);
}

std::optional<Figure> check_growth_qq_figure(const std::vector<TidyTable>& tables) {
    return growth_scatter(
        tables, "check_growth_qq", "normal_score", "residual",
        "Growth: normal quantile plot of the standardised residuals",
        "Sorted standardised residuals against standard normal quantiles at Blom plotting "
        "positions (i \u2212 3/8)/(n + 1/4); points on the dashed 1:1 line mean normal "
        "residuals.",
        "normal quantile", "standardised residual", 2);
}

std::optional<Figure> check_seeds_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "check_seeds", {"microsite", "stage", "size", "seeds"});
    if (!r.ok) return std::nullopt;
    Panels panels;
    SeriesMap series;
    std::map<std::string, std::pair<std::vector<double>, std::vector<double>>> points;
    for (const auto& row : r.table->rows) {
        const std::string key = panel_key(r.text(row, "microsite"), r.text(row, "stage"));
        panels.at(key);
        points[key].first.push_back(r.num(row, "size"));
        points[key].second.push_back(std::log10(r.num(row, "seeds") + 1.0));
    }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        const std::size_t s = series.get(chart, key, "flowering plants", Swatch::point);
        chart.add_dots(s, points[key].first, points[key].second, 0.35);
        chart.set_x_label("size at t");
        chart.set_y_label("log\u2081\u2080(seeds + 1)");
        chart.include_y(0.0);
    }
    for (auto& [key, c] : read_curves(tables, "seeds")) {
        const auto p = split_key(key);
        const std::string panel = panel_key(p[0], p[1]);
        if (!panels.has(panel)) continue;
        SvgChart& chart = panels.at(panel);
        const std::size_t s = series.get(chart, panel, "fitted mean", Swatch::line);
        std::vector<double> y;
        for (double v : c.y) y.push_back(std::log10(v + 1.0));
        if (p[2] == "pooled") {
            chart.add_line(s, c.x, y);
        } else {
            chart.add_trace(s, c.x, y, 0.3);
        }
    }
    return panels.finish("check_seeds", "Seeds per flowering plant against size",
                         "Points: counted seeds of flowering plants (log scale: log\u2081\u2080 of "
                         "seeds + 1, so that zero counts show); line: the fitted pooled mean; faint "
                         "lines: census-year fits.");
}

std::optional<Figure> check_recruit_sizes_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "check_recruit_sizes",
                   {"microsite", "size_lower", "size_upper", "recruits", "density"});
    if (!r.ok) return std::nullopt;
    Panels panels;
    SeriesMap series;
    std::map<std::string, std::size_t> totals;
    for (const auto& row : r.table->rows) {
        const std::string key = r.text(row, "microsite");
        SvgChart& chart = panels.at(key);
        totals[key] += static_cast<std::size_t>(std::max(0.0, r.num(row, "recruits")));
        const std::size_t s = series.get(chart, key, "observed", Swatch::bar);
        const double a = r.num(row, "size_lower"), b = r.num(row, "size_upper");
        const double d = r.num(row, "density");
        chart.add_area(s, {a, b, b, a}, {0.0, 0.0, d, d}, 0.55);
    }
    for (auto& [key, c] : read_curves(tables, "recruit_size")) {
        const auto p = split_key(key);
        if (!panels.has(p[0]) || p[2] != "pooled") continue;
        SvgChart& chart = panels.at(p[0]);
        chart.add_line(series.get(chart, p[0], "fitted density", Swatch::line), c.x, c.y);
    }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        chart.set_x_label(fmt::format("recruit size (kernel scale), {} recruits", totals[key]));
        chart.set_y_label("density");
        chart.include_y(0.0);
    }
    return panels.finish("check_recruit_sizes", "Recruit sizes: observed and fitted",
                         "Bars: histogram of the sizes of new recruits as a density (Sturges "
                         "bins); line: the fitted pooled recruit-size density. One panel per "
                         "microsite.");
}

/// Columns of a fitted-curve table: the panel, the series within it, x and y.
struct CurveColumns {
    const char* panel;
    const char* series;
    const char* x;
    const char* y;
};

/// One fitted line per (panel, series) of table `c`, on the panels that have observed points,
/// x sorted; rows with x above `x_max` are left out.
void add_fitted_lines(Panels& panels, SeriesMap& series, const Reader& c,
                      const CurveColumns& col,
                      double x_max = std::numeric_limits<double>::infinity()) {
    std::map<std::pair<std::string, std::string>,
             std::pair<std::vector<double>, std::vector<double>>>
        lines;
    for (const auto& row : c.table->rows) {
        const double x = c.num(row, col.x);
        if (x > x_max) continue;
        auto& l = lines[{c.text(row, col.panel), c.text(row, col.series)}];
        l.first.push_back(x);
        l.second.push_back(c.num(row, col.y));
    }
    for (auto& [k, l] : lines) {
        if (!panels.has(k.first)) continue;
        SvgChart& chart = panels.at(k.first);
        sort_xy(l.first, l.second);
        chart.add_line(series.get(chart, k.first, k.second, Swatch::point_line), l.first,
                       l.second);
    }
}

std::optional<Figure> check_trapping_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "check_trapping", {"form", "seed_type", "neighbour_size", "share"});
    if (!r.ok) return std::nullopt;
    Panels panels;
    SeriesMap series;
    for (const auto& row : r.table->rows) {
        const std::string key = r.text(row, "form");
        SvgChart& chart = panels.at(key);
        const std::size_t s =
            series.get(chart, key, r.text(row, "seed_type"), Swatch::point_line);
        chart.add_points(s, {r.num(row, "neighbour_size")}, {r.num(row, "share")});
    }
    const Reader c(tables, "check_trapping_curve",
                   {"form", "seed_type", "neighbour_size", "trapping"});
    if (c.ok) {
        add_fitted_lines(panels, series, c, {"form", "seed_type", "neighbour_size", "trapping"});
    }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        chart.set_x_label("neighbour size (raw scale)");
        chart.set_y_label("share of seeds trapped");
        chart.include_y(0.0);
        chart.include_y(1.0);
    }
    return panels.finish("check_trapping", "Seed trapping: observed and fitted",
                         "Points: share of launched seeds trapped in each trial; lines: the "
                         "fitted trapping probability (fixed effects: a neighbour with a random "
                         "intercept of 0), per seed type. One panel per growth form.");
}

std::optional<Figure> check_retention_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "check_retention",
                   {"microsite", "seed_type", "day", "share", "lower", "upper"});
    if (!r.ok) return std::nullopt;
    Panels panels;
    SeriesMap series;
    double last_day = 0.0;
    for (const auto& row : r.table->rows) {
        const std::string key = r.text(row, "microsite");
        SvgChart& chart = panels.at(key);
        const std::size_t s =
            series.get(chart, key, r.text(row, "seed_type"), Swatch::point_line);
        const double day = r.num(row, "day");
        last_day = std::max(last_day, day);
        chart.add_whisker(s, day, r.num(row, "lower"), day, r.num(row, "upper"));
        chart.add_points(s, {day}, {r.num(row, "share")});
    }
    const Reader c(tables, "retention_curve", {"microsite", "seed_type", "day", "retained"});
    if (c.ok) {
        // The curve over the observed days only.
        add_fitted_lines(panels, series, c, {"microsite", "seed_type", "day", "retained"},
                         last_day);
    }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        chart.set_x_label("days since placement");
        chart.set_y_label("share of seeds present");
        chart.include_y(0.0);
        chart.include_y(1.0);
        chart.include_x(0.0);
    }
    return panels.finish("check_retention", "Seed retention: observed and fitted",
                         "Points: share of the seeds checked on each day that were still "
                         "present, with Wilson 95 % intervals; lines: the fitted retention "
                         "R(t) = exp(\u2212h t), per seed type. One panel per microsite.");
}

std::optional<Figure> check_size_distribution_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "check_size_distribution",
                   {"microsite", "source", "size_lower", "size_upper", "proportion"});
    if (!r.ok) return std::nullopt;
    Panels panels;
    SeriesMap series;
    std::map<std::pair<std::string, std::string>, std::pair<std::vector<double>,
                                                             std::vector<double>>> lines;
    std::vector<std::pair<std::string, std::string>> order;
    for (const auto& row : r.table->rows) {
        const std::pair<std::string, std::string> k{r.text(row, "microsite"),
                                                    r.text(row, "source")};
        if (!lines.count(k)) order.push_back(k);
        panels.at(k.first);
        lines[k].first.push_back(0.5 * (r.num(row, "size_lower") + r.num(row, "size_upper")));
        lines[k].second.push_back(r.num(row, "proportion"));
    }
    auto legend = [](const std::string& source) -> std::pair<std::string, Dash> {
        if (source == "last_census") return {"observed, last census", Dash::solid};
        if (source == "all_years") return {"observed, all years", Dash::dotted};
        if (source == "stable_pooled") return {"stable, pooled kernel", Dash::dashed};
        return {source, Dash::dash_dot};
    };
    for (const auto& k : order) {
        SvgChart& chart = panels.at(k.first);
        const auto [name, dash] = legend(k.second);
        const std::size_t s = series.get(chart, k.first, name, Swatch::line, dash);
        chart.add_line(s, lines[k].first, lines[k].second);
    }
    for (const auto& key : panels.keys()) {
        SvgChart& chart = panels.at(key);
        chart.set_x_label("size (kernel scale)");
        chart.set_y_label("share of all plants");
        chart.include_y(0.0);
    }
    return panels.finish(
        "check_size_distribution", "Size distribution: observed and stable",
        "Share of all plants (every microsite together) in each size bin and microsite: "
        "observed in the last census and over all census years, and the stable size "
        "distribution of the pooled kernel. A population near its stable structure has lines "
        "that agree; a large gap means transient dynamics or a misfit.");
}

std::optional<Figure> check_reproductive_value_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "reproductive_value", {"kernel", "microsite", "stage", "size", "value"});
    if (!r.ok) return std::nullopt;
    std::vector<std::string> order;
    std::map<std::string, std::pair<std::vector<double>, std::vector<double>>> lines;
    for (const auto& row : r.table->rows) {
        if (r.text(row, "kernel") != "pooled") continue;
        const std::string k = panel_key(r.text(row, "microsite"), r.text(row, "stage") ==
                                                                      "established"
                                                                  ? "all"
                                                                  : r.text(row, "stage"));
        if (!lines.count(k)) order.push_back(k);
        lines[k].first.push_back(r.num(row, "size"));
        lines[k].second.push_back(r.num(row, "value"));
    }
    if (order.empty()) return std::nullopt;
    SvgChart chart("Reproductive value per size and microsite (pooled kernel)",
                   "Reproductive value v(z) of the pooled kernel: the relative contribution "
                   "of a plant of size z in each microsite (and stage) to future population "
                   "size, normalised so that \u2211 h v w = 1.");
    chart.set_x_label("size (kernel scale)");
    chart.set_y_label("reproductive value v(z)");
    chart.include_y(0.0);
    constexpr Dash dashes[] = {Dash::solid, Dash::dashed, Dash::dotted, Dash::dash_dot};
    for (std::size_t i = 0; i < order.size(); ++i) {
        const std::size_t s = chart.add_series(order[i], Swatch::line, dashes[i % 4]);
        auto& l = lines[order[i]];
        sort_xy(l.first, l.second);
        chart.add_line(s, l.first, l.second);
    }
    chart.set_note(k_caution);
    return Figure{"check_reproductive_value", chart.to_svg(), k_model_check_section};
}

std::optional<Figure> check_surface_figure(const std::vector<TidyTable>& tables,
                                           const std::string& surface) {
    const Reader r(tables, "check_surfaces",
                   {"surface", "to_class", "from_class", "size_to", "size_from", "value"});
    if (!r.ok) return std::nullopt;
    std::vector<std::string> order;
    std::map<std::string, std::map<std::pair<double, double>, double>> cells;
    for (const auto& row : r.table->rows) {
        if (r.text(row, "surface") != surface) continue;
        const std::string k = r.text(row, "to_class") + " \u2190 " + r.text(row, "from_class");
        if (!cells.count(k)) order.push_back(k);
        cells[k][{r.num(row, "size_to"), r.num(row, "size_from")}] = r.num(row, "value");
    }
    if (order.empty()) return std::nullopt;
    std::vector<HeatPanel> panels;
    for (const auto& k : order) {
        HeatPanel p;
        p.title = k;
        for (const auto& [xy, v] : cells[k]) {
            (void)v;
            if (std::find(p.y.begin(), p.y.end(), xy.first) == p.y.end()) p.y.push_back(xy.first);
            if (std::find(p.x.begin(), p.x.end(), xy.second) == p.x.end())
                p.x.push_back(xy.second);
        }
        std::sort(p.x.begin(), p.x.end());
        std::sort(p.y.begin(), p.y.end());
        p.values.assign(p.x.size() * p.y.size(), k_nan);
        for (const auto& [xy, v] : cells[k]) {
            const auto ri = static_cast<std::size_t>(
                std::lower_bound(p.y.begin(), p.y.end(), xy.first) - p.y.begin());
            const auto ci = static_cast<std::size_t>(
                std::lower_bound(p.x.begin(), p.x.end(), xy.second) - p.x.begin());
            p.values[ri * p.x.size() + ci] = v;
        }
        panels.push_back(std::move(p));
    }
    std::string title, caption, legend;
    if (surface == "kernel") {
        title = "Pooled kernel K(z\u2032, z) by class block";
        legend = "K: plants of size z\u2032 at t+1 per plant of size z at t, per unit size";
        caption = "Each panel is one block \u201cto class \u2190 from class\u201d of the pooled "
                  "kernel (survival\u2013growth and reproduction together) with a non-zero entry; "
                  "colour from 0 to the panel's maximum (stated above the panel).";
    } else if (surface == "sensitivity") {
        title = "Sensitivity of pooled \u03bb to the kernel, by class block";
        legend = "s(z\u2032, z) = v(z\u2032) w(z): change in \u03bb per unit change of K";
        caption = "Sensitivity s(z\u2032, z) = v(z\u2032) w(z) / \u27e8v, w\u27e9 of the pooled "
                  "\u03bb to the kernel at each pair of sizes, for the non-empty blocks; colour "
                  "from 0 to the panel's maximum.";
    } else {
        title = "Elasticity of pooled \u03bb to the kernel, by class block";
        legend = "share of \u03bb per cell (all cells of all panels sum to 1)";
        caption = "Elasticity cell masses K s / \u03bb of the pooled kernel summed over the "
                  "downsampled cells (they sum to 1 over all blocks); colour from 0 to the "
                  "panel's maximum.";
    }
    caption += " Axes: size at t (z, across) and size at t+1 (z\u2032, up), kernel scale; "
               "downsampled to at most 50\u00d750 cells a block.";
    const std::size_t columns = std::min<std::size_t>(3, panels.size() + 1);
    return Figure{"check_" + surface,
                  heat_map_svg(title, caption, "size at t, z", "size at t+1, z\u2032", legend,
                               panels, columns, k_caution),
                  k_model_check_section};
}

std::optional<Figure> check_year_contributions_figure(const std::vector<TidyTable>& tables) {
    const Reader r(tables, "year_decomposition",
                   {"kernel", "component", "contribution", "delta_lambda"});
    if (!r.ok) return std::nullopt;
    std::vector<std::string> years, components;
    std::map<std::string, double> delta;
    for (const auto& row : r.table->rows) {
        const std::string y = r.text(row, "kernel"), c = r.text(row, "component");
        if (std::find(years.begin(), years.end(), y) == years.end()) years.push_back(y);
        if (std::find(components.begin(), components.end(), c) == components.end())
            components.push_back(c);
        delta[y] = r.num(row, "delta_lambda");
    }
    SvgChart::Layout layout;
    layout.width = 820.0;
    layout.height = std::max(300.0, 130.0 + 22.0 * static_cast<double>(years.size() *
                                                                        (components.size() + 1)) /
                                                2.0);
    SvgChart chart("Contributions of the vital rates to \u03bb of each census year",
                   "Bars: contribution of each vital rate to \u03bb_t \u2212 \u03bb_pooled "
                   "(symmetric one-at-a-time substitution; \u201cinteraction\u201d is the "
                   "remainder); points: the total \u03bb_t \u2212 \u03bb_pooled. Right of 0: "
                   "the rate raised \u03bb in that year.",
                   layout);
    chart.set_y_categories(years);
    chart.set_x_label("contribution to \u03bb_t \u2212 \u03bb_pooled");
    chart.add_reference_x(0.0, "");
    std::vector<std::size_t> series;
    for (const auto& c : components) series.push_back(chart.add_series(c, Swatch::bar));
    const std::size_t s_total = chart.add_series("total \u0394\u03bb", Swatch::point);
    const double k = static_cast<double>(components.size());
    const double thickness = 0.8 / std::max(k, 1.0);
    for (const auto& row : r.table->rows) {
        const auto yi = static_cast<double>(
            std::find(years.begin(), years.end(), r.text(row, "kernel")) - years.begin());
        const auto ci = static_cast<std::size_t>(
            std::find(components.begin(), components.end(), r.text(row, "component")) -
            components.begin());
        const double centre = yi - 0.4 + (static_cast<double>(ci) + 0.5) * thickness;
        chart.add_hbar(series[ci], centre, 0.0, r.num(row, "contribution"), thickness * 0.9);
    }
    for (std::size_t i = 0; i < years.size(); ++i)
        chart.add_points(s_total, {delta[years[i]]}, {static_cast<double>(i)});
    chart.set_note(k_caution);
    return Figure{"check_year_contributions", chart.to_svg(), k_model_check_section};
}

std::vector<Figure> model_check_figures(const std::vector<TidyTable>& tables) {
    std::vector<Figure> out;
    auto add = [&](std::optional<Figure> f) {
        if (f) out.push_back(std::move(*f));
    };
    add(check_binary_figure(tables, "survival"));
    add(check_binary_figure(tables, "flowering"));
    add(check_growth_figure(tables));
    add(check_growth_residuals_figure(tables));
    add(check_growth_qq_figure(tables));
    add(check_seeds_figure(tables));
    add(check_recruit_sizes_figure(tables));
    add(check_trapping_figure(tables));
    add(check_retention_figure(tables));
    add(check_size_distribution_figure(tables));
    add(check_reproductive_value_figure(tables));
    for (const char* s : {"kernel", "sensitivity", "elasticity"}) add(check_surface_figure(tables, s));
    add(check_year_contributions_figure(tables));
    return out;
}

}  // namespace safesite::report
