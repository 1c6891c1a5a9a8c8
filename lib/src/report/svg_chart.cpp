#include "safesite/report/svg_chart.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <cstdlib>
#include <initializer_list>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <utility>

#include <fmt/format.h>

namespace safesite::report {

namespace {

// Series colours: see series_palette() in svg_chart.hpp for how they were chosen. L* (CIE,
// D65) of each in brackets.
constexpr const char* k_palette[] = {
    "#4411ff",  // ultramarine (L* 35.7)
    "#999900",  // olive       (L* 61.3)
    "#770033",  // maroon      (L* 24.2)
    "#009999",  // teal        (L* 57.2)
    "#bb1122",  // crimson     (L* 39.7)
    "#8877ff",  // periwinkle  (L* 57.7)
    "#770077",  // plum        (L* 27.4)
    "#ee3388",  // rose        (L* 54.4)
};
constexpr std::size_t k_palette_size = sizeof(k_palette) / sizeof(k_palette[0]);
constexpr const char* k_ink = "#222222";        // text and axes
constexpr const char* k_reference = "#555555";  // reference lines and their labels
constexpr const char* k_grid = "#e4e4e4";       // grid lines at the ticks of a linear axis

const char* colour_of(std::size_t series) { return k_palette[series % k_palette_size]; }

/// The stroke-dasharray attribute of a dash pattern (empty for solid lines).
const char* dash_attribute(Dash dash) {
    switch (dash) {
        case Dash::dashed: return " stroke-dasharray=\"7 4\"";
        case Dash::dotted: return " stroke-dasharray=\"2 3\"";
        case Dash::dash_dot: return " stroke-dasharray=\"8 3 2 3\"";
        case Dash::long_dash:
            return " stroke-dasharray=\"14 5\"";
        case Dash::dash_dot_dot:
            return " stroke-dasharray=\"9 3 2 3 2 3\"";
        case Dash::solid: break;
    }
    return "";
}

/// Coordinates in px with two decimals: enough for any screen, short, and reproducible.
std::string px(double v) { return format_fixed(v, 2); }

/// Code points of UTF-8 text (continuation bytes 10xxxxxx are not counted).
std::size_t text_length(const std::string& s) {
    std::size_t n = 0;
    for (unsigned char c : s) {
        if ((c & 0xC0u) != 0x80u) ++n;
    }
    return n;
}

/// Byte offsets of the code points of UTF-8 text, and its size at the end.
std::vector<std::size_t> code_point_starts(const std::string& s) {
    std::vector<std::size_t> starts;
    for (std::size_t i = 0; i < s.size(); ++i) {
        if ((static_cast<unsigned char>(s[i]) & 0xC0u) != 0x80u) starts.push_back(i);
    }
    starts.push_back(s.size());
    return starts;
}

double text_width(const std::string& s, double font_size) {
    return estimated_text_width(s, font_size);
}

/// Widest line of several, in px.
double widest(const std::vector<std::string>& lines, double font_size) {
    double w = 0.0;
    for (const auto& l : lines) w = std::max(w, text_width(l, font_size));
    return w;
}

/// An axis-aligned box in px (x0 <= x1, y0 <= y1).
struct Box {
    double x0 = 0.0, y0 = 0.0, x1 = 0.0, y1 = 0.0;
};

bool overlaps(const Box& a, const Box& b) {
    return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;
}

bool inside(const Box& inner, const Box& outer) {
    return inner.x0 >= outer.x0 && inner.x1 <= outer.x1 && inner.y0 >= outer.y0 &&
           inner.y1 <= outer.y1;
}

/// Whether the segment (x0, y0)–(x1, y1) meets the box (Liang–Barsky clipping).
bool segment_hits(const Box& b, double x0, double y0, double x1, double y1) {
    double t0 = 0.0, t1 = 1.0;
    const double dx = x1 - x0, dy = y1 - y0;
    const double p[4] = {-dx, dx, -dy, dy};
    const double q[4] = {x0 - b.x0, b.x1 - x0, y0 - b.y0, b.y1 - y0};
    for (int k = 0; k < 4; ++k) {
        if (p[k] == 0.0) {
            if (q[k] < 0.0) return false;
        } else {
            const double t = q[k] / p[k];
            if (p[k] < 0.0) {
                t0 = std::max(t0, t);
            } else {
                t1 = std::min(t1, t);
            }
            if (t0 > t1) return false;
        }
    }
    return true;
}

/// What labels must not cover: boxes (points, bars, whiskers, other labels) and segments
/// (lines), in px.
struct Obstacles {
    std::vector<Box> boxes;
    std::vector<std::array<double, 4>> segments;
    bool hit(const Box& b) const {
        for (const auto& o : boxes)
            if (overlaps(b, o)) return true;
        for (const auto& s : segments)
            if (segment_hits(b, s[0], s[1], s[2], s[3])) return true;
        return false;
    }
};

/// CIE L* of an sRGB colour "#rrggbb" (D65; IEC 61966-2-1 decoding).
double lightness(const char* hex) {
    auto channel = [&](int at) {
        const double c = std::stoi(std::string(hex + at, 2), nullptr, 16) / 255.0;
        return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
    };
    const double y = 0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5);
    const double f = y > 216.0 / 24389.0 ? std::cbrt(y) : (24389.0 / 27.0 * y + 16.0) / 116.0;
    return 116.0 * f - 16.0;
}

/// `<text>` content of one or several lines: the first at the element's y, the next ones in
/// `<tspan>`s at x, one line height further down each.
std::string text_lines(const std::vector<std::string>& lines, double x, double line_height) {
    std::string o;
    for (std::size_t i = 0; i < lines.size(); ++i) {
        if (i == 0) {
            o += xml_escape(lines[i]);
        } else {
            o += fmt::format("<tspan x=\"{}\" dy=\"{}\">{}</tspan>", px(x), px(line_height),
                             xml_escape(lines[i]));
        }
    }
    return o;
}

bool finite(double v) { return std::isfinite(v); }

/// A marker centred at (x, y), about 10 px across, of shape series_marker(series): circle,
/// square, triangle up, diamond, triangle down, plus, star, cross; `extra` holds further
/// attributes (class, outline).
std::string marker(std::size_t series, double x, double y, const char* colour,
                   const char* extra) {
    auto polygon = [&](std::initializer_list<std::pair<double, double>> pts) {
        std::string points;
        for (const auto& [dx, dy] : pts) {
            if (!points.empty()) points += ' ';
            points += px(x + dx) + "," + px(y + dy);
        }
        return fmt::format("<polygon{} points=\"{}\" fill=\"{}\"/>\n", extra, points, colour);
    };
    switch (series_marker(series)) {
        case 0:
            return fmt::format("<circle{} cx=\"{}\" cy=\"{}\" r=\"4.5\" fill=\"{}\"/>\n", extra,
                               px(x), px(y), colour);
        case 1:
            return fmt::format("<rect{} x=\"{}\" y=\"{}\" width=\"8\" height=\"8\" fill=\"{}\"/>\n",
                               extra, px(x - 4.0), px(y - 4.0), colour);
        case 2:
            return polygon({{0.0, -5.5}, {5.0, 3.5}, {-5.0, 3.5}});
        case 3:
            return polygon({{0.0, -5.5}, {5.5, 0.0}, {0.0, 5.5}, {-5.5, 0.0}});
        case 4:
            return polygon({{0.0, 5.5}, {5.0, -3.5}, {-5.0, -3.5}});
        case 5:
            return polygon({{-1.8, -5.5},
                            {1.8, -5.5},
                            {1.8, -1.8},
                            {5.5, -1.8},
                            {5.5, 1.8},
                            {1.8, 1.8},
                            {1.8, 5.5},
                            {-1.8, 5.5},
                            {-1.8, 1.8},
                            {-5.5, 1.8},
                            {-5.5, -1.8},
                            {-1.8, -1.8}});
        case 6:  // five-pointed star, outer radius 6, inner 2.6
            return polygon({{0.0, -6.0},
                            {1.53, -2.1},
                            {5.71, -1.85},
                            {2.47, 0.8},
                            {3.53, 4.85},
                            {0.0, 2.6},
                            {-3.53, 4.85},
                            {-2.47, 0.8},
                            {-5.71, -1.85},
                            {-1.53, -2.1}});
        default:  // the plus turned by 45°
            return polygon({{-3.9, -6.4},
                            {0.0, -2.5},
                            {3.9, -6.4},
                            {6.4, -3.9},
                            {2.5, 0.0},
                            {6.4, 3.9},
                            {3.9, 6.4},
                            {0.0, 2.5},
                            {-3.9, 6.4},
                            {-6.4, 3.9},
                            {-2.5, 0.0},
                            {-6.4, -3.9}});
    }
}

/// The resolved axis: data range [lo, hi] mapped onto the pixel range [p0, p1].
struct Scale {
    bool categorical = false;
    double lo = 0.0, hi = 1.0;  // linear: first and last tick; categorical: −0.5, n − 0.5
    double p0 = 0.0, p1 = 1.0;  // pixel positions of lo and hi
    NiceTicks ticks;
    double operator()(double v) const { return p0 + (v - lo) / (hi - lo) * (p1 - p0); }
};

}  // namespace

