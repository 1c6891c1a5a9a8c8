// The HTML report (design.md section 6, "an HTML report that works offline") and reading an
// output folder back for `safesite report`. The layout and the 4-digit rounding are this
// project's own choices (docs/formats.md "Output folder"); no outside source. Values in the
// tables are invented.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <random>
#include <set>
#include <string>
#include <vector>

#include "safesite/error.hpp"
#include "safesite/report/caution.hpp"
#include "safesite/report/figures.hpp"
#include "safesite/report/html_report.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/output_folder_reader.hpp"
#include "safesite/report/svg_chart.hpp"
#include "safesite/version.hpp"

namespace fs = std::filesystem;
using namespace safesite::report;

namespace {

const std::string k_evil = "<b>&\"'";
const std::string k_evil_escaped = "&lt;b&gt;&amp;&quot;&#39;";

/// Tag balance of the HTML we emit: every `<name …>` is closed by `</name>` in nesting order,
/// except the HTML void element `meta` we use and self-closed `<… />` (inline SVG);
/// `<!DOCTYPE …>` stands alone. Returns an empty string when balanced, else what went wrong.
std::string tag_balance_error(const std::string& s) {
    static const std::set<std::string> k_void = {"meta", "br", "hr", "img", "link", "input"};
    std::vector<std::string> open;
    std::size_t i = 0;
    while ((i = s.find('<', i)) != std::string::npos) {
        const std::size_t j = s.find('>', i);
        if (j == std::string::npos) return "a '<' is never closed by '>'";
        const std::string tag = s.substr(i + 1, j - i - 1);
        if (tag.empty()) return "empty tag";
        if (tag[0] == '!') {
            // DOCTYPE
        } else if (tag[0] == '/') {
            const std::string name = tag.substr(1);
            if (open.empty()) return "</" + name + "> closes nothing";
            if (open.back() != name) return "</" + name + "> closes <" + open.back() + ">";
            open.pop_back();
        } else if (tag.back() != '/') {
            const std::string name = tag.substr(0, tag.find_first_of(" \t\n"));
            if (k_void.count(name) == 0) open.push_back(name);
        }
        i = j + 1;
    }
    if (!open.empty()) return "<" + open.back() + "> is never closed";
    return {};
}

/// The five HTML escapes, as the report must apply them.
std::string escaped(const std::string& s) {
    std::string out;
    for (char c : s) {
        if (c == '&') out += "&amp;";
        else if (c == '<') out += "&lt;";
        else if (c == '>') out += "&gt;";
        else if (c == '"') out += "&quot;";
        else if (c == '\'') out += "&#39;";
        else out += c;
    }
    return out;
}

std::size_t count(const std::string& text, const std::string& what) {
    std::size_t n = 0;
    for (std::size_t i = text.find(what); i != std::string::npos; i = text.find(what, i + 1)) ++n;
    return n;
}

TidyTable lambda_table() {
    return {"lambda",
            {"kernel", "lambda", "r0", "generation_time", "mesh_points"},
            {{text("2015"), number(1.0523456789), number(2.0), number(20.25), integer(100)},
             {text("2016"), number(0.000123456), number(3.0), number(123456.7), integer(100)},
             {text("pooled"), number(1.034449), number(1.5), number(22.0), integer(100)}}};
}

TidyTable intervals_table() {
    auto row = [](const std::string& q, const std::string& k, const std::string& target,
                  double est, double lo, double hi) {
        return std::vector<Cell>{text(q),    text(k),    text(target), number(est), number(lo),
                                 number(hi), number(0.01), integer(50), number(0.95)};
    };
    return {"intervals",
            {"quantity", "kernel", "target", "estimate", "lower", "upper", "std_error",
             "replicates", "level"},
            {row("lambda", "2015", "", 1.05, 1.04, 1.07),
             row("lambda", "pooled", "", 1.034449, 1.0212345, 1.0456789),
             row("scenario_delta_lambda", "pooled", "all on gravel", -0.08, -0.09, -0.07)}};
}

TidyTable scenarios_table() {
    return {"scenarios",
            {"scenario", "kernel", "lambda", "delta_lambda", "lost"},
            {{text("all on gravel"), text("pooled"), number(0.95), number(-0.0812345), number(0.0)},
             {text("all on gravel"), text("2015"), number(0.97), number(-0.0777777), number(0.0)}}};
}

TidyTable arrival_chain_table() {
    return {"arrival_chain",
            {"microsite", "cover", "trapping", "hazard_per_day", "landing", "fraction"},
            {{text("gravel"), number(0.68), missing(), number(0.05), number(0.5), number(0.4)},
             {text("cushion"), number(0.2), number(0.6), number(0.01), number(0.4), number(0.35)},
             {text("lost"), missing(), missing(), missing(), number(0.0), number(0.25)}}};
}

TidyTable stochastic_table() {
    return {"stochastic_lambda",
            {"environment", "kernels", "years", "log_lambda", "lambda", "std_error", "seed"},
            {{text("census years, equally likely, independent"), integer(2), integer(20000),
              number(0.0312), number(1.0316918), number(0.0021), integer(7)}}};
}

TidyTable coefficients_table() {
    return {"coefficients",
            {"rate", "model", "year_handling", "source", "term", "estimate", "std_error",
             "statistic", "p_value"},
            {{text("survival"), text("all"), text("none"), text("fitted"), text(k_evil),
              number(0.5), number(0.1), number(5.0), number(1e-6)}}};
}

std::vector<TidyTable> all_tables() {
    return {coefficients_table(), arrival_chain_table(), intervals_table(), lambda_table(),
            stochastic_table(),   scenarios_table()};
}

RunInfo example_info() {
    RunInfo info;
    info.command = "run";
    info.model_file = "models/ridge.toml";
    info.model_name = "Ridge forb " + k_evil;
    info.seed = 20261201;
    info.assumptions = model_assumptions();
    info.warnings = {"3 plants not found in 2021"};
    return info;
}

struct TempDir {
    fs::path path;
    explicit TempDir(const std::string& tag)
        : path(fs::temp_directory_path() /
               ("safesite-html-" + tag + "-" + std::to_string(std::random_device{}()))) {
        fs::remove_all(path);
    }
    ~TempDir() { fs::remove_all(path); }
};

}  // namespace

