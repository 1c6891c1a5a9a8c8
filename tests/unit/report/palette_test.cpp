// The series palette, wrapping of labels and placement of reference labels (svg_chart.hpp).
//
// Colour science used by the checks, written here from the published formulas:
// - sRGB decoding and the sRGB → XYZ (D65) matrix: IEC 61966-2-1:1999 (values from memory,
//   the widely reprinted 0.4124564 … matrix); CIELAB: CIE 15:2004 (from memory).
// - CIEDE2000 colour difference: Sharma, Wu & Dalal (2005), Color Res. Appl. 30:21–30;
//   checked below against pairs 1, 7, 17 and 25 of their Table 1 (values from memory).
// - Colour-vision-deficiency simulation: Machado, Oliveira & Fernandes (2009), IEEE TVCG
//   15:1291–1298, the matrices for severity 1.0 of protanopia, deuteranopia and tritanopia,
//   applied to linear RGB. The matrix values are from memory; each row sums to 1 (white stays
//   white), which is checked as a guard against a mistyped entry.
// - Contrast ratio: WCAG 2.1 (relative luminance, (L1 + 0.05) / (L2 + 0.05)).
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <cmath>
#include <regex>
#include <set>
#include <string>
#include <vector>

#include "safesite/report/svg_chart.hpp"

using namespace safesite::report;

namespace {

using Vec3 = std::array<double, 3>;
using Mat3 = std::array<Vec3, 3>;

constexpr double k_pi = 3.14159265358979323846;

const Mat3 k_protanopia = {{{0.152286, 1.052583, -0.204868},
                            {0.114503, 0.786281, 0.099216},
                            {-0.003882, -0.048116, 1.051998}}};
const Mat3 k_deuteranopia = {{{0.367322, 0.860646, -0.227968},
                              {0.280085, 0.672501, 0.047413},
                              {-0.011820, 0.042940, 0.968881}}};
const Mat3 k_tritanopia = {{{1.255528, -0.076749, -0.178779},
                            {-0.078411, 0.930809, 0.147602},
                            {0.004733, 0.691367, 0.303900}}};

double decode(double c) { return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4); }

Vec3 linear_rgb(const std::string& hex) {
    REQUIRE(std::regex_match(hex, std::regex("#[0-9a-f]{6}")));
    Vec3 v{};
    for (int i = 0; i < 3; ++i)
        v[static_cast<std::size_t>(i)] = decode(
            std::stoi(hex.substr(1 + 2 * static_cast<std::size_t>(i), 2), nullptr, 16) / 255.0);
    return v;
}

Vec3 simulate(const Mat3& m, const Vec3& rgb) {
    Vec3 out{};
    for (std::size_t i = 0; i < 3; ++i) {
        double s = 0.0;
        for (std::size_t j = 0; j < 3; ++j) s += m[i][j] * rgb[j];
        out[i] = std::clamp(s, 0.0, 1.0);
    }
    return out;
}

double luminance(const Vec3& rgb) {
    return 0.2126729 * rgb[0] + 0.7151522 * rgb[1] + 0.0721750 * rgb[2];
}

Vec3 lab(const Vec3& rgb) {
    const double x = 0.4124564 * rgb[0] + 0.3575761 * rgb[1] + 0.1804375 * rgb[2];
    const double y = luminance(rgb);
    const double z = 0.0193339 * rgb[0] + 0.1191920 * rgb[1] + 0.9503041 * rgb[2];
    auto f = [](double t) {
        constexpr double d = 6.0 / 29.0;
        return t > d * d * d ? std::cbrt(t) : t / (3.0 * d * d) + 4.0 / 29.0;
    };
    const double fx = f(x / 0.95047), fy = f(y), fz = f(z / 1.08883);
    return {116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)};
}

double deg(double r) { return r * 180.0 / k_pi; }
double rad(double d) { return d * k_pi / 180.0; }

