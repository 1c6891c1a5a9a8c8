// The model-checking figures (report/model_check_figures.hpp) from small hand-made tables:
// each is a well-formed standalone SVG with the expected number of marks; and the heat-map
// colour scale and panel composition of svg_chart.hpp.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "safesite/report/caution.hpp"
#include "safesite/report/figures.hpp"
#include "safesite/report/model_check_figures.hpp"
#include "safesite/report/svg_chart.hpp"
#include "safesite/report/tidy_table.hpp"

using namespace safesite::report;

namespace {

/// Tag balance of XML-like text (every `<name …>` closed by `</name>` in nesting order);
/// empty when balanced.
std::string tag_balance_error(const std::string& s) {
    std::vector<std::string> open;
    std::size_t i = 0;
    while ((i = s.find('<', i)) != std::string::npos) {
        const std::size_t j = s.find('>', i);
        if (j == std::string::npos) return "a '<' is never closed by '>'";
        const std::string tag = s.substr(i + 1, j - i - 1);
        if (tag.empty()) return "empty tag";
        if (tag[0] == '/') {
            const std::string name = tag.substr(1);
            if (open.empty() || open.back() != name) return "bad </" + name + ">";
            open.pop_back();
        } else if (tag[0] != '?' && tag[0] != '!' && tag.back() != '/') {
            open.push_back(tag.substr(0, tag.find_first_of(" \t\n")));
        }
        i = j + 1;
    }
    return open.empty() ? std::string() : "<" + open.back() + "> never closed";
}

std::size_t count(const std::string& text, const std::string& what) {
    std::size_t n = 0;
    for (std::size_t i = text.find(what); i != std::string::npos; i = text.find(what, i + 1)) ++n;
    return n;
}

/// Points of the dot paths: one "M x,y h0" subpath each.
std::size_t dots(const std::string& svg) { return count(svg, "h0M") + count(svg, "h0\""); }

/// Subpaths ("…Z") of the heat-map cell paths.
std::size_t cell_runs(const std::string& svg) {
    std::size_t n = 0;
    const std::string key = "class=\"cells\" d=\"";
    for (std::size_t i = svg.find(key); i != std::string::npos; i = svg.find(key, i + 1)) {
        const std::size_t start = i + key.size();
        const std::string d = svg.substr(start, svg.find('"', start) - start);
        n += static_cast<std::size_t>(std::count(d.begin(), d.end(), 'Z'));
    }
    return n;
}

/// A standalone document with balanced tags, escaped '&', no non-finite numbers, the caution
/// in its description and the model-checking section.
void check_figure(const Figure& f, const std::string& name) {
    CHECK(f.name == name);
    CHECK(f.section == "Model checking");
    REQUIRE(f.svg.rfind("<svg", 0) == 0);
    CHECK(f.svg.substr(f.svg.size() - 7) == "</svg>\n");
    INFO(f.svg.substr(0, 2000));
    CHECK(tag_balance_error(f.svg).empty());
    CHECK(f.svg.find("nan") == std::string::npos);
    CHECK(f.svg.find("inf\"") == std::string::npos);
    CHECK(f.svg.find(xml_escape(k_caution)) != std::string::npos);
    for (const char* bad : {"<script", "href", "url(", "foreignObject", "<!"})
        CHECK(f.svg.find(bad) == std::string::npos);
}

TidyTable binned() {
    TidyTable t{"check_binned",
                {"rate", "microsite", "stage", "bin", "size_lower", "size_upper", "size_mean",
                 "plants", "events", "proportion", "lower", "upper"},
                {}};
    for (const char* site : {"gravel", "cushion"})
        for (int b = 1; b <= 3; ++b)
            t.rows.push_back({text("survival"), text(site), text("all"), integer(b),
                              number(b - 1.0), number(b), number(b - 0.5), integer(40),
                              integer(10 * b), number(0.25 * b), number(0.25 * b - 0.1),
                              number(0.25 * b + 0.1)});
    t.rows.push_back({text("flowering"), text("gravel"), text("all"), integer(1), number(0.0),
                      number(3.0), number(1.5), integer(40), integer(4), number(0.1),
                      number(0.04), number(0.23)});
    return t;
}

TidyTable curves() {
    TidyTable t{"check_curves", {"rate", "microsite", "stage", "kernel", "size", "value", "sd"},
                {}};
    for (const char* kernel : {"pooled", "2015", "2016"})
        for (const char* site : {"gravel", "cushion"})
            for (int i = 0; i <= 4; ++i) {
                const double z = 0.75 * i;
                t.rows.push_back({text("survival"), text(site), text("all"), text(kernel),
                                  number(z), number(0.2 + 0.15 * z), missing()});
                t.rows.push_back({text("growth"), text(site), text("all"), text(kernel),
                                  number(z), number(0.5 + 0.8 * z), number(0.3)});
                t.rows.push_back({text("seeds"), text(site), text("all"), text(kernel),
                                  number(z), number(std::exp(z)), missing()});
                t.rows.push_back({text("recruit_size"), text(site), text("all"), text(kernel),
                                  number(z), number(0.4), missing()});
            }
    return t;
}

TidyTable growth() {
    TidyTable t{"check_growth",
                {"microsite", "stage", "year", "size", "size_next", "fitted_mean", "fitted_sd",
                 "residual", "normal_score"},
                {}};
    for (int i = 0; i < 7; ++i)
        t.rows.push_back({text("gravel"), text("all"), text("2015"), number(0.3 * i),
                          number(0.3 * i + 0.5), number(0.3 * i + 0.4), number(0.3),
                          number(-1.0 + 0.3 * i), number(-1.2 + 0.4 * i)});
    // A missing value is left out of every figure.
    t.rows.push_back({text("gravel"), text("all"), text("2015"), number(1.0), missing(),
                      number(1.0), number(0.3), missing(), missing()});
    return t;
}

}  // namespace

