// Command-line values and the location of model-file formula errors, end to end in process:
// a value out of range is exit 2 before any work, naming the option (the location of a
// command-line error, docs/errors.md) and the value; a mistyped option gets the nearest
// option; a formula error is exit 3 at model:line:column. The ranges are this project's
// contract (docs/cli.md, "Ranges"); no outside source.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <random>
#include <set>
#include <utility>
#include <sstream>
#include <string>
#include <vector>

#include "app.hpp"
#include "options.hpp"

namespace fs = std::filesystem;

namespace {

struct Outcome {
    int status = -1;
    std::string out;
    std::string err;
    std::string first;  // first line of stderr
};

Outcome run(const std::vector<std::string>& args) {
    std::ostringstream out, err;
    Outcome o;
    o.status = safesite::cli::run(args, out, err);
    o.out = out.str();
    o.err = err.str();
    o.first = o.err.substr(0, o.err.find('\n'));
    return o;
}

std::string source(const std::string& rel) { return std::string(SAFESITE_SOURCE_DIR) + "/" + rel; }

bool starts(const std::string& s, const std::string& prefix) { return s.rfind(prefix, 0) == 0; }
bool has(const std::string& s, const std::string& part) {
    return s.find(part) != std::string::npos;
}

}  // namespace

TEST_CASE("numeric options out of range are exit 2 naming the option and the value",
          "[cli][unit]") {
    const std::string model = source("models/ridge.toml");
    struct Case {
        std::vector<std::string> args;
        std::string option;
        std::string value;
    };
    const std::vector<Case> cases = {
        {{"run", model, "--replicates", "-1"}, "--replicates", "'-1'"},
        {{"run", model, "--replicates", "10001"}, "--replicates", "'10001'"},
        {{"run", model, "--replicates", "18446744073709551616"}, "--replicates",
         "'18446744073709551616'"},  // 2^64: past every 64-bit integer
        {{"run", model, "--seed", "-1"}, "--seed", "'-1'"},
        {{"run", model, "--seed", "9223372036854775808"}, "--seed", "'9223372036854775808'"},
        {{"run", model, "--threads", "0"}, "--threads", "'0'"},
        {{"run", model, "--threads", "2.5"}, "--threads", "'2.5'"},
        {{"eval", model, "--top", "1001"}, "--top", "'1001'"},
        {{"simulate", model, "--plants", "10", "--years", "201", "--seed", "1", "--out", "x"},
         "--years", "'201'"},
        {{"simulate", model, "--plants", "10", "--years", "5", "--seed", "1", "--out", "x",
          "--missing-seed-rate", "-0.1"},
         "--missing-seed-rate", "'-0.1'"},
    };
    for (const auto& c : cases) {
        INFO(c.option << " " << c.value);
        const Outcome o = run(c.args);
        CHECK(o.status == 2);
        CHECK(o.out.empty());
        CHECK(starts(o.first, "safesite: error: " + c.option + ": value " + c.value));
    }
}

TEST_CASE("the largest seed is accepted as a value; long values are shortened",
          "[cli][unit]") {
    // 2^63 - 1 passes the range check: the run then stops at the missing census of a model
    // file that does not exist (exit 3), not at the option (exit 2).
    const Outcome ok = run({"run", "no/such/model.toml", "--seed", "9223372036854775807"});
    CHECK(ok.status == 3);
    const std::string digits(500, '7');
    const Outcome o = run({"run", "no/such/model.toml", "--seed", digits});
    CHECK(o.status == 2);
    CHECK(o.first.size() < 200);  // 500 digits are not echoed
    CHECK(has(o.first, "(500 characters)"));
    CHECK(safesite::cli::shown_value("12345") == "'12345'");
}

TEST_CASE("too few replicates for the model file's level is exit 2 before any work",
          "[cli][unit]") {
    const Outcome o = run({"run", source("models/ridge.toml"), "--replicates", "40"});
    CHECK(o.status == 2);
    CHECK(starts(o.first, "safesite: error: --replicates: value '40'"));
    CHECK(has(o.first, "41"));
}

