// The report module: tidy tables, CSV and JSON writers, the terminal rendering, the caution.
#include <catch2/catch.hpp>

#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>

#include <nlohmann/json.hpp>

#include "safesite/error.hpp"
#include "safesite/report/caution.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/text_summary.hpp"
#include "safesite/report/tidy_table.hpp"
#include "safesite/version.hpp"

namespace fs = std::filesystem;
using namespace safesite::report;

namespace {

std::string slurp(const fs::path& p) {
    std::ifstream f(p, std::ios::binary);
    std::stringstream ss;
    ss << f.rdbuf();
    return ss.str();
}

TidyTable example_table() {
    TidyTable t;
    t.name = "lambda_by_year";
    t.columns = {"year", "microsite", "lambda", "note"};
    t.rows = {
        {integer(2019), text("gravel"), number(0.1), missing()},
        {integer(2020), text("cushion"), number(1.0 / 3.0), text("a \"quoted\", note")},
        {integer(2021), text("tussock"), number(-2.5e-300), text("two\nlines")},
    };
    return t;
}

/// A fresh empty folder under the system temporary folder, removed at scope exit.
struct TempDir {
    fs::path path;
    explicit TempDir(const std::string& tag) {
        path = fs::temp_directory_path() / ("safesite-report-" + tag + "-" +
                                            std::to_string(std::random_device{}()));
        fs::remove_all(path);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
};

}  // namespace

TEST_CASE("doubles are written so that they read back to the same binary value",
          "[report][unit]") {
    // Round trip of IEEE 754 doubles through their shortest decimal form (common practice:
    // the guarantee of fmt's default format). Exact equality, no tolerance: the point of the
    // format is that nothing is lost. Fixed seed.
    std::mt19937_64 rng(20261201);
    std::uniform_real_distribution<double> mantissa(-1.0, 1.0);
    std::uniform_int_distribution<int> exponent(-300, 300);
    for (int i = 0; i < 2000; ++i) {
        const double x = std::ldexp(mantissa(rng), exponent(rng));
        const std::string s = format_cell(number(x));
        INFO(s);
        REQUIRE(std::strtod(s.c_str(), nullptr) == x);
    }
    CHECK(format_cell(number(0.1)) == "0.1");
    CHECK(format_cell(number(std::nan(""))) == "NaN");
    CHECK(format_cell(number(-HUGE_VAL)) == "-Inf");
    CHECK(format_cell(integer(-7)) == "-7");
    CHECK(format_cell(missing()).empty());
}

TEST_CASE("CSV follows RFC 4180 quoting", "[report][unit]") {
    // RFC 4180 (Shafranovich 2005) section 2, rules 1, 4, 6 and 7: fields separated by commas;
    // fields with commas, quotes or line breaks enclosed in double quotes; an inner quote
    // doubled. We use LF line ends (rule 2 names CRLF; every reader we target, and our own
    // reader, accepts both: docs/formats.md).
    const std::string csv = to_csv(example_table());
    CHECK(csv ==
          "year,microsite,lambda,note\n"
          "2019,gravel,0.1,\n"
          "2020,cushion,0.3333333333333333,\"a \"\"quoted\"\", note\"\n"
          "2021,tussock,-2.5e-300,\"two\nlines\"\n");
}

TEST_CASE("malformed tables are refused before anything is written", "[report][unit]") {
    TidyTable bad = example_table();
    bad.rows[1].pop_back();
    CHECK_THROWS_AS(to_csv(bad), safesite::UsageError);
    TidyTable badname = example_table();
    badname.name = "Lambda by year";
    CHECK_THROWS_AS(check_table(badname), safesite::UsageError);

    TempDir tmp("bad");
    CHECK_THROWS_AS(write_output_folder(tmp.path, {example_table(), bad}, {}),
                    safesite::UsageError);
    CHECK_FALSE(fs::exists(tmp.path));
    CHECK_THROWS_AS(write_output_folder(tmp.path, {example_table(), example_table()}, {}),
                    safesite::UsageError);
    CHECK_FALSE(fs::exists(tmp.path));
    CHECK_THROWS_AS(column_index(example_table(), "size"), safesite::UsageError);
    CHECK(column_index(example_table(), "lambda") == 2);
}

TEST_CASE("summary.json holds the same numbers, the metadata and the caution",
          "[report][unit]") {
    RunInfo info;
    info.command = "run";
    info.model_file = "models/ridge.toml";
    info.model_name = "Ridge forb";
    info.seed = 42;
    info.assumptions = model_assumptions();
    info.warnings = {"3 plants not found in 2021"};
    const auto j = nlohmann::json::parse(to_summary_json({example_table()}, info));
    CHECK(j.at("safesite_version") == safesite::version());
    CHECK(j.at("command") == "run");
    CHECK(j.at("model").at("file") == "models/ridge.toml");
    CHECK(j.at("seed") == 42);
    CHECK(j.at("caution") == k_caution);
    CHECK(j.at("assumptions").size() == model_assumptions().size());
    CHECK(j.at("warnings").at(0) == "3 plants not found in 2021");
    const auto& t = j.at("tables").at(0);
    CHECK(t.at("name") == "lambda_by_year");
    CHECK(t.at("columns").at(2) == "lambda");
    // Exact equality: JSON numbers are written in round-trip form, like the CSV.
    CHECK(t.at("rows").at(1).at(2).get<double>() == 1.0 / 3.0);
    CHECK(t.at("rows").at(2).at(2).get<double>() == -2.5e-300);
    CHECK(t.at("rows").at(0).at(3).is_null());
    CHECK(t.at("rows").at(0).at(0).get<std::int64_t>() == 2019);

    RunInfo no_seed;
    CHECK(nlohmann::json::parse(to_summary_json({}, no_seed)).at("seed").is_null());
}

TEST_CASE("the output folder is written atomically and reproducibly", "[report][unit]") {
    TempDir tmp("folder");
    const fs::path dir = tmp.path / "nested" / "out";
    RunInfo info;
    info.command = "run";
    info.seed = 7;
    TidyTable second;
    second.name = "coefficients";
    second.columns = {"rate", "term", "estimate"};
    second.rows = {{text("survival"), text("(Intercept)"), number(-0.5)}};
    const auto paths = write_output_folder(dir, {example_table(), second}, info);
    REQUIRE(paths.size() == 3);
    CHECK(paths[0] == dir / "lambda_by_year.csv");
    CHECK(paths[2] == dir / "summary.json");
    CHECK(slurp(paths[0]) == to_csv(example_table()));
    // Only the three files: no temporary file is left behind.
    std::size_t n = 0;
    for (const auto& e : fs::directory_iterator(dir)) {
        INFO(e.path().string());
        CHECK(e.path().filename().string().front() != '.');
        ++n;
    }
    CHECK(n == 3);
    const std::string first = slurp(dir / "summary.json");
    write_output_folder(dir, {example_table(), second}, info);
    CHECK(slurp(dir / "summary.json") == first);  // no timestamp: byte-identical
}

TEST_CASE("an unwritable output folder is an input error naming the path", "[report][unit]") {
    TempDir tmp("unwritable");
    fs::create_directories(tmp.path);
    const fs::path file = tmp.path / "plain-file";
    std::ofstream(file) << "x";
    // A folder cannot be created inside a regular file.
    try {
        write_output_folder(file / "out", {example_table()}, {});
        FAIL("expected an InputError");
    } catch (const safesite::InputError& e) {
        CHECK(e.key() == "out");
        CHECK(e.file() == (file / "out").string());
    }
}

TEST_CASE("terminal tables are aligned, rounded and end with the caution", "[report][unit]") {
    TidyTable t;
    t.name = "lambda";
    t.columns = {"year", "λ"};
    t.rows = {{text("2019"), number(1.023456789)}, {text("pooled"), number(0.98)}};
    CHECK(render_table(t) ==
          "lambda\n"
          "  year       λ\n"
          "  2019   1.023\n"
          "  pooled  0.98\n");
    TextOptions few;
    few.max_rows = 1;
    CHECK(render_table(t, few).find("… 1 more rows") != std::string::npos);
    RunInfo info;
    info.model_name = "Ridge forb";
    info.warnings = {"a warning"};
    const std::string s = render_summary({t}, info);
    CHECK(s.rfind("model: Ridge forb\n", 0) == 0);
    CHECK(s.find("  - a warning\n") != std::string::npos);
    CHECK(s.find("Caution: Results are model projections") != std::string::npos);
}

TEST_CASE("the README carries the same caution as every report", "[report][unit]") {
    // One wording everywhere (DEVELOPERS.md, "Cautions"): the README's caution block, with the
    // Markdown quote marks and line breaks removed, must contain the constant word for word.
    std::ifstream f(std::string(SAFESITE_SOURCE_DIR) + "/README.md");
    REQUIRE(f);
    std::string line, block;
    while (std::getline(f, line)) {
        if (line.rfind("> ", 0) == 0) block += line.substr(2) + " ";
    }
    std::string normalised;
    for (char c : block) {
        if (c == ' ' && !normalised.empty() && normalised.back() == ' ') continue;
        normalised += c;
    }
    INFO(normalised);
    CHECK(normalised.find(k_caution) != std::string::npos);
}