TEST_CASE("the HTML report is well formed, self-contained and reproducible", "[report][unit]") {
    const auto tables = all_tables();
    const auto figures = all_figures(tables);
    REQUIRE_FALSE(figures.empty());
    const std::string html = render_html_report(tables, example_info(), figures);
    INFO(html);
    CHECK(html.rfind("<!DOCTYPE html>\n<html lang=\"en\">", 0) == 0);
    CHECK(html.size() >= 8);
    CHECK(html.substr(html.size() - 8) == "</html>\n");
    CHECK(tag_balance_error(html).empty());
    CHECK(count(html, "<body>") == 1);
    CHECK(count(html, "<head>") == 1);
    // Offline: no scripts, no external resources. The only "http" is the SVG namespace name.
    CHECK(html.find("<script") == std::string::npos);
    CHECK(html.find("<link") == std::string::npos);
    CHECK(html.find("src=") == std::string::npos);
    // Links only within the page: every href is "#id" of an element of the page.
    for (std::size_t i = html.find("href=\""); i != std::string::npos;
         i = html.find("href=\"", i + 1)) {
        const std::size_t end = html.find('"', i + 6);
        const std::string target = html.substr(i + 6, end - i - 6);
        INFO(target);
        REQUIRE(target.size() > 1);
        CHECK(target[0] == '#');
        CHECK(html.find("id=\"" + target.substr(1) + "\"") != std::string::npos);
    }
    CHECK(html.find("url(") == std::string::npos);
    CHECK(html.find("@import") == std::string::npos);
    CHECK(count(html, "http") == count(html, "xmlns=\"http://www.w3.org/2000/svg\""));
    // Identical input, identical bytes.
    CHECK(render_html_report(tables, example_info(), figures) == html);
}