TEST_CASE("survival figure: one panel per microsite, points, whiskers, curves",
          "[report][unit][check]") {
    const auto f = check_binary_figure({binned(), curves()}, "survival");
    REQUIRE(f);
    check_figure(*f, "check_survival");
    CHECK(count(f->svg, "<g class=\"panel\">") == 2);
    CHECK(count(f->svg, "class=\"point\"") == 6);     // 3 bins × 2 microsites
    CHECK(count(f->svg, "class=\"whisker\"") == 6);
    CHECK(count(f->svg, "class=\"line\"") == 2);      // pooled curve per panel
    CHECK(count(f->svg, "class=\"trace\"") == 4);     // 2 census years × 2 panels, faint
    // Flowering has one microsite with data: one panel, one bin, no curve rows.
    const auto g = check_binary_figure({binned(), curves()}, "flowering");
    REQUIRE(g);
    check_figure(*g, "check_flowering");
    CHECK(count(g->svg, "<g class=\"panel\">") == 1);
    CHECK(count(g->svg, "class=\"point\"") == 1);
    CHECK_FALSE(check_binary_figure({curves()}, "survival"));
}

TEST_CASE("growth figures: scatter with bands, residuals, normal quantile plot",
          "[report][unit][check]") {
    const std::vector<TidyTable> tables{growth(), curves()};
    const auto g = check_growth_figure(tables);
    REQUIRE(g);
    check_figure(*g, "check_growth");
    CHECK(dots(g->svg) == 7);   // the row without size_next is left out
    CHECK(count(g->svg, "class=\"area\"") == 2);  // ±1 and ±2 SD
    CHECK(count(g->svg, "class=\"line\"") == 1);
    const auto r = check_growth_residuals_figure(tables);
    REQUIRE(r);
    check_figure(*r, "check_growth_residuals");
    CHECK(dots(r->svg) == 7);
    CHECK(count(r->svg, "class=\"reference\"") == 3);  // 0 and ±2
    const auto q = check_growth_qq_figure(tables);
    REQUIRE(q);
    check_figure(*q, "check_growth_qq");
    CHECK(dots(q->svg) == 7);
    CHECK(count(q->svg, "class=\"line\"") == 1);  // the 1:1 line
}

