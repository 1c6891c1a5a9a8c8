// The report module's figures: the SVG chart builder (nice ticks, escaping, the axis
// mapping, skipped non-finite values) and the figures drawn from tidy tables.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <random>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "safesite/report/caution.hpp"
#include "safesite/report/figures.hpp"
#include "safesite/report/svg_chart.hpp"
#include "safesite/report/tidy_table.hpp"

namespace fs = std::filesystem;
using namespace safesite::report;

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

/// Tag balance of XML-like text: every `<name …>` is closed by `</name>` in nesting order;
/// `<… />`, `<?…?>` and `<!…>` stand alone. Returns an empty string when balanced, else what
/// went wrong.
std::string tag_balance_error(const std::string& s) {
    std::vector<std::string> open;
    std::size_t i = 0;
    while ((i = s.find('<', i)) != std::string::npos) {
        const std::size_t j = s.find('>', i);
        if (j == std::string::npos) return "a '<' is never closed by '>'";
        const std::string tag = s.substr(i + 1, j - i - 1);
        if (tag.empty()) return "empty tag";
        if (tag[0] == '?' || tag[0] == '!') {
            // declaration or comment
        } else if (tag[0] == '/') {
            const std::string name = tag.substr(1);
            if (open.empty()) return "</" + name + "> closes nothing";
            if (open.back() != name) return "</" + name + "> closes <" + open.back() + ">";
            open.pop_back();
        } else if (tag.back() != '/') {
            open.push_back(tag.substr(0, tag.find_first_of(" \t\n")));
        }
        i = j + 1;
    }
    if (!open.empty()) return "<" + open.back() + "> is never closed";
    return {};
}

std::size_t count(const std::string& text, const std::string& what) {
    std::size_t n = 0;
    for (std::size_t i = text.find(what); i != std::string::npos; i = text.find(what, i + 1)) ++n;
    return n;
}

/// The checks every figure must pass: a standalone SVG document, balanced tags, no scripts
/// or external resources, no unescaped '&', no "nan"/"inf" numbers.
void check_document(const std::string& svg) {
    REQUIRE(svg.rfind("<svg", 0) == 0);
    REQUIRE(svg.size() >= 7);
    CHECK(svg.substr(svg.size() - 7) == "</svg>\n");
    INFO(svg);
    CHECK(tag_balance_error(svg).empty());
    CHECK(svg.find("<script") == std::string::npos);
    CHECK(svg.find("href") == std::string::npos);
    CHECK(svg.find("url(") == std::string::npos);
    CHECK(svg.find("@import") == std::string::npos);
    CHECK_FALSE(std::regex_search(svg, std::regex("&(?!amp;|lt;|gt;|quot;|#39;)")));
    CHECK_FALSE(std::regex_search(svg, std::regex("[\"=, ]-?(nan|inf)[\", ]")));
}

TidyTable lambda_table(double year_2017 = 0.97) {
    return {"lambda",
            {"kernel", "lambda", "r0", "generation_time", "mesh_points"},
            {{text("2015"), number(1.05), number(2.0), number(20.0), integer(100)},
             {text("2016"), number(1.16), number(3.0), number(21.0), integer(100)},
             {text("2017"), number(year_2017), number(0.9), number(22.0), integer(100)},
             {text("2018"), number(0.94), number(0.5), number(23.0), integer(100)},
             {text("pooled"), number(1.03), number(1.5), number(22.0), integer(100)}}};
}

TidyTable intervals_table() {
    auto row = [](const std::string& q, const std::string& k, const std::string& target,
                  double est, double lo, double hi) {
        return std::vector<Cell>{text(q),       text(k),       text(target), number(est),
                                 number(lo),    number(hi),    number(0.01), integer(50),
                                 number(0.95)};
    };
    return {"intervals",
            {"quantity", "kernel", "target", "estimate", "lower", "upper", "std_error",
             "replicates", "level"},
            {row("lambda", "2015", "", 1.05, 1.04, 1.07), row("lambda", "2016", "", 1.16, 1.15, 1.18),
             row("lambda", "2018", "", 0.94, 0.93, 0.95), row("lambda", "pooled", "", 1.03, 1.02, 1.04),
             row("establishment", "pooled", "gravel", 0.004, 0.003, 0.005),
             row("scenario_delta_lambda", "pooled", "all on gravel", -0.08, -0.09, -0.07)}};
}

