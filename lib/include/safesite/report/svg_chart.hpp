#pragma once
/// \file svg_chart.hpp
/// A small builder of standalone SVG 1.1 charts (design.md section 6, "figures"): two axes,
/// each linear (ticks by the nice-numbers rule, Heckbert1990) or categorical (one band per
/// label); points, lines, interval whiskers, horizontal bars, shaded bands, reference lines,
/// a legend, a title and a caption under the plot. The output is plain text: no scripts, no
/// external fonts, images or style sheets, so a file opens offline in any browser.
///
/// Marks are given in data coordinates and kept until to_svg() lays the chart out; a
/// categorical coordinate is the label index i (0, 1, …), the band centre, and fractional
/// values move within the band (grouped bars). A mark with a non-finite coordinate is
/// skipped; a line is broken at non-finite points. Long titles, category and legend labels are
/// wrapped onto several lines (wrap_text), never cut. Labels of reference lines are placed
/// where they overlap no mark and stay inside the canvas (inside the plot when there is room,
/// else above it or in a column to its right). The caption lines are the last element of the
/// document, a group `<g class="caption" transform="translate(0 Y)">` whose Y is the height of
/// everything above them (the HTML report uses this to show the caption once, as HTML text).
/// Numbers are written with fixed short precision, so the same marks give byte-identical text
/// on every run and machine.

#include <cstddef>
#include <string>
#include <vector>

namespace safesite::report {

/// Ticks of a linear axis from the nice-numbers rule ("loose labelling", Heckbert1990):
/// with \f$\mathrm{nice}(x)\f$ the number of the form \f$\{1, 2, 5, 10\} \cdot 10^k\f$
/// nearest to x,
/// \f$ r = \mathrm{nice}_{\ge}(hi - lo),\; d = \mathrm{nice}_{\approx}(r / (n - 1)),\;
///     t_0 = \lfloor lo / d \rfloor d,\; t_{end} = \lceil hi / d \rceil d \f$,
/// ticks \f$ t_0, t_0 + d, …, t_{end} \f$ (they enclose [lo, hi]).
struct NiceTicks {
    double step = 1.0;           ///< d, spacing between ticks (> 0)
    std::vector<double> values;  ///< tick values, increasing; first <= lo, last >= hi
    int decimals = 0;            ///< digits after the point needed to label them, max(−⌊log10 d⌋, 0)
};

/// Nice ticks enclosing [lo, hi] with about `target` ticks (2 <= target <= 20).
/// A degenerate range (lo == hi) is widened to lo ± max(0.1 |lo|, 1) — common practice.
/// Non-finite bounds give the ticks of [0, 1]. \pre lo <= hi.
NiceTicks nice_ticks(double lo, double hi, int target = 5);

/// The nice number of Heckbert1990: x > 0 rewritten as f · 10^k with 1 <= f < 10, f replaced
/// by 1, 2, 5 or 10 — the nearest (round = true: f < 1.5 → 1, < 3 → 2, < 7 → 5, else 10) or
/// the smallest not below f (round = false). Returns 0 for x <= 0 or non-finite x.
double nice_number(double x, bool round);

/// A number as short fixed-point text with `decimals` digits ("-0" never appears).
std::string format_fixed(double value, int decimals);

/// `text` escaped for SVG/XML character data and attribute values: & < > " ' become entities;
/// control characters (below U+0020) become spaces.
std::string xml_escape(const std::string& text);

/// How a series shows in the legend.
enum class Swatch { point, line, point_line, bar };

/// Stroke pattern of a series' lines.
enum class Dash { solid, dashed, dotted, dash_dot, long_dash, dash_dot_dot };

/// The colours of series 0, 1, … ("#rrggbb"; series i takes colour i mod 8). A palette of our
/// own, found by a search for the 8 sRGB colours (channels in steps of 17) whose smallest
/// pairwise CIEDE2000 difference is largest for normal vision and under the protanopia and
/// deuteranopia simulations of Machado, Oliveira & Fernandes (2009) at severity 1 (smallest
/// difference about 16; tritanopia about 13), with CIE L* between 22 and 62 so that each has a
/// contrast of at least 3:1 on white (WCAG 2.1 non-text contrast), chroma at least 25 (apart
/// from the grey of the reference lines), and ordered so that the first colours are the most
/// distinct. tests/unit/report/palette_test.cpp checks these properties.
const std::vector<std::string>& series_palette();

/// Number of marker shapes (circle, square, triangle up, diamond, triangle down, plus, star,
/// cross).
inline constexpr std::size_t k_marker_shapes = 8;

/// The marker shape of series i: (i + ⌊i / 8⌋) mod 8, so that series 8 to 15, which repeat
/// the colours of 0 to 7, take other shapes.
std::size_t series_marker(std::size_t series);

/// The dash pattern of the i-th line of a figure with several lines (solid, dashed, dotted,
/// dash-dot, long dash, dash-dot-dot, then again), so that lines differ without colour.
Dash series_dash(std::size_t i);

/// Greedy word wrap of `text` into lines of at most `width` code points (width >= 1): breaks
/// at spaces, else after '-', '/' or '_' inside a word, else inside a word that is longer than
/// a line. No character is dropped except the spaces where lines break; empty text gives no
/// line.
std::vector<std::string> wrap_text(const std::string& text, std::size_t width);

/// Estimated width in px of text in a sans-serif font of `font_size` px without font metrics:
/// 0.56 em per code point (common practice; a little generous for digits).
double estimated_text_width(const std::string& text, double font_size);

/// A chart under construction; to_svg() renders it. Not thread-safe; cheap to copy.
class SvgChart {
public:
    /// Fixed geometry in SVG user units (px). The plot area is the canvas less the margins;
    /// the left margin grows for long labels of a categorical y axis, and the right margin
    /// by the legend width when a series has a legend label.
    struct Layout {
        double width = 720.0;         ///< canvas width
        double height = 440.0;        ///< canvas height, without the caption lines
        double margin_left = 80.0;    ///< room for y tick labels and the y axis label
        double margin_right = 28.0;
        double margin_top = 56.0;     ///< room for the title
        double margin_bottom = 64.0;  ///< room for x tick labels and the x axis label
        double font_size = 13.0;      ///< tick and legend labels; title 1.3×, caption 0.95×
        int target_ticks = 6;         ///< about this many ticks per linear axis
    };