TEST_CASE("seeds, recruit sizes, trapping, retention and size distribution figures",
          "[report][unit][check]") {
    TidyTable seeds{"check_seeds", {"microsite", "stage", "year", "size", "seeds"}, {}};
    for (int i = 0; i < 5; ++i)
        seeds.rows.push_back(
            {text("cushion"), text("all"), text("2015"), number(i * 0.5), integer(i * 10)});
    const auto s = check_seeds_figure({seeds, curves()});
    REQUIRE(s);
    check_figure(*s, "check_seeds");
    CHECK(dots(s->svg) == 5);
    CHECK(count(s->svg, "class=\"line\"") == 1);
    CHECK(count(s->svg, "class=\"trace\"") == 2);

    TidyTable rec{"check_recruit_sizes",
                  {"microsite", "bin", "size_lower", "size_upper", "recruits", "density",
                   "fitted_density"},
                  {}};
    for (int b = 0; b < 4; ++b)
        rec.rows.push_back({text("gravel"), integer(b + 1), number(b * 0.5), number(b * 0.5 + 0.5),
                            integer(3 + b), number(0.1 * b), number(0.2)});
    const auto r = check_recruit_sizes_figure({rec, curves()});
    REQUIRE(r);
    check_figure(*r, "check_recruit_sizes");
    CHECK(count(r->svg, "class=\"area\"") == 4);
    CHECK(count(r->svg, "class=\"line\"") == 1);

    TidyTable trap{"check_trapping",
                   {"form", "seed_type", "neighbour", "neighbour_size", "launched", "trapped",
                    "share"},
                   {}};
    TidyTable trap_curve{"check_trapping_curve",
                         {"form", "seed_type", "neighbour_size", "trapping"}, {}};
    for (const char* form : {"cushion", "tussock"})
        for (const char* type : {"winged", "plumed"}) {
            trap.rows.push_back({text(form), text(type), text("n1"), number(5.0), integer(20),
                                 integer(7), number(0.35)});
            for (int i = 0; i < 3; ++i)
                trap_curve.rows.push_back(
                    {text(form), text(type), number(2.0 + 3.0 * i), number(0.2 + 0.1 * i)});
        }
    const auto t = check_trapping_figure({trap, trap_curve});
    REQUIRE(t);
    check_figure(*t, "check_trapping");
    CHECK(count(t->svg, "<g class=\"panel\">") == 2);
    CHECK(count(t->svg, "class=\"point\"") == 4);
    CHECK(count(t->svg, "class=\"line\"") == 4);

    TidyTable ret{"check_retention",
                  {"microsite", "seed_type", "day", "seeds", "present", "share", "lower", "upper"},
                  {}};
    TidyTable curve{"retention_curve", {"microsite", "seed_type", "day", "retained"}, {}};
    for (int d : {0, 7, 14}) {
        ret.rows.push_back({text("gravel"), text("winged"), number(d), integer(50),
                            integer(50 - 2 * d), number(1.0 - 0.04 * d), number(0.9 - 0.04 * d),
                            number(1.0 - 0.03 * d)});
    }
    for (int d = 0; d <= 30; ++d)
        curve.rows.push_back(
            {text("gravel"), text("winged"), integer(d), number(std::exp(-0.04 * d))});
    const auto rt = check_retention_figure({ret, curve});
    REQUIRE(rt);
    check_figure(*rt, "check_retention");
    CHECK(count(rt->svg, "class=\"point\"") == 3);
    CHECK(count(rt->svg, "class=\"whisker\"") == 3);
    CHECK(count(rt->svg, "class=\"line\"") == 1);

    TidyTable dist{"check_size_distribution",
                   {"microsite", "source", "bin", "size_lower", "size_upper", "proportion"},
                   {}};
    for (const char* src : {"last_census", "all_years", "stable_pooled"})
        for (int b = 0; b < 5; ++b)
            dist.rows.push_back({text("gravel"), text(src), integer(b + 1), number(b),
                                 number(b + 1.0), number(0.1)});
    const auto d = check_size_distribution_figure({dist});
    REQUIRE(d);
    check_figure(*d, "check_size_distribution");
    CHECK(count(d->svg, "class=\"line\"") == 3);
}