TEST_CASE("text from the data is escaped in the report", "[report][unit]") {
    const std::string html = render_html_report(all_tables(), example_info(), {});
    // The model name (title, header) and the table cell (coefficients term).
    CHECK(count(html, "Ridge forb " + k_evil_escaped) == 2);
    CHECK(html.find("<td>" + k_evil_escaped + "</td>") != std::string::npos);
    CHECK(html.find("<b>") == std::string::npos);
    CHECK(html.find(k_evil) == std::string::npos);
    CHECK(tag_balance_error(html).empty());
}

TEST_CASE("the report puts the caution near the top and the sections in reading order",
          "[report][unit]") {
    const auto tables = all_tables();
    const std::string html = render_html_report(tables, example_info(), all_figures(tables));
    const std::size_t caution = html.find(k_caution);
    REQUIRE(caution != std::string::npos);
    // Warnings right under the caution when there are any, then the contents.
    const std::vector<std::string> order = {
        "<header>",        "id=\"caution\"",     "id=\"warnings\"",
        "id=\"contents\"", "id=\"key-results\"", "id=\"figures\"",
        "id=\"tables\"",   "id=\"assumptions\"", "id=\"files\""};
    std::size_t last = 0;
    for (const auto& s : order) {
        INFO(s);
        const std::size_t at = html.find(s);
        REQUIRE(at != std::string::npos);
        CHECK(at > last);
        last = at;
    }
    CHECK(caution < html.find("id=\"key-results\""));
    // Header: seed and version; every assumption and the warning.
    CHECK(html.find("<dd>20261201</dd>") != std::string::npos);
    CHECK(html.find("<dd>" + safesite::version() + "</dd>") != std::string::npos);
    for (const auto& a : model_assumptions())
        CHECK(html.find("<li>" + escaped(a) + "</li>") != std::string::npos);
    CHECK(html.find("<li>3 plants not found in 2021</li>") != std::string::npos);
    // Without a seed, no seed line.
    RunInfo no_seed = example_info();
    no_seed.seed.reset();
    CHECK(render_html_report(tables, no_seed, {}).find("<dt>seed</dt>") == std::string::npos);
    // Without warnings, no warnings section, and the header says so.
    RunInfo calm = example_info();
    calm.warnings.clear();
    const std::string h2 = render_html_report(tables, calm, {});
    CHECK(h2.find("id=\"warnings\"") == std::string::npos);
    CHECK(h2.find("<dt>warnings</dt><dd>none</dd>") != std::string::npos);
}

TEST_CASE("key results: pooled lambda with its interval, stochastic lambda, arrival, scenarios",
          "[report][unit]") {
    const std::string html = render_html_report(all_tables(), example_info(), {});
    const std::size_t from = html.find("id=\"key-results\"");
    const std::size_t to = html.find("</section>", from);
    REQUIRE(from != std::string::npos);
    const std::string key = html.substr(from, to - from);
    INFO(key);
    CHECK(key.find("<strong>1.034</strong> (bootstrap 95 % interval 1.021 to 1.046)") !=
          std::string::npos);
    CHECK(key.find("<strong>1.032</strong>") != std::string::npos);  // λ_s = 1.0316918
    CHECK(key.find("gravel 0.4, cushion 0.35, lost 0.25") != std::string::npos);
    CHECK(key.find("all on gravel -0.08123") != std::string::npos);   // pooled row
    CHECK(key.find("-0.07778") == std::string::npos);                 // year row left out

    // Without intervals: λ without one; without the other tables: no such items.
    const std::string bare = render_html_report({lambda_table()}, example_info(), {});
    CHECK(bare.find("<strong>1.034</strong>; above 1") != std::string::npos);
    CHECK(bare.find("bootstrap") == std::string::npos);
    CHECK(bare.find("Stochastic") == std::string::npos);
    CHECK(bare.find("Arrival fractions") == std::string::npos);
    // No table the key results read: no section at all.
    CHECK(render_html_report({coefficients_table()}, example_info(), {}).find("key-results") ==
          std::string::npos);
}