const std::vector<std::string>& series_palette() {
    static const std::vector<std::string> palette(std::begin(k_palette), std::end(k_palette));
    return palette;
}

std::size_t series_marker(std::size_t series) {
    return (series + series / k_palette_size) % k_marker_shapes;
}

Dash series_dash(std::size_t i) {
    constexpr Dash k_order[] = {Dash::solid,    Dash::dashed,    Dash::dotted,
                                Dash::dash_dot, Dash::long_dash, Dash::dash_dot_dot};
    return k_order[i % (sizeof(k_order) / sizeof(k_order[0]))];
}

double estimated_text_width(const std::string& text, double font_size) {
    return 0.56 * font_size * static_cast<double>(text_length(text));
}

std::vector<std::string> wrap_text(const std::string& text, std::size_t width) {
    assert(width >= 1);
    width = std::max<std::size_t>(width, 1);
    // Pieces that may not be broken further except by force: words split after '-', '/', '_'.
    struct Piece {
        std::string text;
        bool space_before = false;
    };
    std::vector<Piece> pieces;
    bool space = false;
    std::string cur;
    auto flush = [&](bool next_space) {
        if (!cur.empty()) {
            pieces.push_back({cur, space});
            cur.clear();
            space = next_space;
        } else if (next_space && !pieces.empty()) {
            space = true;
        }
    };
    for (char c : text) {
        if (c == ' ') {
            flush(true);
        } else {
            cur += c;
            if (c == '-' || c == '/' || c == '_') flush(false);
        }
    }
    flush(false);

    std::vector<std::string> lines;
    std::string line;
    for (const auto& p : pieces) {
        const std::size_t sep = (p.space_before && !line.empty()) ? 1 : 0;
        if (!line.empty() && text_length(line) + sep + text_length(p.text) > width) {
            lines.push_back(line);
            line.clear();
        }
        if (!line.empty() && p.space_before) line += ' ';
        line += p.text;
        // A piece longer than a line: cut it at code points.
        while (text_length(line) > width) {
            const auto starts = code_point_starts(line);
            lines.push_back(line.substr(0, starts[width]));
            line.erase(0, starts[width]);
        }
    }
    if (!line.empty()) lines.push_back(line);
    return lines;
}

double nice_number(double x, bool round) {
    if (!(x > 0.0) || !std::isfinite(x)) return 0.0;
    const double exponent = std::floor(std::log10(x));
    const double power = std::pow(10.0, exponent);
    const double f = x / power;  // 1 <= f < 10 (up to rounding)
    double nice = 10.0;
    if (round) {
        if (f < 1.5) nice = 1.0;
        else if (f < 3.0) nice = 2.0;
        else if (f < 7.0) nice = 5.0;
    } else {
        if (f <= 1.0) nice = 1.0;
        else if (f <= 2.0) nice = 2.0;
        else if (f <= 5.0) nice = 5.0;
    }
    return nice * power;
}

NiceTicks nice_ticks(double lo, double hi, int target) {
    assert(target >= 2 && target <= 20);
    if (!std::isfinite(lo) || !std::isfinite(hi)) {
        lo = 0.0;
        hi = 1.0;
    }
    assert(lo <= hi);
    if (hi - lo <= 0.0) {
        const double pad = std::max(0.1 * std::fabs(lo), 1.0);
        lo -= pad;
        hi += pad;
    }
    // Heckbert1990, "loose labelling": a nice range, then a nice step rounded from
    // range / (ticks − 1), then the multiples of the step enclosing the data.
    NiceTicks t;
    const double range = nice_number(hi - lo, false);
    t.step = nice_number(range / (target - 1), true);
    // A tiny allowance so that lo = 0.3 with step 0.1 does not fall below 3 by rounding.
    const double eps = 1e-9;
    const double first = std::floor(lo / t.step + eps);
    const double last = std::ceil(hi / t.step - eps);
    for (double k = first; k <= last + 0.5; k += 1.0) t.values.push_back(k * t.step);
    t.decimals = std::max(-static_cast<int>(std::floor(std::log10(t.step) + eps)), 0);
    return t;
}

std::string format_fixed(double value, int decimals) {
    std::string s = fmt::format("{:.{}f}", value, std::max(decimals, 0));
    // "-0", "-0.00": a rounded negative zero prints without its sign.
    if (s[0] == '-' && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
    return s;
}

std::string xml_escape(const std::string& text) {
    std::string out;
    out.reserve(text.size());
    for (char c : text) {
        switch (c) {
            case '&': out += "&amp;"; break;
            case '<': out += "&lt;"; break;
            case '>': out += "&gt;"; break;
            case '"': out += "&quot;"; break;
            case '\'': out += "&#39;"; break;
            default:
                if (static_cast<unsigned char>(c) < 0x20u) {
                    out += ' ';
                } else {
                    out += c;
                }
        }
    }
    return out;
}

SvgChart::SvgChart(std::string title, std::string caption)
    : SvgChart(std::move(title), std::move(caption), Layout{}) {}

SvgChart::SvgChart(std::string title, std::string caption, Layout layout)
    : m_title(std::move(title)), m_caption(std::move(caption)), m_layout(layout) {}

void SvgChart::set_x_categories(std::vector<std::string> labels) {
    m_x.categorical = true;
    m_x.categories = std::move(labels);
}

void SvgChart::set_y_categories(std::vector<std::string> labels) {
    m_y.categorical = true;
    m_y.categories = std::move(labels);
}

void SvgChart::include(Axis& axis, double value) {
    if (!finite(value)) return;
    if (!axis.has_range) {
        axis.lo = axis.hi = value;
        axis.has_range = true;
    } else {
        axis.lo = std::min(axis.lo, value);
        axis.hi = std::max(axis.hi, value);
    }
}

void SvgChart::include_x(double value) { include(m_x, value); }
void SvgChart::include_y(double value) { include(m_y, value); }

void SvgChart::check_series(std::size_t series) const {
    assert(series < m_series.size());
    (void)series;
}

std::size_t SvgChart::add_series(std::string legend, Swatch swatch, Dash dash) {
    m_series.push_back({std::move(legend), swatch, dash});
    return m_series.size() - 1;
}

void SvgChart::add_points(std::size_t series, const std::vector<double>& x,
                          const std::vector<double>& y) {
    check_series(series);
    assert(x.size() == y.size());
    for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
        if (!finite(x[i]) || !finite(y[i])) continue;
        m_marks.push_back({Mark::Kind::point, series, {x[i]}, {y[i]}, 0.0, {}});
        include(m_x, x[i]);
        include(m_y, y[i]);
    }
}