TidyTable scenarios_table(const std::string& second_name = "all under cushions") {
    return {"scenarios",
            {"scenario", "kernel", "lambda", "delta_lambda", "lost"},
            {{text("all on gravel"), text("pooled"), number(0.95), number(-0.08), number(0.0)},
             {text("all on gravel"), text("2015"), number(0.97), number(-0.08), number(0.0)},
             {text(second_name), text("pooled"), number(1.12), number(0.09), number(0.0)},
             {text(second_name), text("2015"), number(1.14), number(0.09), number(0.0)}}};
}

TidyTable arrival_table() {
    return {"arrival",
            {"scenario", "microsite", "fraction", "source"},
            {{text("baseline"), text("gravel"), number(0.6), text("given")},
             {text("baseline"), text("cushion"), number(0.25), text("given")},
             {text("baseline"), text("tussock"), number(0.15), text("given")},
             {text("all on gravel"), text("gravel"), number(1.0), text("scenario")},
             {text("all on gravel"), text("cushion"), number(0.0), text("scenario")},
             {text("all on gravel"), text("tussock"), number(k_nan), text("scenario")}}};
}

TidyTable perturbation_table() {
    // Rows out of order on purpose: the figure sorts by change.
    return {"perturbation",
            {"kernel", "change", "survival_factor", "lambda", "delta_lambda"},
            {{text("pooled"), number(0.2), number(1.2), number(1.04), number(0.02)},
             {text("pooled"), number(-0.2), number(0.8), number(0.98), number(-0.04)},
             {text("pooled"), number(0.0), number(1.0), number(1.02), number(0.0)},
             {text("2015"), number(0.0), number(1.0), number(1.3), number(0.0)}}};
}

std::vector<TidyTable> retention_tables() {
    TidyTable hazards{"hazards",
                      {"microsite", "seed_type", "hazard_per_day", "lower", "upper",
                       "mean_residence_days", "focal"},
                      {{text("gravel"), text("plumed"), number(0.05), number(0.04), number(0.06),
                        number(20.0), integer(1)},
                       {text("gravel"), text("smooth"), number(0.02), number(0.01), number(0.03),
                        number(50.0), integer(0)}}};
    TidyTable curve{"retention_curve", {"microsite", "seed_type", "day", "retained"}, {}};
    for (const std::string type : {"plumed", "smooth"}) {
        for (const std::string site : {"gravel", "cushion"}) {
            const double h = (type == "plumed" ? 0.05 : 0.02) * (site == "gravel" ? 1.0 : 0.3);
            for (int d = 0; d <= 30; ++d) {
                curve.rows.push_back({text(site), text(type), integer(d), number(std::exp(-h * d))});
            }
        }
    }
    return {hazards, curve};
}

std::vector<TidyTable> all_tables() {
    return {lambda_table(), intervals_table(), scenarios_table(), arrival_table(),
            perturbation_table(), retention_tables()[0], retention_tables()[1]};
}

struct TempDir {
    fs::path path;
    explicit TempDir(const std::string& tag) {
        path = fs::temp_directory_path() /
               ("safesite-figures-" + tag + "-" + std::to_string(std::random_device{}()));
        fs::remove_all(path);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
};

}  // namespace

TEST_CASE("the tag-balance checker of these tests rejects unbalanced text", "[report][unit]") {
    CHECK(tag_balance_error("<svg><g><line/></g></svg>").empty());
    CHECK_FALSE(tag_balance_error("<svg><g></svg></g>").empty());
    CHECK_FALSE(tag_balance_error("<svg><g>").empty());
    CHECK_FALSE(tag_balance_error("</g>").empty());
}

TEST_CASE("nice numbers follow Heckbert's rule", "[report][unit]") {
    // Heckbert1990, nicenum(): x = f·10^k; rounded: f < 1.5 → 1, < 3 → 2, < 7 → 5, else 10;
    // not rounded: the smallest of 1, 2, 5, 10 not below f. Cases worked by hand from it.
    CHECK(nice_number(0.25, true) == Approx(0.2).margin(1e-15));
    CHECK(nice_number(0.125, true) == Approx(0.1).margin(1e-15));
    CHECK(nice_number(3.0, true) == Approx(5.0).margin(1e-15));
    CHECK(nice_number(7.3, true) == Approx(10.0).margin(1e-15));
    CHECK(nice_number(0.24, false) == Approx(0.5).margin(1e-15));
    CHECK(nice_number(438.0, false) == Approx(500.0).margin(1e-12));
    CHECK(nice_number(1.0, false) == Approx(1.0).margin(1e-15));
    CHECK(nice_number(0.0, true) == 0.0);
}