TEST_CASE("report tables: 4 significant digits, pooled scenario rows, absent tables left out",
          "[report][unit]") {
    const std::string html = render_html_report(all_tables(), example_info(), {});
    // fmt "{:.4g}" rounding (C printf %g rules): 1.0523456789 → 1.052, 0.000123456 → 0.0001235,
    // 123456.7 → 1.235e+05, 20.25 → 20.25 (exact in 4 digits), integers as they are.
    CHECK(html.find("<td class=\"num\">1.052</td>") != std::string::npos);
    CHECK(html.find("<td class=\"num\">0.0001235</td>") != std::string::npos);
    CHECK(html.find("<td class=\"num\">1.235e+05</td>") != std::string::npos);
    CHECK(html.find("<td class=\"num\">20.25</td>") != std::string::npos);
    CHECK(html.find("<td class=\"num\">100</td>") != std::string::npos);
    CHECK(html.find("1.0523") == std::string::npos);
    CHECK(html.find("4 significant digits") != std::string::npos);
    // Missing cells show as a dash.
    CHECK(html.find("<td class=\"num\">\u2014</td>") != std::string::npos);
    // scenarios: only the pooled row.
    CHECK(html.find("id=\"table-scenarios\"") != std::string::npos);
    CHECK(html.find("<td class=\"num\">-0.08123</td>") != std::string::npos);
    CHECK(html.find("<td class=\"num\">-0.07778</td>") == std::string::npos);
    // Tables present get a section; absent ones none.
    for (const char* t : {"lambda", "arrival_chain", "intervals", "coefficients"})
        CHECK(html.find(std::string("id=\"table-") + t + "\"") != std::string::npos);
    for (const char* t : {"break_even", "sensitivities", "hazards", "model_comparison"})
        CHECK(html.find(std::string("id=\"table-") + t + "\"") == std::string::npos);
    // The files list names every CSV, summary.json and the report.
    for (const auto& t : all_tables())
        CHECK(html.find("<code>" + t.name + ".csv</code></td>") != std::string::npos);
    CHECK(html.find("<code>summary.json</code></td>") != std::string::npos);
    CHECK(html.find("<code>report.html</code></td>") != std::string::npos);
}

TEST_CASE("figures are inlined with their caption; unsafe SVG is left out", "[report][unit]") {
    const auto tables = all_tables();
    const auto figures = all_figures(tables);
    const std::string html = render_html_report(tables, example_info(), figures);
    for (const auto& f : figures) {
        INFO(f.name);
        // Inlined up to the drawn caption, which the report shows once, as HTML text.
        const std::size_t cap = f.svg.find("<g class=\"caption\"");
        REQUIRE(cap != std::string::npos);
        const std::size_t body = f.svg.find("<title>");
        CHECK(html.find(f.svg.substr(body, cap - body)) != std::string::npos);
        CHECK(html.find("<code>figures/" + f.name + ".svg</code>)</figcaption>") !=
              std::string::npos);
        // The caption's first drawn line is shown once in the report (in the figcaption;
        // the SVG's <desc> elements are not shown).
        const std::size_t t0 = f.svg.find('>', f.svg.find("<text", cap)) + 1;
        const std::string first_line = f.svg.substr(t0, f.svg.find("</text>", t0) - t0);
        std::string shown = html;
        for (std::size_t d = shown.find("<desc>"); d != std::string::npos;
             d = shown.find("<desc>", d))
            shown.erase(d, shown.find("</desc>", d) + 7 - d);
        CHECK(count(shown, first_line) == 1);
    }
    CHECK(html.find("Figure 1.</strong> \u03bb per census-year kernel") != std::string::npos);
    // The inlined drawing is cut where the caption began: height and viewBox.
    const std::string& first = figures.front().svg;
    const std::size_t ty = first.find("translate(0 ") + 12;
    const std::string y = first.substr(ty, first.find(')', ty) - ty);
    CHECK(html.find("height=\"" + y + "\" viewBox=\"0 0 720.00 " + y + "\"") != std::string::npos);

    const Figure bad{"evil",
                     "<svg xmlns=\"http://www.w3.org/2000/svg\"><script>x()</script></svg>\n", ""};
    const Figure declared{"declared",
                          "<?xml version=\"1.0\"?>\n<svg><title>T &amp; U</title>"
                          "<desc>D &amp; E</desc></svg>\n",
                          ""};
    const std::string h2 = render_html_report(tables, example_info(), {bad, declared});
    CHECK(h2.find("<script") == std::string::npos);
    CHECK(h2.find("figures/evil.svg") != std::string::npos);
    CHECK(h2.find("left out") != std::string::npos);
    CHECK(h2.find("<?xml") == std::string::npos);
    CHECK(h2.find("<svg><title>T &amp; U</title><desc>D &amp; E</desc></svg>") !=
          std::string::npos);
    CHECK(h2.find("Figure 2.</strong> D &amp; E") != std::string::npos);
    CHECK(h2.find("Figure 2. T &amp; U") != std::string::npos);  // its entry in the contents
    CHECK(tag_balance_error(h2).empty());
}