void SvgChart::add_line(std::size_t series, const std::vector<double>& x,
                        const std::vector<double>& y) {
    check_series(series);
    assert(x.size() == y.size());
    Mark run{Mark::Kind::line, series, {}, {}, 0.0, {}};
    auto flush = [&] {
        if (run.x.size() >= 2) m_marks.push_back(run);
        run.x.clear();
        run.y.clear();
    };
    for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
        if (!finite(x[i]) || !finite(y[i])) {
            flush();
            continue;
        }
        run.x.push_back(x[i]);
        run.y.push_back(y[i]);
        include(m_x, x[i]);
        include(m_y, y[i]);
    }
    flush();
}

void SvgChart::add_whisker(std::size_t series, double x0, double y0, double x1, double y1) {
    check_series(series);
    if (!finite(x0) || !finite(y0) || !finite(x1) || !finite(y1)) return;
    m_marks.push_back({Mark::Kind::whisker, series, {x0, x1}, {y0, y1}, 0.0, {}});
    include(m_x, x0);
    include(m_x, x1);
    include(m_y, y0);
    include(m_y, y1);
}

void SvgChart::add_hbar(std::size_t series, double category, double from, double to,
                        double thickness, std::string label) {
    check_series(series);
    assert(thickness > 0.0 && thickness <= 1.0);
    if (!finite(category) || !finite(from) || !finite(to)) return;
    m_marks.push_back(
        {Mark::Kind::bar, series, {from, to}, {category}, thickness, std::move(label)});
    include(m_x, from);
    include(m_x, to);
}

void SvgChart::add_band_y(std::size_t series, double lo, double hi) {
    check_series(series);
    if (!finite(lo) || !finite(hi)) return;
    m_marks.push_back({Mark::Kind::band, series, {}, {lo, hi}, 0.0, {}});
    include(m_y, lo);
    include(m_y, hi);
}

void SvgChart::add_reference_x(double value, std::string label) {
    if (!finite(value)) return;
    m_marks.push_back({Mark::Kind::ref_x, 0, {value}, {}, 0.0, std::move(label)});
    include(m_x, value);
}

void SvgChart::add_reference_y(double value, std::string label) {
    if (!finite(value)) return;
    m_marks.push_back({Mark::Kind::ref_y, 0, {}, {value}, 0.0, std::move(label)});
    include(m_y, value);
}

std::size_t SvgChart::mark_count(const std::string& kind) const {
    std::size_t n = 0;
    for (const auto& m : m_marks) {
        const char* k = "";
        switch (m.kind) {
            case Mark::Kind::point: k = "point"; break;
            case Mark::Kind::line: k = "line"; break;
            case Mark::Kind::whisker: k = "whisker"; break;
            case Mark::Kind::bar: k = "bar"; break;
            case Mark::Kind::band: k = "band"; break;
            case Mark::Kind::ref_x:
            case Mark::Kind::ref_y: k = "reference"; break;
            case Mark::Kind::area: k = "area"; break;
            case Mark::Kind::trace: k = "trace"; break;
            case Mark::Kind::dot: k = "dot"; break;
        }
        if (kind == k) ++n;
    }
    return n;
}