TEST_CASE("nice ticks match hand-worked cases of Heckbert's loose labelling", "[report][unit]") {
    // Heckbert1990, loose_label(): range = nicenum(hi − lo, false);
    // d = nicenum(range / (n − 1), true); ticks from floor(lo/d)·d to ceil(hi/d)·d.
    // The margin 1e-12 only absorbs the binary rounding of k·d.
    auto check = [](const NiceTicks& t, const std::vector<double>& expected, double step,
                    int decimals) {
        REQUIRE(t.values.size() == expected.size());
        for (std::size_t i = 0; i < expected.size(); ++i) {
            CHECK(t.values[i] == Approx(expected[i]).margin(1e-12));
        }
        CHECK(t.step == Approx(step).margin(1e-12));
        CHECK(t.decimals == decimals);
    };
    SECTION("0..1, 5 ticks: range 1, d = nicenum(0.25) = 0.2") {
        check(nice_ticks(0.0, 1.0, 5), {0.0, 0.2, 0.4, 0.6, 0.8, 1.0}, 0.2, 1);
    }
    SECTION("0.93..1.17, 5 ticks: range nicenum(0.24) = 0.5, d = nicenum(0.125) = 0.1") {
        check(nice_ticks(0.93, 1.17, 5), {0.9, 1.0, 1.1, 1.2}, 0.1, 1);
    }
    SECTION("105..543, 5 ticks: range nicenum(438) = 500, d = nicenum(125) = 100") {
        check(nice_ticks(105.0, 543.0, 5), {100.0, 200.0, 300.0, 400.0, 500.0, 600.0}, 100.0, 0);
    }
    SECTION("-0.0786..0.0863, 6 ticks: range nicenum(0.1649) = 0.2, d = nicenum(0.04) = 0.05") {
        check(nice_ticks(-0.0786, 0.0863, 6), {-0.1, -0.05, 0.0, 0.05, 0.1}, 0.05, 2);
    }
    SECTION("a single value is widened by max(0.1 |x|, 1) (common practice)") {
        // 2..2 → 1..3; range nicenum(2) = 2, d = nicenum(0.5) = 0.5.
        check(nice_ticks(2.0, 2.0, 5), {1.0, 1.5, 2.0, 2.5, 3.0}, 0.5, 1);
    }
}

TEST_CASE("numbers are short fixed text and text is escaped for XML", "[report][unit]") {
    CHECK(format_fixed(-0.001, 2) == "0.00");
    CHECK(format_fixed(-1.5, 1) == "-1.5");
    CHECK(format_fixed(386.0, 2) == "386.00");
    CHECK(xml_escape("a<b & \"c\" > d'") == "a&lt;b &amp; &quot;c&quot; &gt; d&#39;");
    CHECK(xml_escape(std::string("tab\there")) == "tab here");
    CHECK(xml_escape("\u03bb = 1") == "\u03bb = 1");
}

TEST_CASE("a mark sits where the linear axis mapping puts it", "[report][unit]") {
    // Default layout, no legend, linear axes: plot area x from 80 to 720 − 28 = 692
    // (width 612), y from 56 to 440 − 64 = 376 (height 320). The data 0..1 give ticks 0..1 on
    // both axes (6 ticks: range nicenum(1) = 1, d = nicenum(0.2) = 0.2), so (0.5, 0.25) maps
    // to x = 80 + 0.5 · 612 = 386 and
    // y = 376 − 0.25 · 320 = 296.
    SvgChart chart("mapping", "one point in the middle");
    const auto s = chart.add_series("", Swatch::point);
    chart.add_points(s, {0.0, 0.5, 1.0}, {0.0, 0.25, 1.0});
    const std::string svg = chart.to_svg();
    check_document(svg);
    CHECK(count(svg, "class=\"point\"") == 3);
    CHECK(svg.find("cx=\"386.00\" cy=\"296.00\"") != std::string::npos);
    CHECK(svg.find("cx=\"80.00\" cy=\"376.00\"") != std::string::npos);
    CHECK(svg.find("cx=\"692.00\" cy=\"56.00\"") != std::string::npos);
}