TEST_CASE("an output folder read back renders the same report", "[report][unit]") {
    TempDir tmp("roundtrip");
    const auto tables = all_tables();
    const RunInfo info = example_info();
    write_output_folder(tmp.path, tables, info);
    write_figures(tmp.path, all_figures(tables));
    const std::string direct = render_html_report(tables, info, all_figures(tables));

    const OutputFolder back = read_output_folder(tmp.path);
    CHECK(back.info.safesite_version == safesite::version());
    CHECK(back.info.model_name == info.model_name);
    REQUIRE(back.info.seed.has_value());
    CHECK(*back.info.seed == 20261201u);
    REQUIRE(back.tables.size() == tables.size());
    for (std::size_t i = 0; i < tables.size(); ++i) {
        CHECK(back.tables[i].name == tables[i].name);
        CHECK(back.tables[i].columns == tables[i].columns);
        CHECK(back.tables[i].rows == tables[i].rows);  // exact: round-trip decimals
    }
    REQUIRE(back.figures.size() == all_figures(tables).size());
    CHECK(render_html_report(back.tables, back.info, back.figures) == direct);

    const fs::path written = rerender_html_report(tmp.path);
    CHECK(written == tmp.path / "report.html");
    std::ifstream f(written, std::ios::binary);
    const std::string on_disk((std::istreambuf_iterator<char>(f)), {});
    CHECK(on_disk == direct);
}

TEST_CASE("a missing or malformed summary.json is a data error naming the file",
          "[report][unit]") {
    TempDir tmp("bad");
    const std::string file = (tmp.path / "summary.json").string();
    try {
        read_output_folder(tmp.path);
        FAIL("no error for a missing folder");
    } catch (const safesite::DataError& e) {
        CHECK(e.file() == file);
    }
    fs::create_directories(tmp.path);
    std::ofstream(tmp.path / "summary.json") << "{\n  \"command\": ,\n}\n";
    try {
        read_output_folder(tmp.path);
        FAIL("no error for malformed JSON");
    } catch (const safesite::DataError& e) {
        CHECK(e.file() == file);
        CHECK(e.line() == 2);
        CHECK(e.column() > 0);
    }
    // Well-formed JSON, wrong content: the key names the place.
    std::ofstream(tmp.path / "summary.json")
        << "{\"safesite_version\": \"0.1.0\", \"command\": \"run\", \"model\": "
           "{\"file\": \"m.toml\", \"name\": \"m\"}, \"seed\": null, \"assumptions\": [], "
           "\"warnings\": [], \"tables\": [{\"name\": \"lambda\", \"columns\": "
           "[\"kernel\", \"lambda\"], \"rows\": [[\"pooled\", 1.0, 3]]}]}\n";
    try {
        read_output_folder(tmp.path);
        FAIL("no error for a row longer than the columns");
    } catch (const safesite::DataError& e) {
        CHECK(e.file() == file);
        CHECK(e.key() == "tables[0].rows[0]");
    }
    std::ofstream(tmp.path / "summary.json") << "{\"safesite_version\": \"0.1.0\"}\n";
    try {
        read_output_folder(tmp.path);
        FAIL("no error for a missing key");
    } catch (const safesite::DataError& e) {
        CHECK(e.key() == "command");
    }
    CHECK_THROWS_AS(rerender_html_report(tmp.path), safesite::InputError);
    CHECK_FALSE(fs::exists(tmp.path / "report.html"));
}