std::string SvgChart::to_svg() const {
    const Layout& L = m_layout;
    const double fs = L.font_size;
    const double title_fs = 1.3 * fs;
    const double caption_fs = 0.95 * fs;
    const double line_h = 1.2 * fs;             // line height of wrapped labels
    const double value_fs = 0.85 * fs;          // bar value labels
    constexpr std::size_t k_legend_chars = 26;  // code points a legend line

    // 1. Scales: nice ticks for linear axes, bands for categorical ones.
    auto resolve = [&](const Axis& a) {
        Scale s;
        s.categorical = a.categorical;
        if (a.categorical) {
            s.lo = -0.5;
            s.hi = static_cast<double>(std::max<std::size_t>(a.categories.size(), 1)) - 0.5;
        } else {
            s.ticks = a.has_range ? nice_ticks(a.lo, a.hi, L.target_ticks)
                                  : nice_ticks(0.0, 1.0, L.target_ticks);
            s.lo = s.ticks.values.front();
            s.hi = s.ticks.values.back();
        }
        return s;
    };
    Scale sx = resolve(m_x);
    Scale sy = resolve(m_y);

    // 2. Text blocks: the title wrapped to the canvas, y category labels wrapped so that
    // they fit their band, legend labels wrapped at k_legend_chars.
    const auto title_chars =
        static_cast<std::size_t>(std::max((L.width - 32.0) / (0.56 * title_fs), 10.0));
    std::vector<std::string> title = wrap_text(m_title, title_chars);
    if (title.empty()) title.push_back("");
    const double title_extra = 1.25 * title_fs * static_cast<double>(title.size() - 1);
    const double plot_top = L.margin_top + title_extra;
    const double plot_h = std::max(L.height - L.margin_top - L.margin_bottom, 40.0);
    const double plot_bottom = plot_top + plot_h;

    std::vector<std::vector<std::string>> y_cats;
    if (m_y.categorical) {
        const double band =
            plot_h / static_cast<double>(std::max<std::size_t>(m_y.categories.size(), 1));
        for (std::size_t chars = 24;; chars += 8) {
            y_cats.clear();
            std::size_t most = 1;
            for (const auto& c : m_y.categories) {
                y_cats.push_back(wrap_text(c, chars));
                most = std::max(most, y_cats.back().size());
            }
            if (static_cast<double>(most) * line_h <= 0.95 * band || chars >= 80) break;
        }
    }
    std::vector<std::size_t> legend;
    std::vector<std::vector<std::string>> legend_text;
    double legend_width = 0.0;
    for (std::size_t i = 0; i < m_series.size(); ++i) {
        if (m_series[i].legend.empty()) continue;
        legend.push_back(i);
        legend_text.push_back(wrap_text(m_series[i].legend, k_legend_chars));
        legend_width = std::max(legend_width, widest(legend_text.back(), fs) + 40.0);
    }

    // 3. Margins. Left: y category labels. Right: the legend, and a column for reference
    // labels that found no free place in the plot (decided in step 4, which may widen it).
    double left = L.margin_left;
    if (m_y.categorical) {
        double w = 0.0;
        for (const auto& lines : y_cats) w = std::max(w, widest(lines, fs));
        left = std::max(left, w + 20.0 + (m_y.label.empty() ? 0.0 : 1.6 * fs));
    }
    const double plot_left = left;

    struct Placed {
        std::size_t mark = 0;
        Box box;
        double x = 0.0, y = 0.0;  // text anchor point (start anchor, baseline)
    };
    struct Geometry {
        double plot_right = 0.0, plot_w = 0.0;
        std::vector<std::vector<std::string>> x_cats;
        double bottom = 0.0;
        Obstacles obstacles;
        std::vector<Placed> labels;  // reference labels
        bool needs_column = false;   // a y reference label found no free place
    };
    double ref_column = 0.0;  // width reserved right of the plot for reference labels
    auto lay_out = [&](double reserve) {
        Geometry g;
        const double right = L.margin_right + (legend.empty() ? 0.0 : legend_width + 8.0) + reserve;
        g.plot_w = std::max(L.width - left - right, 40.0);
        g.plot_right = plot_left + g.plot_w;
        sx.p0 = plot_left;
        sx.p1 = g.plot_right;
        if (sy.categorical) {  // label 0 at the top
            sy.p0 = plot_top;
            sy.p1 = plot_bottom;
        } else {
            sy.p0 = plot_bottom;
            sy.p1 = plot_top;
        }
        // x category labels wrapped to their band (4 code points at least).
        std::size_t x_lines = 1;
        if (m_x.categorical && !m_x.categories.empty()) {
            const double band = g.plot_w / static_cast<double>(m_x.categories.size());
            const auto chars = static_cast<std::size_t>(std::max(0.92 * band / (0.56 * fs), 4.0));
            for (const auto& c : m_x.categories) {
                g.x_cats.push_back(wrap_text(c, chars));
                x_lines = std::max(x_lines, g.x_cats.back().size());
            }
        }
        g.bottom = L.margin_bottom + line_h * static_cast<double>(x_lines - 1);

        // What a label must not cover, in px.
        for (const auto& m : m_marks) {
            switch (m.kind) {
                case Mark::Kind::point: {
                    const double x = sx(m.x[0]), y = sy(m.y[0]);
                    g.obstacles.boxes.push_back({x - 7.0, y - 7.0, x + 7.0, y + 7.0});
                    break;
                }
                case Mark::Kind::line:
                    for (std::size_t i = 1; i < m.x.size(); ++i)
                        g.obstacles.segments.push_back(
                            {sx(m.x[i - 1]), sy(m.y[i - 1]), sx(m.x[i]), sy(m.y[i])});
                    break;
                case Mark::Kind::whisker: {
                    const double x0 = sx(m.x[0]), x1 = sx(m.x[1]);
                    const double y0 = sy(m.y[0]), y1 = sy(m.y[1]);
                    g.obstacles.boxes.push_back({std::min(x0, x1) - 6.0, std::min(y0, y1) - 6.0,
                                                 std::max(x0, x1) + 6.0, std::max(y0, y1) + 6.0});
                    break;
                }
                case Mark::Kind::bar: {
                    const double band = std::fabs(sy(1.0) - sy(0.0));
                    const double h = std::min(m.size * band, 40.0);
                    const double xa = sx(m.x[0]), xb = sx(m.x[1]), y = sy(m.y[0]);
                    double x0 = std::min(xa, xb), x1 = std::max(xa, xb);
                    if (!m.label.empty()) {  // room for a value label outside the bar
                        const double w = text_width(m.label, value_fs) + 6.0;
                        if (xb >= xa)
                            x1 += w;
                        else
                            x0 -= w;
                    }
                    g.obstacles.boxes.push_back({x0, y - h / 2.0 - 1.0, x1, y + h / 2.0 + 1.0});
                    break;
                }
                case Mark::Kind::trace:
                    for (std::size_t i = 1; i < m.x.size(); ++i)
                        g.obstacles.segments.push_back(
                            {sx(m.x[i - 1]), sy(m.y[i - 1]), sx(m.x[i]), sy(m.y[i])});
                    break;
                case Mark::Kind::dot: {
                    const double x = sx(m.x[0]), y = sy(m.y[0]);
                    g.obstacles.boxes.push_back({x - 3.0, y - 3.0, x + 3.0, y + 3.0});
                    break;
                }
                case Mark::Kind::band:
                case Mark::Kind::area:
                case Mark::Kind::ref_x:
                case Mark::Kind::ref_y:
                    break;
            }
        }

        // Reference labels: the first free place among candidates inside the plot; else
        // above the plot (x references) or in the column right of it (y references).
        const Box plot{plot_left + 1.0, plot_top + 1.0, g.plot_right - 1.0, plot_bottom - 1.0};
        const Box canvas{1.0, 1.0, L.width - 1.0, plot_bottom + g.bottom};
        for (std::size_t k = 0; k < m_marks.size(); ++k) {
            const Mark& m = m_marks[k];
            if ((m.kind != Mark::Kind::ref_x && m.kind != Mark::Kind::ref_y) || m.label.empty())
                continue;
            const double w = text_width(m.label, fs), a = 0.8 * fs, d = 0.25 * fs;
            // (x of the text start, baseline y) candidates.
            std::vector<std::pair<double, double>> tries;
            if (m.kind == Mark::Kind::ref_x) {
                const double x = sx(m.x[0]);
                for (double yb :
                     {plot_top + 4.0 + a, plot_bottom - 4.0 - d, plot_top + plot_h / 2.0}) {
                    tries.emplace_back(x + 5.0, yb);
                    tries.emplace_back(x - 5.0 - w, yb);
                }
            } else {
                const double y = sy(m.y[0]);
                for (double xs :
                     {g.plot_right - 5.0 - w, plot_left + 5.0, plot_left + (g.plot_w - w) / 2.0}) {
                    tries.emplace_back(xs, y - 4.0 - d);
                    tries.emplace_back(xs, y + 4.0 + a);
                }
            }
            auto box_of = [&](double xs, double yb) {
                return Box{xs - 1.0, yb - a - 1.0, xs + w + 1.0, yb + d + 1.0};
            };
            auto is_free = [&](const Box& b) {
                if (g.obstacles.hit(b)) return false;
                for (const auto& p : g.labels)
                    if (overlaps(b, p.box)) return false;
                return true;
            };
            std::optional<Placed> place;
            for (const auto& [xs, yb] : tries) {
                const Box b = box_of(xs, yb);
                if (inside(b, plot) && is_free(b)) {
                    place = Placed{k, b, xs, yb};
                    break;
                }
            }
            if (!place && m.kind == Mark::Kind::ref_x) {
                // Above the plot, centred on the line and kept on the canvas; further up
                // when another label is there.
                const double x = sx(m.x[0]);
                const double xs = std::clamp(x - w / 2.0, canvas.x0 + 1.0, canvas.x1 - 1.0 - w);
                double yb = plot_top - 5.0 - d;
                Box b = box_of(xs, yb);
                for (int up = 0; up < 2 && !is_free(b); ++up) {
                    yb -= fs + 2.0;
                    b = box_of(xs, yb);
                }
                place = Placed{k, b, xs, yb};
            }
            if (!place) {  // y reference: the column right of the plot
                g.needs_column = true;
                const double xs = g.plot_right + 6.0;
                const double yb = sy(m.y[0]) + 0.3 * fs;
                place = Placed{k, box_of(xs, yb), xs, yb};
            }
            g.labels.push_back(*place);
        }
        return g;
    };
    Geometry g = lay_out(0.0);
    if (g.needs_column) {
        for (const auto& p : g.labels)
            if (m_marks[p.mark].kind == Mark::Kind::ref_y)
                ref_column = std::max(ref_column, text_width(m_marks[p.mark].label, fs) + 12.0);
        g = lay_out(ref_column);
    }
    const double plot_right = g.plot_right;
    const double plot_w = g.plot_w;
    const double x_labels_bottom = plot_bottom + g.bottom;

    // Legend entries: wrapped lines, one entry under the other, right of the plot.
    std::vector<double> legend_y;
    double legend_bottom = 0.0;
    {
        double y = plot_top + 8.0;
        for (const auto& lines : legend_text) {
            legend_y.push_back(y);
            y += line_h * static_cast<double>(std::max<std::size_t>(lines.size(), 1)) + 0.5 * fs;
        }
        legend_bottom = y;
    }
    const double content_bottom = std::max(x_labels_bottom, legend_bottom + 4.0);

    const double caption_line = 1.35 * caption_fs;
    // Wrapped at 0.5 em a character, the average of running sans-serif text (common
    // practice); labels above are sized with a more generous 0.56 em.
    const auto caption_chars = static_cast<std::size_t>(
        std::max((L.width - 32.0) / (0.5 * caption_fs), 20.0));
    const std::vector<std::string> caption = wrap_text(m_caption, caption_chars);
    const double height =
        content_bottom +
        (caption.empty() ? 0.0 : 8.0 + caption_line * static_cast<double>(caption.size()));

    std::string o;
    o.reserve(16384);
    o += fmt::format(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{0}\" height=\"{1}\" "
        "viewBox=\"0 0 {0} {1}\" font-family=\"sans-serif\" font-size=\"{2}\" fill=\"{3}\">\n",
        px(L.width), px(height), px(fs), k_ink);
    o += "<title>" + xml_escape(m_title) + "</title>\n";
    o += "<desc>" + xml_escape(m_note.empty() ? m_caption : m_caption + " " + m_note) +
         "</desc>\n";
    o += fmt::format("<rect class=\"background\" x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" "
                     "fill=\"#ffffff\"/>\n",
                     px(L.width), px(height));

    // 4. Grid lines at the ticks of the linear axes.
    o += fmt::format("<g class=\"grid\" stroke=\"{}\" stroke-width=\"1\">\n", k_grid);
    if (!sx.categorical) {
        for (double t : sx.ticks.values) {
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\"/>\n", px(sx(t)),
                             px(plot_top), px(plot_bottom));
        }
    }
    if (!sy.categorical) {
        for (double t : sy.ticks.values) {
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\"/>\n", px(plot_left),
                             px(sy(t)), px(plot_right));
        }
    }
    o += "</g>\n";

    // 5. Marks, back to front: bands, reference lines, bars, lines, whiskers, points; the
    // labels of the reference lines last, over everything.
    std::map<std::size_t, std::pair<std::string, double>> dots;  // per series: path, opacity
    auto draw = [&](Mark::Kind kind) {
        for (const auto& m : m_marks) {
            if (m.kind != kind) continue;
            const char* c = colour_of(m.series);
            switch (m.kind) {
                case Mark::Kind::band: {
                    const double a = sy(m.y[0]), b = sy(m.y[1]);
                    o += fmt::format("<rect class=\"band\" x=\"{}\" y=\"{}\" width=\"{}\" "
                                     "height=\"{}\" fill=\"{}\" fill-opacity=\"0.18\"/>\n",
                                     px(plot_left), px(std::min(a, b)), px(plot_w),
                                     px(std::fabs(a - b)), c);
                    break;
                }
                case Mark::Kind::ref_x: {
                    const double x = sx(m.x[0]);
                    o += fmt::format(
                        "<line class=\"reference\" x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" "
                        "y2=\"{2}\" stroke=\"{3}\" stroke-width=\"1.2\"/>\n",
                        px(x), px(plot_top), px(plot_bottom), k_reference);
                    break;
                }
                case Mark::Kind::ref_y: {
                    const double y = sy(m.y[0]);
                    o += fmt::format(
                        "<line class=\"reference\" x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" "
                        "y2=\"{1}\" stroke=\"{3}\" stroke-width=\"1.2\"/>\n",
                        px(plot_left), px(y), px(plot_right), k_reference);
                    break;
                }
                case Mark::Kind::bar: {
                    const double band = std::fabs(sy(1.0) - sy(0.0));
                    const double h = std::min(m.size * band, 40.0);
                    const double xa = sx(m.x[0]), xb = sx(m.x[1]), y = sy(m.y[0]);
                    o += fmt::format("<rect class=\"bar\" x=\"{}\" y=\"{}\" width=\"{}\" "
                                     "height=\"{}\" fill=\"{}\"/>\n",
                                     px(std::min(xa, xb)), px(y - h / 2.0),
                                     px(std::fabs(xb - xa)), px(h), c);
                    if (!m.label.empty()) {
                        // Past the end of the bar when it fits in the plot, else inside the
                        // bar at its end, in white on a dark bar.
                        const bool right = xb >= xa;
                        const double w = text_width(m.label, value_fs);
                        const bool fits = right ? xb + 4.0 + w <= plot_right - 2.0
                                                : xb - 4.0 - w >= plot_left + 2.0;
                        const bool out_right = fits == right;
                        const char* fill = fits ? k_ink : (lightness(c) < 55.0 ? "#ffffff" : k_ink);
                        o += fmt::format(
                            "<text class=\"value-label\" x=\"{}\" y=\"{}\" "
                            "font-size=\"{}\" fill=\"{}\"{}>{}</text>\n",
                            px(xb + (out_right ? 4.0 : -4.0)), px(y + 0.3 * fs), px(value_fs), fill,
                            out_right ? "" : " text-anchor=\"end\"", xml_escape(m.label));
                    }
                    break;
                }
                case Mark::Kind::line: {
                    std::string points;
                    for (std::size_t i = 0; i < m.x.size(); ++i) {
                        if (i > 0) points += ' ';
                        points += px(sx(m.x[i])) + "," + px(sy(m.y[i]));
                    }
                    o += fmt::format("<polyline class=\"line\" points=\"{}\" fill=\"none\" "
                                     "stroke=\"{}\" stroke-width=\"2\"{}/>\n",
                                     points, c, dash_attribute(m_series[m.series].dash));
                    break;
                }
                case Mark::Kind::whisker: {
                    const double x0 = sx(m.x[0]), y0 = sy(m.y[0]);
                    const double x1 = sx(m.x[1]), y1 = sy(m.y[1]);
                    const bool vertical = std::fabs(x1 - x0) < std::fabs(y1 - y0);
                    const double cx = vertical ? 5.0 : 0.0, cy = vertical ? 0.0 : 5.0;
                    o += fmt::format(
                        "<path class=\"whisker\" d=\"M{},{} L{},{} M{},{} L{},{} M{},{} L{},{}\" "
                        "fill=\"none\" stroke=\"{}\" stroke-width=\"1.5\"/>\n",
                        px(x0), px(y0), px(x1), px(y1), px(x0 - cx), px(y0 - cy), px(x0 + cx),
                        px(y0 + cy), px(x1 - cx), px(y1 - cy), px(x1 + cx), px(y1 + cy),
                        // On a bar, a whisker in the bar's colour would vanish: use ink.
                        m_series[m.series].swatch == Swatch::bar ? k_ink : c);
                    break;
                }
                case Mark::Kind::point:
                    o += marker(m.series, sx(m.x[0]), sy(m.y[0]), c,
                                " class=\"point\" stroke=\"#ffffff\" stroke-width=\"1\"");
                    break;
                case Mark::Kind::area:
                case Mark::Kind::trace: {
                    std::string points;
                    for (std::size_t i = 0; i < m.x.size(); ++i) {
                        if (i > 0) points += ' ';
                        points += px(sx(m.x[i])) + "," + px(sy(m.y[i]));
                    }
                    if (m.kind == Mark::Kind::area) {
                        o += fmt::format("<polygon class=\"area\" points=\"{}\" fill=\"{}\" "
                                         "fill-opacity=\"{}\" stroke=\"none\"/>\n",
                                         points, c, format_fixed(m.size, 2));
                    } else {
                        o += fmt::format("<polyline class=\"trace\" points=\"{}\" fill=\"none\" "
                                         "stroke=\"{}\" stroke-width=\"1\" stroke-opacity=\"{}\"/>\n",
                                         points, c, format_fixed(m.size, 2));
                    }
                    break;
                }
                case Mark::Kind::dot: {
                    // Dots of a series share one path of zero-length round-capped strokes
                    // (3.6 px across): a few bytes a point for scatters of thousands.
                    auto& d = dots[m.series];
                    if (d.first.empty()) d.second = m.size;
                    d.first += fmt::format("M{},{}h0", px(sx(m.x[0])), px(sy(m.y[0])));
                    break;
                }
            }
        }
    };
    for (auto kind : {Mark::Kind::band, Mark::Kind::area, Mark::Kind::ref_x, Mark::Kind::ref_y,
                      Mark::Kind::bar, Mark::Kind::trace, Mark::Kind::dot, Mark::Kind::line,
                      Mark::Kind::whisker, Mark::Kind::point}) {
        draw(kind);
        if (kind != Mark::Kind::dot) continue;
        for (const auto& [series, d] : dots)
            o += fmt::format("<path class=\"dots\" d=\"{}\" fill=\"none\" stroke=\"{}\" "
                             "stroke-width=\"3.6\" stroke-linecap=\"round\" "
                             "stroke-opacity=\"{}\"/>\n",
                             d.first, colour_of(series), format_fixed(d.second, 2));
    }
    for (const auto& p : g.labels) {
        o +=
            fmt::format("<text class=\"reference-label\" x=\"{}\" y=\"{}\" fill=\"{}\">{}</text>\n",
                        px(p.x), px(p.y), k_reference, xml_escape(m_marks[p.mark].label));
    }

    // 6. Axes: a line along the left and bottom of the plot, outward ticks, tick labels.
    o += fmt::format("<g class=\"axes\" stroke=\"{}\" stroke-width=\"1\">\n", k_ink);
    o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\"/>\n", px(plot_left),
                     px(plot_bottom), px(plot_right));
    o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\"/>\n", px(plot_left),
                     px(plot_top), px(plot_bottom));
    std::string labels;
    if (sx.categorical) {
        for (std::size_t i = 0; i < m_x.categories.size(); ++i) {
            const double x = sx(static_cast<double>(i));
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\"/>\n", px(x),
                             px(plot_bottom), px(plot_bottom + 5.0));
            labels +=
                fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n", px(x),
                            px(plot_bottom + 9.0 + fs), text_lines(g.x_cats[i], x, line_h));
        }
    } else {
        for (double t : sx.ticks.values) {
            const double x = sx(t);
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\"/>\n", px(x),
                             px(plot_bottom), px(plot_bottom + 5.0));
            labels += fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"middle\">{}</text>\n",
                                  px(x), px(plot_bottom + 9.0 + fs),
                                  format_fixed(t, sx.ticks.decimals));
        }
    }
    if (sy.categorical) {
        for (std::size_t i = 0; i < m_y.categories.size(); ++i) {
            const double y = sy(static_cast<double>(i));
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\"/>\n",
                             px(plot_left - 5.0), px(y), px(plot_left));
            // Lines centred on the band centre.
            const double first =
                y + 0.35 * fs - 0.5 * line_h * static_cast<double>(y_cats[i].size() - 1);
            labels += fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"end\">{}</text>\n",
                                  px(plot_left - 9.0), px(first),
                                  text_lines(y_cats[i], plot_left - 9.0, line_h));
        }
    } else {
        for (double t : sy.ticks.values) {
            const double y = sy(t);
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\"/>\n",
                             px(plot_left - 5.0), px(y), px(plot_left));
            labels += fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"end\">{}</text>\n",
                                  px(plot_left - 9.0), px(y + 0.35 * fs),
                                  format_fixed(t, sy.ticks.decimals));
        }
    }
    o += "</g>\n";
    o += "<g class=\"tick-labels\">\n" + labels + "</g>\n";

    // 7. Axis labels: x centred under the tick labels, y rotated along the left edge.
    if (!m_x.label.empty()) {
        o += fmt::format("<text class=\"axis-label\" x=\"{}\" y=\"{}\" text-anchor=\"middle\">"
                         "{}</text>\n",
                         px(plot_left + plot_w / 2.0), px(x_labels_bottom - 0.9 * fs),
                         xml_escape(m_x.label));
    }
    if (!m_y.label.empty()) {
        const double x = 6.0 + fs;
        const double y = plot_top + plot_h / 2.0;
        o += fmt::format("<text class=\"axis-label\" x=\"{0}\" y=\"{1}\" text-anchor=\"middle\" "
                         "transform=\"rotate(-90 {0} {1})\">{2}</text>\n",
                         px(x), px(y), xml_escape(m_y.label));
    }

    // 8. Legend, right of the plot (and of the column of reference labels): a swatch and the
    // wrapped label per series.
    if (!legend.empty()) {
        const double x = plot_right + ref_column + 16.0;
        o += "<g class=\"legend\">\n";
        for (std::size_t k = 0; k < legend.size(); ++k) {
            const std::size_t i = legend[k];
            const char* c = colour_of(i);
            const double y = legend_y[k];
            const Swatch s = m_series[i].swatch;
            if (s == Swatch::bar) {
                o += fmt::format("<rect x=\"{}\" y=\"{}\" width=\"22\" height=\"10\" "
                                 "fill=\"{}\"/>\n",
                                 px(x), px(y - 5.0), c);
            }
            if (s == Swatch::line || s == Swatch::point_line) {
                o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"{3}\" "
                                 "stroke-width=\"2\"{4}/>\n",
                                 px(x), px(y), px(x + 22.0), c,
                                 dash_attribute(m_series[i].dash));
            }
            if (s == Swatch::point || s == Swatch::point_line) {
                o += marker(i, x + 11.0, y, c, "");  // as the point marks, no class
            }
            o += fmt::format("<text x=\"{}\" y=\"{}\">{}</text>\n", px(x + 30.0), px(y + 0.35 * fs),
                             text_lines(legend_text[k], x + 30.0, line_h));
        }
        o += "</g>\n";
    }

    // 9. Title above the plot; caption lines under everything, as the last element.
    o += fmt::format(
        "<text class=\"title\" x=\"16\" y=\"{}\" font-size=\"{}\" "
        "font-weight=\"bold\">{}</text>\n",
        px(16.0 + title_fs), px(title_fs), text_lines(title, 16.0, 1.25 * title_fs));
    if (!caption.empty()) {
        o += fmt::format("<g class=\"caption\" transform=\"translate(0 {})\">\n",
                         px(content_bottom));
        for (std::size_t i = 0; i < caption.size(); ++i) {
            o +=
                fmt::format("<text x=\"16\" y=\"{}\" font-size=\"{}\" fill=\"#444444\">{}</text>\n",
                            px(8.0 + caption_line * static_cast<double>(i + 1) - 0.35 * caption_fs),
                            px(caption_fs), xml_escape(caption[i]));
        }
        o += "</g>\n";
    }
    o += "</svg>\n";
    return o;
}