TEST_CASE("non-finite values are skipped and break lines", "[report][unit]") {
    SvgChart chart("gaps", "a NaN and an Inf");
    const auto s = chart.add_series("values", Swatch::point_line);
    const std::vector<double> x{0, 1, 2, 3, 4, 5};
    const std::vector<double> y{1, 2, k_nan, 3, std::numeric_limits<double>::infinity(), 2};
    chart.add_line(s, x, y);
    chart.add_points(s, x, y);
    chart.add_whisker(s, 1.0, k_nan, 1.0, 2.5);
    CHECK(chart.mark_count("point") == 4);
    CHECK(chart.mark_count("line") == 1);  // 0–1 joined; 3 and 5 stand alone (no segment)
    CHECK(chart.mark_count("whisker") == 0);
    const std::string svg = chart.to_svg();
    check_document(svg);
    CHECK(count(svg, "class=\"point\"") == 4);
    CHECK(count(svg, "class=\"line\"") == 1);
}

TEST_CASE("lambda_by_year: one point per year, whiskers, pooled line and band", "[report][unit]") {
    const auto f = lambda_by_year_figure({lambda_table(k_nan), intervals_table()});
    REQUIRE(f);
    CHECK(f->name == "lambda_by_year");
    check_document(f->svg);
    CHECK(count(f->svg, "class=\"point\"") == 3);    // 4 years, 2017 is NaN
    CHECK(count(f->svg, "class=\"whisker\"") == 3);  // intervals for 2015, 2016, 2018
    CHECK(count(f->svg, "class=\"band\"") == 1);     // pooled interval
    CHECK(count(f->svg, "class=\"reference\"") == 1);
    // The year line is broken at the NaN (2015–2016 joined; 2018 alone), plus the pooled line.
    CHECK(count(f->svg, "class=\"line\"") == 2);
    CHECK(f->svg.find(">2017</text>") != std::string::npos);  // the year keeps its place
    CHECK(f->svg.find("95 % bootstrap") != std::string::npos);

    const auto plain = lambda_by_year_figure({lambda_table()});
    REQUIRE(plain);
    check_document(plain->svg);
    CHECK(count(plain->svg, "class=\"point\"") == 4);
    CHECK(count(plain->svg, "class=\"whisker\"") == 0);
    CHECK(count(plain->svg, "class=\"band\"") == 0);
}

TEST_CASE("scenarios: one bar per pooled scenario, escaped names, whiskers", "[report][unit]") {
    const auto f =
        scenarios_figure({scenarios_table("cushion & <gravel> \"mix\""), intervals_table()});
    REQUIRE(f);
    check_document(f->svg);
    CHECK(count(f->svg, "class=\"bar\"") == 2);      // the pooled rows only
    CHECK(count(f->svg, "class=\"whisker\"") == 1);  // "all on gravel" has an interval
    CHECK(f->svg.find("cushion &amp; &lt;gravel&gt; &quot;mix&quot;") != std::string::npos);
    CHECK(f->svg.find("<gravel>") == std::string::npos);
}

TEST_CASE("retention_curves: one line per microsite of the focal seed type", "[report][unit]") {
    const auto f = retention_curves_figure(retention_tables());
    REQUIRE(f);
    check_document(f->svg);
    CHECK(count(f->svg, "class=\"line\"") == 2);
    CHECK(f->svg.find("plumed") != std::string::npos);
    CHECK(f->svg.find("smooth") == std::string::npos);
    // y runs from 0 to 1 (ticks 0.0 … 1.0 by the 0..1 case above).
    CHECK(f->svg.find(">0.0</text>") != std::string::npos);
    CHECK(f->svg.find(">1.0</text>") != std::string::npos);
    // Without `hazards` and with two seed types, the focal type cannot be told.
    CHECK_FALSE(retention_curves_figure({retention_tables()[1]}));
}