TEST_CASE("a mistyped option or verb gets the nearest name", "[cli][unit]") {
    const std::string model = source("models/ridge.toml");
    {
        const Outcome o = run({"run", model, "--replicate", "5"});
        CHECK(o.status == 2);
        CHECK(has(o.first, "'--replicate'"));
        CHECK(has(o.first, "did you mean '--replicates'?"));
    }
    {
        const Outcome o = run({"simulate", model, "--plant=5"});
        CHECK(o.status == 2);
        CHECK(has(o.first, "did you mean '--plants'?"));
    }
    {
        const Outcome o = run({"chek", model});
        CHECK(o.status == 2);
        CHECK(has(o.first, "did you mean 'check'?"));
    }
}

TEST_CASE("the help of each numeric option states its range", "[cli][unit]") {
    const std::string help = run({"run", "--help"}).out;
    CHECK(has(help, "(an integer from 0 to 10000)"));
    CHECK(has(help, "(an integer from 0 to 9223372036854775807)"));
    CHECK(has(help, "(an integer from 1 to 1024)"));
    CHECK(has(run({"simulate", "--help"}).out, "(a number from 0 to 0.99)"));
}

TEST_CASE("a formula error is exit 3 at model:line:column of the user's text", "[cli][unit]") {
    const fs::path dir = fs::temp_directory_path() /
                         ("safesite-cli-formula-" + std::to_string(std::random_device{}()));
    fs::create_directories(dir);
    // The demo model with one formula mistyped, its census reached by an absolute path.
    std::ifstream in(source("models/ridge.toml"));
    std::stringstream text;
    text << in.rdbuf();
    std::string model = text.str();
    const std::string census = "census = \"../demo/census.csv\"";
    model.replace(model.find(census), census.size(),
                  "census = \"" + source("demo/census.csv") + "\"");
    const std::string trapping = "trapping = \"../demo/trapping.csv\"";
    model.replace(model.find(trapping), trapping.size(),
                  "trapping = \"" + source("demo/trapping.csv") + "\"");
    const std::string retention = "retention = \"../demo/retention.csv\"";
    model.replace(model.find(retention), retention.size(),
                  "retention = \"" + source("demo/retention.csv") + "\"");
    const std::string good = "formula = \"flowered ~ size\"";
    const auto at = model.find(good);
    model.replace(at, good.size(), "formula = \"flowered ~ sise\"");
    std::size_t line = 1;
    for (std::size_t i = 0; i < at; ++i) line += model[i] == '\n';
    // `formula = "` is 11 characters: the formula starts in column 12, "sise" at its 12th.
    const std::string where = (dir / "m.toml").string() + ":" + std::to_string(line) + ":23: ";
    std::ofstream(dir / "m.toml") << model;
    for (const std::string verb : {"check", "fit"}) {
        INFO(verb);
        const Outcome o = run({verb, (dir / "m.toml").string()});
        CHECK(o.status == 3);
        CHECK(starts(o.first, "safesite: error: " + where));
        CHECK(has(o.first, "'rates.flowering.formula'"));
    }
    // A plot the census does not have: found by check after reading the census.
    std::string levels = model;
    levels.replace(levels.find("flowered ~ sise"), 15, "flowered ~ size + ref(plot, P99)");
    std::ofstream(dir / "m.toml") << levels;
    const Outcome o = run({"check", (dir / "m.toml").string()});
    CHECK(o.status == 3);
    // "flowered ~ size + ref(plot, " is 28 characters: P99 is character 29, column 11 + 29.
    CHECK(starts(o.first, "safesite: error: " + (dir / "m.toml").string() + ":" +
                              std::to_string(line) + ":40: "));
    fs::remove_all(dir);
}