// --- Model-checking figures (appended) ----------------------------------------------------

void SvgChart::add_area(std::size_t series, const std::vector<double>& x,
                        const std::vector<double>& y, double opacity) {
    check_series(series);
    assert(x.size() == y.size());
    Mark m{Mark::Kind::area, series, {}, {}, std::clamp(opacity, 0.01, 1.0), {}};
    for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
        if (!finite(x[i]) || !finite(y[i])) continue;
        m.x.push_back(x[i]);
        m.y.push_back(y[i]);
        include(m_x, x[i]);
        include(m_y, y[i]);
    }
    if (m.x.size() >= 3) m_marks.push_back(std::move(m));
}

void SvgChart::add_trace(std::size_t series, const std::vector<double>& x,
                         const std::vector<double>& y, double opacity) {
    check_series(series);
    assert(x.size() == y.size());
    Mark run{Mark::Kind::trace, series, {}, {}, std::clamp(opacity, 0.01, 1.0), {}};
    auto flush = [&] {
        if (run.x.size() >= 2) m_marks.push_back(run);
        run.x.clear();
        run.y.clear();
    };
    for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
        if (!finite(x[i]) || !finite(y[i])) {
            flush();
            continue;
        }
        run.x.push_back(x[i]);
        run.y.push_back(y[i]);
        include(m_x, x[i]);
        include(m_y, y[i]);
    }
    flush();
}