/// CIEDE2000 (Sharma, Wu & Dalal 2005, equations 1–22), kL = kC = kH = 1.
double ciede2000(const Vec3& a, const Vec3& b) {
    const double c1 = std::hypot(a[1], a[2]), c2 = std::hypot(b[1], b[2]);
    const double cb = (c1 + c2) / 2.0;
    const double g =
        0.5 * (1.0 - std::sqrt(std::pow(cb, 7) / (std::pow(cb, 7) + std::pow(25.0, 7))));
    const double a1 = (1.0 + g) * a[1], a2 = (1.0 + g) * b[1];
    const double c1p = std::hypot(a1, a[2]), c2p = std::hypot(a2, b[2]);
    auto hue = [](double bb, double aa) {
        if (bb == 0.0 && aa == 0.0) return 0.0;
        double h = deg(std::atan2(bb, aa));
        return h < 0.0 ? h + 360.0 : h;
    };
    const double h1 = hue(a[2], a1), h2 = hue(b[2], a2);
    const double dl = b[0] - a[0], dc = c2p - c1p;
    double dh = 0.0;
    if (c1p * c2p != 0.0) {
        dh = h2 - h1;
        if (dh > 180.0)
            dh -= 360.0;
        else if (dh < -180.0)
            dh += 360.0;
    }
    const double dH = 2.0 * std::sqrt(c1p * c2p) * std::sin(rad(dh / 2.0));
    const double lb = (a[0] + b[0]) / 2.0, cbp = (c1p + c2p) / 2.0;
    double hb = h1 + h2;
    if (c1p * c2p != 0.0) {
        if (std::fabs(h1 - h2) <= 180.0)
            hb = (h1 + h2) / 2.0;
        else if (h1 + h2 < 360.0)
            hb = (h1 + h2 + 360.0) / 2.0;
        else
            hb = (h1 + h2 - 360.0) / 2.0;
    }
    const double t = 1.0 - 0.17 * std::cos(rad(hb - 30.0)) + 0.24 * std::cos(rad(2.0 * hb)) +
                     0.32 * std::cos(rad(3.0 * hb + 6.0)) - 0.20 * std::cos(rad(4.0 * hb - 63.0));
    const double dtheta = 30.0 * std::exp(-std::pow((hb - 275.0) / 25.0, 2));
    const double rc = 2.0 * std::sqrt(std::pow(cbp, 7) / (std::pow(cbp, 7) + std::pow(25.0, 7)));
    const double sl =
        1.0 + 0.015 * std::pow(lb - 50.0, 2) / std::sqrt(20.0 + std::pow(lb - 50.0, 2));
    const double sc = 1.0 + 0.045 * cbp, sh = 1.0 + 0.015 * cbp * t;
    const double rt = -std::sin(rad(2.0 * dtheta)) * rc;
    return std::sqrt(std::pow(dl / sl, 2) + std::pow(dc / sc, 2) + std::pow(dH / sh, 2) +
                     rt * (dc / sc) * (dH / sh));
}

double min_pairwise(const std::vector<std::string>& colours, const Mat3* cvd) {
    double m = 1e9;
    for (std::size_t i = 0; i < colours.size(); ++i)
        for (std::size_t j = 0; j < i; ++j) {
            Vec3 a = linear_rgb(colours[i]), b = linear_rgb(colours[j]);
            if (cvd) {
                a = simulate(*cvd, a);
                b = simulate(*cvd, b);
            }
            m = std::min(m, ciede2000(lab(a), lab(b)));
        }
    return m;
}

}  // namespace

TEST_CASE("CIEDE2000 as coded here matches Sharma, Wu & Dalal's test pairs", "[report][unit]") {
    // Sharma, Wu & Dalal (2005) Table 1, pairs 1, 7, 17, 25 (from memory); 4 decimals given.
    CHECK(ciede2000({50.0, 2.6772, -79.7751}, {50.0, 0.0, -82.7485}) ==
          Approx(2.0425).margin(1e-4));
    CHECK(ciede2000({50.0, 0.0, 0.0}, {50.0, -1.0, 2.0}) == Approx(2.3669).margin(1e-4));
    CHECK(ciede2000({50.0, 2.5, 0.0}, {73.0, 25.0, -18.0}) == Approx(27.1492).margin(1e-4));
    CHECK(ciede2000({60.2574, -34.0099, 36.2677}, {60.4626, -34.1751, 39.4387}) ==
          Approx(1.2644).margin(1e-4));
    // sRGB white is L* 100, a* = b* = 0 (CIE 15:2004): the matrix rows sum to the white point.
    const Vec3 w = lab(linear_rgb("#ffffff"));
    CHECK(w[0] == Approx(100.0).margin(1e-3));
    CHECK(w[1] == Approx(0.0).margin(1e-2));
    CHECK(w[2] == Approx(0.0).margin(1e-2));
    // Machado et al. matrices keep white: each row sums to 1 (to their 6 decimals).
    for (const Mat3* m : {&k_protanopia, &k_deuteranopia, &k_tritanopia})
        for (const auto& row : *m) CHECK(row[0] + row[1] + row[2] == Approx(1.0).margin(2e-6));
}