TEST_CASE("arrival: one bar per finite fraction, a legend entry per scenario, the seeds lost",
          "[report][unit]") {
    const auto f = arrival_figure({arrival_table()});
    REQUIRE(f);
    check_document(f->svg);
    // 6 rows, one NaN; the lost group: baseline 1 − 0.6 − 0.25 − 0.15 = 0 (a bar of zero
    // length, labelled 0), "all on gravel" has a missing fraction, so no lost bar.
    CHECK(count(f->svg, "class=\"bar\"") == 6);
    CHECK(f->svg.find(">lost (in no microsite)</text>") != std::string::npos);
    CHECK(count(f->svg, "class=\"reference\"") == 1);  // the line above the lost group
    // Lost share drawn with its value: 1 − 0.5 − 0.2 = 0.3 (hand-worked).
    TidyTable half = arrival_table();
    half.rows = {{text("baseline"), text("gravel"), number(0.5), text("given")},
                 {text("baseline"), text("cushion"), number(0.2), text("given")}};
    const auto g = arrival_figure({half});
    REQUIRE(g);
    CHECK(g->svg.find(">0.3</text>") != std::string::npos);
    CHECK(f->svg.find(">baseline</text>") != std::string::npos);
    CHECK(f->svg.find(">all on gravel</text>") != std::string::npos);
}

TEST_CASE("perturbation: pooled rows in order of change, mapped to the axes", "[report][unit]") {
    const auto f = perturbation_figure({perturbation_table()});
    REQUIRE(f);
    check_document(f->svg);
    CHECK(count(f->svg, "class=\"point\"") == 3);
    // x: δ in % from −20 to 20, ticks (target 6) range nicenum(40) = 50, d = nicenum(10) = 10:
    // −20..20. y: λ 0.98..1.04 and the reference 1: range nicenum(0.06) = 0.1,
    // d = nicenum(0.02) = 0.02: 0.98..1.04. Plot area as in the mapping case (no legend).
    // δ = 0, λ = 1.02: x = 80 + 20/40 · 612 = 386, y = 376 − (0.04/0.06) · 320 = 162.67.
    CHECK(f->svg.find("cx=\"386.00\" cy=\"162.67\"") != std::string::npos);
    // The line runs left to right: its first point is δ = −20 % at x = 80.
    CHECK(f->svg.find("points=\"80.00,376.00 ") != std::string::npos);
}

TEST_CASE("figures are identical for identical tables", "[report][unit]") {
    const auto a = all_figures(all_tables());
    const auto b = all_figures(all_tables());
    REQUIRE(a.size() == 5);
    REQUIRE(b.size() == a.size());
    for (std::size_t i = 0; i < a.size(); ++i) {
        CHECK(a[i].name == b[i].name);
        CHECK(a[i].svg == b[i].svg);
        // Every figure carries the caution in its description (DEVELOPERS.md, "Cautions").
        CHECK(a[i].svg.find(xml_escape(k_caution)) != std::string::npos);
    }
    CHECK(a[0].name == "lambda_by_year");
    CHECK(a[4].name == "perturbation");
}

TEST_CASE("nothing is drawn when a table is missing or empty", "[report][unit]") {
    CHECK(all_figures({}).empty());
    CHECK_FALSE(lambda_by_year_figure({intervals_table()}));
    TidyTable empty = lambda_table();
    empty.rows.clear();
    CHECK_FALSE(lambda_by_year_figure({empty}));
    TidyTable no_pooled = scenarios_table();
    no_pooled.rows = {no_pooled.rows[1], no_pooled.rows[3]};
    CHECK_FALSE(scenarios_figure({no_pooled}));
    TidyTable renamed = arrival_table();
    renamed.columns[2] = "share";  // the needed column is absent
    CHECK_FALSE(arrival_figure({renamed}));
    CHECK_FALSE(perturbation_figure({lambda_table()}));
}

TEST_CASE("write_figures writes figures/<name>.svg and nothing when there is none",
          "[report][unit]") {
    TempDir dir("write");
    CHECK(all_figures({}).empty());
    CHECK(write_figures(dir.path, {}).empty());
    CHECK_FALSE(fs::exists(dir.path / "figures"));

    const auto tables = all_tables();
    const auto figures = all_figures(tables);
    const auto written = write_figures(dir.path, figures);
    REQUIRE(written.size() == figures.size());
    for (std::size_t i = 0; i < written.size(); ++i) {
        CHECK(written[i] == dir.path / "figures" / (figures[i].name + ".svg"));
        std::ifstream in(written[i], std::ios::binary);
        std::stringstream ss;
        ss << in.rdbuf();
        CHECK(ss.str() == figures[i].svg);
    }
    std::size_t files = 0;
    for (const auto& e : fs::directory_iterator(dir.path / "figures")) {
        (void)e;
        ++files;
    }
    CHECK(files == figures.size());  // no temporary files left behind
}