    SvgChart(std::string title, std::string caption);
    SvgChart(std::string title, std::string caption, Layout layout);

    /// Text kept in the document's `<desc>` after the caption, not drawn (e.g. the caution).
    void set_note(std::string note) { m_note = std::move(note); }
    void set_x_label(std::string label) { m_x.label = std::move(label); }
    void set_y_label(std::string label) { m_y.label = std::move(label); }
    /// Make the axis categorical with these labels (index i at the centre of band i).
    void set_x_categories(std::vector<std::string> labels);
    /// Categorical y axis: label 0 at the top.
    void set_y_categories(std::vector<std::string> labels);
    /// Make a linear axis range include this value (e.g. 0 for bars, 1 for a probability).
    void include_x(double value);
    void include_y(double value);

    /// A new series; its colour and marker come from its index (series_palette(),
    /// series_marker()), its lines are drawn with `dash`. An empty `legend` keeps it out of
    /// the legend. Returns the series index.
    std::size_t add_series(std::string legend, Swatch swatch, Dash dash = Dash::solid);

    /// One point mark per finite (x[i], y[i]). \pre x.size() == y.size().
    void add_points(std::size_t series, const std::vector<double>& x, const std::vector<double>& y);
    /// A polyline through the finite points, broken where a point is not finite.
    void add_line(std::size_t series, const std::vector<double>& x, const std::vector<double>& y);
    /// An interval from (x0, y0) to (x1, y1) with end caps across it.
    void add_whisker(std::size_t series, double x0, double y0, double x1, double y1);
    /// A horizontal bar on a categorical y axis: from x = `from` to x = `to`, centred at
    /// y = `category` (index, fractional allowed), `thickness` in band units (0 < t <= 1; at
    /// most 40 px). A non-empty `label` (e.g. the value) is written just past the end `to`,
    /// or inside the bar at that end when it would leave the plot there.
    void add_hbar(std::size_t series, double category, double from, double to, double thickness,
                  std::string label = {});
    /// A translucent band across the whole plot between y = lo and y = hi.
    void add_band_y(std::size_t series, double lo, double hi);
    /// A thin grey reference line across the plot at x = value (resp. y), labelled.
    void add_reference_x(double value, std::string label);
    void add_reference_y(double value, std::string label);

    /// Marks drawn so far of the given kind ("point", "bar", "whisker", "line", "band",
    /// "reference"), after non-finite ones were skipped.
    std::size_t mark_count(const std::string& kind) const;

    /// The chart as a standalone SVG 1.1 document (starts with `<svg`, ends with `</svg>\n`).
    std::string to_svg() const;