TEST_CASE(
    "the series palette has 8 colours that stay apart for common colour-vision "
    "deficiencies",
    "[report][unit]") {
    const auto& p = series_palette();
    REQUIRE(p.size() >= 8);
    CHECK(std::set<std::string>(p.begin(), p.end()).size() == p.size());
    // Smallest pairwise CIEDE2000 difference. About 10 is a clear difference between small
    // marks side by side (common practice; 2.3 is a just-noticeable difference, Sharma 2003);
    // the palette was searched to about 16 for normal, protan and deutan vision, 13 tritan.
    CHECK(min_pairwise(p, nullptr) >= 15.0);
    CHECK(min_pairwise(p, &k_protanopia) >= 15.0);
    CHECK(min_pairwise(p, &k_deuteranopia) >= 15.0);
    CHECK(min_pairwise(p, &k_tritanopia) >= 12.0);
    // Every colour stands out from the white background (WCAG 2.1 non-text contrast 3:1) and
    // from the grey #555555 of the reference lines.
    const Vec3 grey = lab(linear_rgb("#555555"));
    for (const auto& c : p) {
        INFO(c);
        const double contrast = 1.05 / (luminance(linear_rgb(c)) + 0.05);
        CHECK(contrast >= 3.0);
        CHECK(ciede2000(lab(linear_rgb(c)), grey) >= 10.0);
    }
    // The first four, the most used, are further apart still.
    const std::vector<std::string> first4(p.begin(), p.begin() + 4);
    CHECK(min_pairwise(first4, &k_deuteranopia) >= 20.0);
    CHECK(min_pairwise(first4, &k_protanopia) >= 20.0);
}

TEST_CASE("series beyond the palette differ by marker; dashes cycle", "[report][unit]") {
    const std::size_t n = series_palette().size();
    std::set<std::pair<std::size_t, std::size_t>> seen;  // (colour, marker) of 16 series
    for (std::size_t i = 0; i < 2 * n; ++i) seen.insert({i % n, series_marker(i)});
    CHECK(seen.size() == 2 * n);
    std::set<std::size_t> markers;
    for (std::size_t i = 0; i < k_marker_shapes; ++i) markers.insert(series_marker(i));
    CHECK(markers.size() == k_marker_shapes);
    std::set<Dash> dashes;
    for (std::size_t i = 0; i < 6; ++i) dashes.insert(series_dash(i));
    CHECK(dashes.size() == 6);
    CHECK(series_dash(6) == series_dash(0));
    // Eight series of points draw eight different shapes (the SVG element and its points).
    SvgChart chart("t", "c");
    std::set<std::string> shapes;
    for (std::size_t i = 0; i < 8; ++i) {
        const auto s = chart.add_series(std::to_string(i), Swatch::point);
        chart.add_points(s, {static_cast<double>(i)}, {0.0});
    }
    const std::string svg = chart.to_svg();
    const std::regex mark("<(circle|rect|polygon) class=\"point\"[^>]*>");
    for (auto it = std::sregex_iterator(svg.begin(), svg.end(), mark); it != std::sregex_iterator();
         ++it) {
        const std::string kind = (*it)[1];
        // Polygons: the number of vertices (commas of the points list) tells the shape apart.
        const std::string element = (*it)[0];
        const auto vertices =
            static_cast<std::size_t>(std::count(element.begin(), element.end(), ','));
        shapes.insert(kind + std::to_string(vertices));
    }
    // circle, rect, triangles (2 with 3 vertices), diamond (4), plus and cross (12), star (10).
    CHECK(shapes == std::set<std::string>{"circle0", "rect0", "polygon3", "polygon4", "polygon10",
                                          "polygon12"});
}

TEST_CASE("labels are wrapped, never cut", "[report][unit]") {
    // Breaks at spaces; nothing but the breaking spaces is lost.
    CHECK(wrap_text("every seed on bare gravel", 12) ==
          std::vector<std::string>{"every seed", "on bare", "gravel"});
    CHECK(wrap_text("short", 12) == std::vector<std::string>{"short"});
    CHECK(wrap_text("", 12).empty());
    // Inside a word after '-', '/' or '_', else by force.
    CHECK(wrap_text("survival-growth", 10) == std::vector<std::string>{"survival-", "growth"});
    CHECK(wrap_text("abcdefghij", 4) == std::vector<std::string>{"abcd", "efgh", "ij"});
    // Code points, not bytes: λ and → are one character each.
    CHECK(wrap_text("\u03bb\u03bb\u03bb \u2192\u2192", 3) ==
          std::vector<std::string>{"\u03bb\u03bb\u03bb", "\u2192\u2192"});
    // A long category label is drawn whole: every word is in the SVG.
    const std::string name =
        "calmer autumn: gravel departures halved and snowmelt late by "
        "three weeks";
    SvgChart chart("t", "c");
    chart.set_y_categories({name, "b"});
    const auto s = chart.add_series("", Swatch::bar);
    chart.add_hbar(s, 0.0, 0.0, 1.0, 0.5);
    const std::string svg = chart.to_svg();
    CHECK(svg.find("\u2026") == std::string::npos);
    for (const char* word :
         {"calmer", "autumn:", "gravel", "departures", "halved", "snowmelt", "three", "weeks"})
        CHECK(svg.find(word) != std::string::npos);
    CHECK(svg.find("<tspan") != std::string::npos);
}