void SvgChart::add_dots(std::size_t series, const std::vector<double>& x,
                        const std::vector<double>& y, double opacity) {
    check_series(series);
    assert(x.size() == y.size());
    const double a = std::clamp(opacity, 0.01, 1.0);
    for (std::size_t i = 0; i < x.size() && i < y.size(); ++i) {
        if (!finite(x[i]) || !finite(y[i])) continue;
        m_marks.push_back({Mark::Kind::dot, series, {x[i]}, {y[i]}, a, {}});
        include(m_x, x[i]);
        include(m_y, y[i]);
    }
}

namespace {

/// Anchors of the heat-map scale in CIELAB (L*, a*, b*) at t = 0, 1/4, 1/2, 3/4, 1: chosen
/// for safesite (L* falls linearly from 97 to 18; the hue turns from cream over yellow-green,
/// teal and blue to indigo, never crossing red–green at equal lightness).
constexpr double k_scale_lab[5][3] = {
    {97.0, -3.0, 16.0},   // pale cream
    {77.25, -24.0, 36.0}, // yellow-green
    {57.5, -32.0, -4.0},  // teal
    {37.75, -2.0, -38.0}, // blue
    {18.0, 24.0, -42.0},  // indigo
};

/// sRGB transfer of a linear channel, clamped to [0, 1] (IEC 61966-2-1).
double srgb_encode(double c) {
    c = std::clamp(c, 0.0, 1.0);
    return c <= 0.0031308 ? 12.92 * c : 1.055 * std::pow(c, 1.0 / 2.4) - 0.055;
}

double srgb_decode(double c) {
    return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
}

/// "#rrggbb" of a CIELAB colour (D65 white), clamped into the sRGB gamut.
std::string lab_to_hex(double L, double a, double b) {
    const double fy = (L + 16.0) / 116.0;
    const double fx = fy + a / 500.0;
    const double fz = fy - b / 200.0;
    auto finv = [](double t) {
        constexpr double d = 6.0 / 29.0;
        return t > d ? t * t * t : 3.0 * d * d * (t - 4.0 / 29.0);
    };
    const double X = 0.95047 * finv(fx), Y = finv(fy), Z = 1.08883 * finv(fz);
    const double r = 3.2406 * X - 1.5372 * Y - 0.4986 * Z;
    const double g = -0.9689 * X + 1.8758 * Y + 0.0415 * Z;
    const double bl = 0.0557 * X - 0.2040 * Y + 1.0570 * Z;
    auto byte = [](double c) { return static_cast<int>(std::lround(255.0 * srgb_encode(c))); };
    return fmt::format("#{:02x}{:02x}{:02x}", byte(r), byte(g), byte(bl));
}

/// Width and height attributes of the first tag of an SVG document (0 when absent).
std::pair<double, double> svg_size(const std::string& svg) {
    const std::string head = svg.substr(0, svg.find('>'));
    auto attribute = [&](const std::string& name) {
        const std::string key = " " + name + "=\"";
        const auto at = head.find(key);
        if (at == std::string::npos) return 0.0;
        return std::atof(head.c_str() + at + key.size());
    };
    return {attribute("width"), attribute("height")};
}

}  // namespace