    // --- Marks for model-checking figures (appended) --------------------------------------
    /// A filled polygon through the finite points (closed), in the series colour at `opacity`
    /// (0 < opacity <= 1): e.g. a band between two curves, or a histogram bar.
    void add_area(std::size_t series, const std::vector<double>& x, const std::vector<double>& y,
                  double opacity = 0.2);
    /// A thin translucent polyline (width 1 px, `opacity`), broken at non-finite points: e.g.
    /// the year-specific curves drawn faintly under the pooled one.
    void add_trace(std::size_t series, const std::vector<double>& x,
                   const std::vector<double>& y, double opacity = 0.35);
    /// Small translucent dots (3.6 px across, `opacity`) for many points, e.g. a scatter of
    /// thousands of plants; drawn as one `<path class="dots">` per series with a zero-length
    /// round-capped stroke ("M x,y h0") per point. \pre x.size() == y.size().
    void add_dots(std::size_t series, const std::vector<double>& x,
                  const std::vector<double>& y, double opacity = 0.35);

private:
    struct Axis {
        std::string label;
        std::vector<std::string> categories;
        bool categorical = false;
        bool has_range = false;
        double lo = 0.0;
        double hi = 0.0;
    };
    struct Series {
        std::string legend;
        Swatch swatch = Swatch::point;
        Dash dash = Dash::solid;
    };
    struct Mark {
        enum class Kind { point, line, whisker, bar, band, ref_x, ref_y, area, trace, dot } kind =
            Kind::point;
        std::size_t series = 0;
        std::vector<double> x;  ///< data coordinates (bar: from, to; band: unused)
        std::vector<double> y;  ///< (bar: category; band: lo, hi)
        double size = 0.0;      ///< bar thickness; opacity of area, trace and dot marks
        std::string label;      ///< reference lines, bar values
    };

    static void include(Axis& axis, double value);
    void check_series(std::size_t series) const;

    std::string m_title;
    std::string m_caption;
    std::string m_note;
    Layout m_layout;
    Axis m_x;
    Axis m_y;
    std::vector<Series> m_series;
    std::vector<Mark> m_marks;
};


// --- Model-checking figures (appended) ----------------------------------------------------

/// The sequential colour scale of safesite's heat maps at t ∈ [0, 1] (clamped) as "#rrggbb":
/// a path of our own through CIELAB from pale cream (t = 0, L* ≈ 97) over yellow-green, teal
/// and blue to deep indigo (t = 1, L* ≈ 18), with L* falling linearly in t. Perceptually
/// ordered (lightness alone orders it, so it reads in greyscale and under the common
/// colour-vision deficiencies, which keep lightness); hues avoid a red–green contrast.
std::string sequential_colour(double t);

/// CIE L* (D65) of an sRGB colour "#rrggbb" (for checks of the scale).
double lightness_of(const std::string& hex);

/// Several standalone SVG documents (e.g. SvgChart::to_svg() of small charts) placed as
/// panels on a grid of `columns` columns, left to right then top to bottom, under a title and
/// over a wrapped caption, as one standalone SVG 1.1 document (each panel is a nested
/// `<svg>` element with its own size). `note` goes into `<desc>` (e.g. the caution).
/// \pre columns >= 1; each panel starts with "<svg" and has width and height attributes.
std::string compose_panels(const std::string& title, const std::string& caption,
                           const std::vector<std::string>& panels, std::size_t columns,
                           const std::string& note = {});

/// One panel of a heat map: cell values on a grid of cell centres x (columns) by y (rows),
/// both ascending; `values` row-major, values[r * x.size() + c] at (x[c], y[r]); non-finite
/// values are left blank. Each panel is coloured by its own scale from 0 to its largest
/// value, which its title states.
struct HeatPanel {
    std::string title;
    std::vector<double> x;
    std::vector<double> y;
    std::vector<double> values;
};

/// Heat maps, one square panel per HeatPanel on a grid of `columns`, with the axis labels,
/// a legend panel first showing the colour scale (sequential_colour in 20 steps; 0 to the panel's maximum)
/// labelled `legend_label`, a title and a caption. Cells of one colour step form one
/// `<path class="cells">`, a closed subpath ("…Z") per run of equal-step cells along a row.
/// Standalone SVG 1.1.
std::string heat_map_svg(const std::string& title, const std::string& caption,
                         const std::string& x_label, const std::string& y_label,
                         const std::string& legend_label, const std::vector<HeatPanel>& panels,
                         std::size_t columns, const std::string& note = {});

}  // namespace safesite::report