namespace {

/// Attribute `name` of the first element matching `open` (e.g. "<text class=\"reference-label\"").
double attribute(const std::string& svg, std::size_t at, const std::string& name) {
    const std::size_t end = svg.find('>', at);
    const std::size_t p = svg.find(" " + name + "=\"", at);
    REQUIRE(p < end);
    return std::stod(svg.substr(p + name.size() + 3));
}

struct LabelBox {
    double x0, y0, x1, y1;
};

/// The box of every reference label as the chart estimates it (start anchor, baseline y).
std::vector<LabelBox> reference_labels(const std::string& svg, double fs = 13.0) {
    std::vector<LabelBox> out;
    const std::string key = "<text class=\"reference-label\"";
    for (std::size_t i = svg.find(key); i != std::string::npos; i = svg.find(key, i + 1)) {
        const double x = attribute(svg, i, "x"), y = attribute(svg, i, "y");
        const std::size_t t0 = svg.find('>', i) + 1;
        const std::string text = svg.substr(t0, svg.find("</text>", t0) - t0);
        out.push_back({x, y - 0.8 * fs, x + estimated_text_width(text, fs), y + 0.25 * fs});
    }
    return out;
}

}  // namespace

TEST_CASE("reference labels stay off the data and inside the canvas", "[report][unit]") {
    SECTION("λ = 1 with a data point where the label would go by default") {
        // The default place is the right end just above the line; put a point there.
        SvgChart chart("t", "c");
        const auto s = chart.add_series("", Swatch::point);
        chart.add_reference_y(1.0, "\u03bb = 1");
        // y from 0.9 to 1.2 (ticks 0.9..1.2); the last point sits just above λ = 1 at the right.
        chart.add_points(s, {0, 1, 2, 3, 4, 5, 6, 7, 8, 9},
                         {1.15, 1.15, 0.99, 0.97, 0.93, 1.04, 0.95, 1.1, 1.1, 1.01});
        const std::string svg = chart.to_svg();
        const auto labels = reference_labels(svg);
        REQUIRE(labels.size() == 1);
        const LabelBox b = labels[0];
        const double width = attribute(svg, 0, "width");
        CHECK(b.x0 >= 0.0);
        CHECK(b.x1 <= width);
        // No point marker (about 10 px across) within the label's box.
        const std::regex circle("<circle class=\"point\"[^>]* cx=\"([0-9.]+)\" cy=\"([0-9.]+)\"");
        std::size_t points = 0;
        for (auto it = std::sregex_iterator(svg.begin(), svg.end(), circle);
             it != std::sregex_iterator(); ++it) {
            ++points;
            const double cx = std::stod((*it)[1]), cy = std::stod((*it)[2]);
            INFO(cx << "," << cy);
            CHECK((cx + 5.0 <= b.x0 || cx - 5.0 >= b.x1 || cy + 5.0 <= b.y0 || cy - 5.0 >= b.y1));
        }
        CHECK(points == 10);
    }
    SECTION("Δλ = 0 with every bar negative stays on the canvas and off the bars") {
        SvgChart chart("t", "c");
        chart.set_y_categories({"a", "b", "c"});
        const auto s = chart.add_series("", Swatch::bar);
        chart.add_reference_x(0.0, "\u0394\u03bb = 0");
        chart.add_hbar(s, 0.0, 0.0, -0.08, 0.55);
        chart.add_hbar(s, 1.0, 0.0, -0.02, 0.55);
        chart.add_hbar(s, 2.0, 0.0, -0.005, 0.55);
        const std::string svg = chart.to_svg();
        const auto labels = reference_labels(svg);
        REQUIRE(labels.size() == 1);
        const LabelBox b = labels[0];
        CHECK(b.x0 >= 0.0);
        CHECK(b.x1 <= attribute(svg, 0, "width"));
        CHECK(b.y0 >= 0.0);
        for (std::size_t i = svg.find("<rect class=\"bar\""); i != std::string::npos;
             i = svg.find("<rect class=\"bar\"", i + 1)) {
            const double x = attribute(svg, i, "x"), y = attribute(svg, i, "y");
            const double w = attribute(svg, i, "width"), h = attribute(svg, i, "height");
            CHECK((x + w <= b.x0 || x >= b.x1 || y + h <= b.y0 || y >= b.y1));
        }
    }
}