std::string sequential_colour(double t) {
    if (!std::isfinite(t)) t = 0.0;
    t = std::clamp(t, 0.0, 1.0);
    const double pos = 4.0 * t;
    const auto k = std::min<std::size_t>(static_cast<std::size_t>(pos), 3);
    const double f = pos - static_cast<double>(k);
    double lab[3];
    for (int j = 0; j < 3; ++j)
        lab[j] = (1.0 - f) * k_scale_lab[k][j] + f * k_scale_lab[k + 1][j];
    return lab_to_hex(lab[0], lab[1], lab[2]);
}

double lightness_of(const std::string& hex) {
    assert(hex.size() == 7 && hex[0] == '#');
    auto channel = [&](std::size_t at) {
        return srgb_decode(std::stoi(hex.substr(at, 2), nullptr, 16) / 255.0);
    };
    const double Y = 0.2126 * channel(1) + 0.7152 * channel(3) + 0.0722 * channel(5);
    const double f = Y > 216.0 / 24389.0 ? std::cbrt(Y) : (24389.0 / 27.0 * Y + 16.0) / 116.0;
    return 116.0 * f - 16.0;
}

std::string compose_panels(const std::string& title, const std::string& caption,
                           const std::vector<std::string>& panels, std::size_t columns,
                           const std::string& note) {
    assert(columns >= 1);
    const double fs = SvgChart::Layout{}.font_size;
    const double title_h = 16.0 + 2.0 * 1.3 * fs;
    std::vector<std::pair<double, double>> sizes;
    for (const auto& p : panels) sizes.push_back(svg_size(p));
    const std::size_t rows = (panels.size() + columns - 1) / columns;
    std::vector<double> col_w(columns, 0.0), row_h(rows, 0.0);
    for (std::size_t i = 0; i < panels.size(); ++i) {
        col_w[i % columns] = std::max(col_w[i % columns], sizes[i].first);
        row_h[i / columns] = std::max(row_h[i / columns], sizes[i].second);
    }
    double width = 0.0, body = 0.0;
    for (double w : col_w) width += w;
    for (double h : row_h) body += h;
    width = std::max(width, 480.0);
    const double caption_fs = 0.95 * fs;
    const double caption_line = 1.35 * caption_fs;
    const auto chars =
        static_cast<std::size_t>(std::max((width - 32.0) / (0.5 * caption_fs), 20.0));
    const std::vector<std::string> lines = wrap_text(caption, chars);
    const double height =
        title_h + body + 8.0 + caption_line * static_cast<double>(lines.size()) + 8.0;

    std::string o;
    o += fmt::format(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{0}\" height=\"{1}\" "
        "viewBox=\"0 0 {0} {1}\" font-family=\"sans-serif\" font-size=\"{2}\" fill=\"{3}\">\n",
        px(width), px(height), px(fs), k_ink);
    o += "<title>" + xml_escape(title) + "</title>\n";
    o += "<desc>" + xml_escape(note.empty() ? caption : caption + " " + note) + "</desc>\n";
    o += fmt::format("<rect class=\"background\" x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" "
                     "fill=\"#ffffff\"/>\n",
                     px(width), px(height));
    o += fmt::format("<text class=\"title\" x=\"16\" y=\"{}\" font-size=\"{}\" "
                     "font-weight=\"bold\">{}</text>\n",
                     px(16.0 + 1.3 * fs), px(1.3 * fs), xml_escape(title));
    double y = title_h;
    for (std::size_t r = 0; r < rows; ++r) {
        double x = 0.0;
        for (std::size_t c = 0; c < columns; ++c) {
            const std::size_t i = r * columns + c;
            if (i >= panels.size()) break;
            // The panel as a nested <svg> placed at (x, y); its own xmlns is harmless.
            o += fmt::format("<g class=\"panel\">\n<svg x=\"{}\" y=\"{}\"", px(x), px(y));
            o += std::string_view(panels[i]).substr(4);
            if (o.back() != '\n') o += '\n';
            o += "</g>\n";
            x += col_w[c];
        }
        y += row_h[r];
    }
    // The caption as the last element, in the group SvgChart uses, so that the HTML report
    // shows it once (as text under the figure) and crops the drawing at y.
    if (!lines.empty()) {
        o += fmt::format("<g class=\"caption\" transform=\"translate(0 {})\">\n", px(y));
        for (std::size_t i = 0; i < lines.size(); ++i)
            o += fmt::format("<text x=\"16\" y=\"{}\" font-size=\"{}\" "
                             "fill=\"#444444\">{}</text>\n",
                             px(8.0 + caption_line * static_cast<double>(i + 1) -
                                0.35 * caption_fs),
                             px(caption_fs), xml_escape(lines[i]));
        o += "</g>\n";
    }
    o += "</svg>\n";
    return o;
}