TEST_CASE("figures are grouped by section; diagnostics and life-history tables get sections",
          "[report][unit]") {
    auto tables = all_tables();
    // Tables of other areas, rendered generically (invented values).
    tables.push_back({"mesh_check",
                      {"kernel", "lambda_n", "lambda_2n", "relative_change"},
                      {{text("pooled"), number(1.03), number(1.0301), number(1e-4)}}});
    tables.push_back({"reducibility",
                      {"kernel", "reducible", "lambda_renewing"},
                      {{text("every seed on bare gravel"), integer(1), number(0.93745)}}});
    TidyTable life{"life_expectancy", {"microsite", "size", "expectancy"}, {}};
    for (int i = 0; i < 200; ++i)
        life.rows.push_back({text("gravel"), number(0.01 * i), number(1.0 + 0.1 * i)});
    tables.push_back(life);
    SvgChart c1("Check one", "caption one");
    SvgChart c2("Mesh one", "caption two");
    SvgChart c3("Main one", "caption three");
    const std::vector<Figure> figures = {{"check_a", c1.to_svg(), "Model checking"},
                                         {"mesh_a", c2.to_svg(), "Diagnostics"},
                                         {"main_a", c3.to_svg(), ""}};
    const std::string html = render_html_report(tables, example_info(), figures);
    CHECK(tag_balance_error(html).empty());
    // Fixed order: main figures, model checking, tables, life history, diagnostics.
    const std::vector<std::string> order = {
        "id=\"contents\"",         "id=\"figures\"",
        "id=\"figure-main_a\"",    "id=\"model-checking\"",
        "id=\"figure-check_a\"",   "id=\"tables\"",
        "id=\"life-history\"",     "id=\"table-life_expectancy\"",
        "id=\"diagnostics\"",      "id=\"figure-mesh_a\"",
        "id=\"table-mesh_check\"", "id=\"table-reducibility\"",
        "id=\"assumptions\""};
    std::size_t last = 0;
    for (const auto& s : order) {
        INFO(s);
        const std::size_t at = html.find(s);
        REQUIRE(at != std::string::npos);
        CHECK(at > last);
        last = at;
    }
    // Numbered in the order shown; listed in the contents.
    CHECK(html.find("Figure 1.</strong> caption three") != std::string::npos);
    CHECK(html.find("Figure 2.</strong> caption one") != std::string::npos);
    CHECK(html.find("Figure 3.</strong> caption two") != std::string::npos);
    CHECK(html.find("<a href=\"#figure-check_a\">Figure 2. Check one</a>") != std::string::npos);
    CHECK(html.find("<a href=\"#table-reducibility\">reducibility</a>") != std::string::npos);
    // Generic tables: every column and value; a long table shows 150 rows and says so.
    CHECK(html.find("<th>lambda_renewing</th>") != std::string::npos);
    CHECK(html.find(">0.9375<") != std::string::npos);  // 4 significant digits
    CHECK(html.find("The first 150 of 200 rows") != std::string::npos);
    // No Model checking section without its figures.
    const std::string plain = render_html_report(all_tables(), example_info(), {});
    CHECK(plain.find("id=\"model-checking\"") == std::string::npos);
    CHECK(plain.find("id=\"life-history\"") == std::string::npos);
}