TEST_CASE("heat maps: one panel per block, cells, legend; scale is ordered in lightness",
          "[report][unit][check]") {
    TidyTable s{"check_surfaces",
                {"surface", "to_class", "from_class", "size_to", "size_from", "value"},
                {}};
    for (const char* to : {"gravel", "cushion"})
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 4; ++j)
                s.rows.push_back({text("elasticity"), text(to), text("gravel"), number(i),
                                  number(j * 0.5), number(0.01 * (i + j))});
    const auto f = check_surface_figure({s}, "elasticity");
    REQUIRE(f);
    check_figure(*f, "check_elasticity");
    // Values 0.01 (i + j) with maximum 0.05: steps ⌊20 (i + j)/5⌋ differ along each row, so
    // every cell is its own run: 2 blocks × 3 × 4 cells.
    CHECK(cell_runs(f->svg) == 2 * 3 * 4);
    CHECK(count(f->svg, "<g class=\"panel\">") == 3);  // two blocks and the legend
    CHECK(count(f->svg, "class=\"swatch\"") == 20);
    CHECK_FALSE(check_surface_figure({s}, "kernel"));  // no rows of that surface

    // The scale: L* (CIE, D65) strictly falls along it, from about 97 to about 18 — a
    // design requirement (docs/methods/model-checking.md), computed from the emitted sRGB.
    // Margin 1.5 on the end points: rounding to 8-bit channels and gamut clamping.
    double previous = 101.0;
    for (int k = 0; k <= 40; ++k) {
        const double L = lightness_of(sequential_colour(k / 40.0));
        CHECK(L < previous);
        previous = L;
    }
    CHECK(lightness_of(sequential_colour(0.0)) == Approx(97.0).margin(1.5));
    CHECK(lightness_of(sequential_colour(1.0)) == Approx(18.0).margin(1.5));
    // Reference points of lightness_of: white 100, black 0 (CIE 1976 definition).
    CHECK(lightness_of("#ffffff") == Approx(100.0).margin(1e-6));
    CHECK(lightness_of("#000000") == Approx(0.0).margin(1e-6));
}

TEST_CASE("year contributions and reproductive value figures", "[report][unit][check]") {
    TidyTable y{"year_decomposition", {"kernel", "component", "contribution", "delta_lambda"},
                {}};
    for (const char* year : {"2015", "2016", "2017"})
        for (const char* c : {"survival", "growth", "interaction"})
            y.rows.push_back({text(year), text(c), number(0.01), number(0.03)});
    const auto f = check_year_contributions_figure({y});
    REQUIRE(f);
    check_figure(*f, "check_year_contributions");
    CHECK(count(f->svg, "class=\"bar\"") == 9);
    CHECK(count(f->svg, "class=\"point\"") == 3);

    TidyTable v{"reproductive_value", {"kernel", "microsite", "stage", "size", "value"}, {}};
    for (const char* k : {"2015", "pooled"})
        for (const char* site : {"gravel", "cushion"})
            for (int i = 0; i < 4; ++i)
                v.rows.push_back(
                    {text(k), text(site), text("established"), number(i), number(0.5 * i)});
    const auto r = check_reproductive_value_figure({v});
    REQUIRE(r);
    check_figure(*r, "check_reproductive_value");
    CHECK(count(r->svg, "class=\"line\"") == 2);  // pooled only, one per microsite
}

TEST_CASE("model_check_figures: all from the tables, nothing without them",
          "[report][unit][check]") {
    CHECK(model_check_figures({}).empty());
    const auto all = model_check_figures({binned(), curves(), growth()});
    std::vector<std::string> names;
    for (const auto& f : all) names.push_back(f.name);
    CHECK(names == std::vector<std::string>{"check_survival", "check_flowering", "check_growth",
                                            "check_growth_residuals", "check_growth_qq"});
    // Identical tables give identical figures.
    const auto again = model_check_figures({binned(), curves(), growth()});
    REQUIRE(again.size() == all.size());
    for (std::size_t i = 0; i < all.size(); ++i) CHECK(again[i].svg == all[i].svg);
}