TEST_CASE("check prints the memory estimate of the kernels", "[cli][unit]") {
    const Outcome o = run({"check", source("models/ridge.toml")});
    REQUIRE(o.status == 0);
    // ridge.toml: 100 points, 3 microsites with the seedling class (6 classes), and one kernel
    // per transition year plus the pooled one.
    CHECK(has(o.out, "kernels: 100 points × 6 classes × "));
    CHECK(has(o.out, " MB"));
}

TEST_CASE("print_coordinates: no output shows a plant's coordinates, whatever its value",
          "[cli][unit]") {
    // docs/formats.md, "Coordinates": no output of check or fit holds plant-level rows, so the
    // census's x, y appear nowhere, with print_coordinates false (the default) or true.
    std::ifstream in(source("models/ridge.toml"));
    std::stringstream text;
    text << in.rdbuf();
    std::string model = text.str();
    for (const char* file : {"census", "trapping", "retention"}) {
        const std::string from = std::string(file) + " = \"../demo/" + file + ".csv\"";
        model.replace(model.find(from), from.size(),
                      std::string(file) + " = \"" + source("demo/" + std::string(file) + ".csv") +
                          "\"");
    }
    // The census's coordinate pairs as written there ("x,y" at the end of each row).
    std::ifstream census(source("demo/census.csv"));
    std::string row;
    std::getline(census, row);  // header: ...,x,y
    REQUIRE(row.substr(row.size() - 4) == ",x,y");
    // Pairs of x, y with at least four characters each (e.g. "0.31", "5.72"), so that a
    // chance match of two short numbers side by side in an output is unlikely.
    std::set<std::pair<std::string, std::string>> pairs;
    while (std::getline(census, row)) {
        const auto last = row.rfind(',');
        const auto before = row.rfind(',', last - 1);
        const std::string x = row.substr(before + 1, last - before - 1), y = row.substr(last + 1);
        if (x.size() >= 4 && y.size() >= 4) pairs.insert({x, y});
    }
    REQUIRE(pairs.size() > 100);
    for (const std::string value : {"false", "true"}) {
        INFO("print_coordinates = " << value);
        const fs::path dir = fs::temp_directory_path() /
                             ("safesite-cli-coords-" + std::to_string(std::random_device{}()));
        fs::create_directories(dir);
        std::string m = model;
        const std::string key = "print_coordinates = false";
        m.replace(m.find(key), key.size(), "print_coordinates = " + value);
        const std::string reps = "replicates = 99";
        m.replace(m.find(reps), reps.size(), "replicates = 0");
        std::ofstream(dir / "m.toml") << m;
        const Outcome checked = run({"check", (dir / "m.toml").string()});
        REQUIRE(checked.status == 0);
        const Outcome fitted =
            run({"fit", (dir / "m.toml").string(), "--out", (dir / "out").string()});
        REQUIRE(fitted.status == 0);
        std::string all = checked.out + checked.err + fitted.out + fitted.err;
        for (const auto& entry : fs::recursive_directory_iterator(dir / "out")) {
            if (!entry.is_regular_file()) continue;
            std::ifstream f(entry.path(), std::ios::binary);
            std::stringstream ss;
            ss << f.rdbuf();
            const std::string content = ss.str();
            // No table has an x or y column (CSV header fields).
            const std::string header = content.substr(0, content.find('\n'));
            CHECK_FALSE(has("," + header + ",", ",x,"));
            CHECK_FALSE(has("," + header + ",", ",y,"));
            all += content;
        }
        // Tokens of every output (CSV fields, JSON values, words), then adjacent token pairs.
        std::vector<std::string> tokens;
        std::string token;
        for (const char c : all) {
            if (std::string(",; \t\r\n\"[]{}:|").find(c) != std::string::npos) {
                if (!token.empty()) tokens.push_back(token);
                token.clear();
            } else {
                token += c;
            }
        }
        std::size_t found = 0;
        for (std::size_t i = 0; i + 1 < tokens.size(); ++i)
            found += pairs.count({tokens[i], tokens[i + 1]});
        CHECK(found == 0);
        fs::remove_all(dir);
    }
}