std::string heat_map_svg(const std::string& title, const std::string& caption,
                         const std::string& x_label, const std::string& y_label,
                         const std::string& legend_label, const std::vector<HeatPanel>& panels,
                         std::size_t columns, const std::string& note) {
    assert(columns >= 1);
    const double fs = SvgChart::Layout{}.font_size;
    constexpr double side = 190.0;  // plot square, px
    // top leaves room for a panel title wrapped onto two lines and the maximum under it.
    constexpr double left = 58.0, top = 56.0, right = 16.0, bottom = 50.0;
    const double panel_w = left + side + right, panel_h = top + side + bottom;
    std::vector<std::string> svgs;
    for (const auto& p : panels) {
        double vmax = 0.0;
        for (double v : p.values)
            if (std::isfinite(v)) vmax = std::max(vmax, v);
        std::string o = fmt::format(
            "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{0}\" "
            "height=\"{1}\" viewBox=\"0 0 {0} {1}\">\n",
            px(panel_w), px(panel_h));
        // The block's name wrapped (never cut): two lines of 40 characters hold any pair of
        // class names; a longer name keeps its rest on the second line.
        std::vector<std::string> title_lines = wrap_text(p.title, 40);
        while (title_lines.size() > 2) {
            title_lines[1] += " " + title_lines.back();
            title_lines.pop_back();
        }
        for (std::size_t i = 0; i < title_lines.size(); ++i)
            o += fmt::format("<text class=\"panel-title\" x=\"{}\" y=\"{}\" font-size=\"{}\" "
                             "font-weight=\"bold\">{}</text>\n",
                             px(8.0), px(16.0 + 1.2 * 0.9 * fs * static_cast<double>(i)),
                             px(0.9 * fs), xml_escape(title_lines[i]));
        o += fmt::format("<text x=\"{}\" y=\"{}\" font-size=\"{}\" fill=\"#444444\">"
                         "maximum {}</text>\n",
                         px(8.0), px(46.0), px(0.85 * fs), xml_escape(fmt::format("{:.3g}", vmax)));
        const std::size_t nx = p.x.size(), ny = p.y.size();
        if (nx == 0 || ny == 0 || p.values.size() != nx * ny) {
            o += "</svg>\n";
            svgs.push_back(std::move(o));
            continue;
        }
        // Cell edges halfway between centres (the end cells as wide as their neighbour).
        auto edges = [](const std::vector<double>& c) {
            std::vector<double> e(c.size() + 1);
            if (c.size() == 1) {
                e[0] = c[0] - 0.5;
                e[1] = c[0] + 0.5;
                return e;
            }
            for (std::size_t i = 1; i < c.size(); ++i) e[i] = 0.5 * (c[i - 1] + c[i]);
            e[0] = c[0] - (e[1] - c[0]);
            e[c.size()] = c.back() + (c.back() - e[c.size() - 1]);
            return e;
        };
        const auto ex = edges(p.x), ey = edges(p.y);
        const double x0 = ex.front(), x1 = ex.back(), y0 = ey.front(), y1 = ey.back();
        auto sx = [&](double v) { return left + (v - x0) / (x1 - x0) * side; };
        auto sy = [&](double v) { return top + side - (v - y0) / (y1 - y0) * side; };
        // Colours in 20 steps (those of the legend); each step is one path whose subpaths
        // are runs of equal-step cells along a row ("M x,y h w v h h −w Z" per run).
        constexpr int steps = 20;
        std::vector<std::string> paths(steps);
        for (std::size_t r = 0; r < ny; ++r) {
            std::size_t c = 0;
            while (c < nx) {
                const double v = p.values[r * nx + c];
                if (!std::isfinite(v)) {
                    ++c;
                    continue;
                }
                auto step_of = [&](double x) {
                    const double t = vmax > 0.0 ? std::max(x, 0.0) / vmax : 0.0;
                    return std::min(steps - 1, static_cast<int>(t * steps));
                };
                const int k = step_of(v);
                std::size_t end = c + 1;
                while (end < nx && std::isfinite(p.values[r * nx + end]) &&
                       step_of(p.values[r * nx + end]) == k)
                    ++end;
                const double xa = sx(ex[c]), xb = sx(ex[end]);
                const double ya = sy(ey[r + 1]), yb = sy(ey[r]);
                paths[static_cast<std::size_t>(k)] += fmt::format(
                    "M{},{}h{}v{}h{}Z", px(xa), px(ya), px(xb - xa), px(yb - ya), px(xa - xb));
                c = end;
            }
        }
        for (int k = 0; k < steps; ++k) {
            if (paths[static_cast<std::size_t>(k)].empty()) continue;
            o += fmt::format("<path class=\"cells\" d=\"{}\" fill=\"{}\" stroke=\"{}\" "
                             "stroke-width=\"0.3\"/>\n",
                             paths[static_cast<std::size_t>(k)],
                             sequential_colour((k + 0.5) / steps),
                             sequential_colour((k + 0.5) / steps));
        }
        // Frame, ticks and tick labels.
        o += fmt::format("<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"none\" "
                         "stroke=\"{}\" stroke-width=\"1\"/>\n",
                         px(left), px(top), px(side), px(side), k_ink);
        const NiceTicks tx = nice_ticks(x0, x1, 4), ty = nice_ticks(y0, y1, 4);
        for (double t : tx.values) {
            if (t < x0 || t > x1) continue;
            o += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"{3}\"/>\n"
                             "<text x=\"{0}\" y=\"{4}\" text-anchor=\"middle\" font-size=\"{5}\">"
                             "{6}</text>\n",
                             px(sx(t)), px(top + side), px(top + side + 4.0), k_ink,
                             px(top + side + 6.0 + 0.85 * fs), px(0.85 * fs),
                             format_fixed(t, tx.decimals));
        }
        for (double t : ty.values) {
            if (t < y0 || t > y1) continue;
            o += fmt::format("<line x1=\"{1}\" y1=\"{0}\" x2=\"{2}\" y2=\"{0}\" stroke=\"{3}\"/>\n"
                             "<text x=\"{4}\" y=\"{5}\" text-anchor=\"end\" font-size=\"{6}\">"
                             "{7}</text>\n",
                             px(sy(t)), px(left - 4.0), px(left), k_ink, px(left - 6.0),
                             px(sy(t) + 0.3 * fs), px(0.85 * fs), format_fixed(t, ty.decimals));
        }
        o += fmt::format("<text class=\"axis-label\" x=\"{}\" y=\"{}\" text-anchor=\"middle\" "
                         "font-size=\"{}\">{}</text>\n",
                         px(left + side / 2.0), px(panel_h - 8.0), px(0.9 * fs),
                         xml_escape(x_label));
        o += fmt::format("<text class=\"axis-label\" x=\"{0}\" y=\"{1}\" text-anchor=\"middle\" "
                         "font-size=\"{2}\" transform=\"rotate(-90 {0} {1})\">{3}</text>\n",
                         px(14.0), px(top + side / 2.0), px(0.9 * fs), xml_escape(y_label));
        o += "</svg>\n";
        svgs.push_back(std::move(o));
    }
    // The legend as the first panel: the scale from 0 to 1 (share of each panel's maximum).
    {
        std::string o = fmt::format(
            "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"{0}\" "
            "height=\"{1}\" viewBox=\"0 0 {0} {1}\">\n<g class=\"legend\">\n",
            px(panel_w), px(panel_h));
        o += fmt::format("<text x=\"16\" y=\"{}\" font-weight=\"bold\">colour scale</text>\n",
                         px(top - 8.0));
        constexpr int steps = 20;
        const double bar_h = side / steps;
        for (int k = 0; k < steps; ++k) {
            const double t = (k + 0.5) / steps;
            o += fmt::format("<rect class=\"swatch\" x=\"16\" y=\"{}\" width=\"24\" height=\"{}\" "
                             "fill=\"{}\"/>\n",
                             px(top + side - (k + 1) * bar_h), px(bar_h + 0.5),
                             sequential_colour(t));
        }
        for (double t : {0.0, 0.5, 1.0})
            o += fmt::format("<text x=\"46\" y=\"{}\" font-size=\"{}\">{}</text>\n",
                             px(top + side - t * side + 0.3 * fs), px(0.85 * fs),
                             t == 0.0 ? std::string("0") : format_fixed(t, 1) + " \u00d7 max");
        const auto lines = wrap_text(legend_label, 22);
        for (std::size_t i = 0; i < lines.size(); ++i)
            o += fmt::format("<text x=\"110\" y=\"{}\" font-size=\"{}\">{}</text>\n",
                             px(top + 12.0 + 1.3 * fs * static_cast<double>(i)), px(0.85 * fs),
                             xml_escape(lines[i]));
        o += "</g>\n</svg>\n";
        svgs.insert(svgs.begin(), std::move(o));  // first, where a reader looks for it
    }
    return compose_panels(title, caption, svgs, columns, note);
}

}  // namespace safesite::report
