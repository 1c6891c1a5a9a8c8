// The program as a function (style guide 4.11): statuses, stderr shape, help, docs coverage.
// Exit statuses and the "safesite: error:" line are this project's contract (design.md §7);
// no outside source.
#include <catch2/catch.hpp>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <random>
#include <regex>
#include <set>
#include <sstream>

#include "app.hpp"
#include "safesite/version.hpp"

namespace fs = std::filesystem;

namespace {

struct Outcome {
    int status = -1;
    std::string out;
    std::string err;
};

Outcome run(const std::vector<std::string>& args) {
    std::ostringstream out, err;
    Outcome o;
    o.status = safesite::cli::run(args, out, err);
    o.out = out.str();
    o.err = err.str();
    return o;
}

std::string source(const std::string& rel) { return std::string(SAFESITE_SOURCE_DIR) + "/" + rel; }

std::string slurp(const fs::path& p) {
    std::ifstream f(p, std::ios::binary);
    std::stringstream ss;
    ss << f.rdbuf();
    return ss.str();
}

fs::path fresh_dir(const std::string& tag) {
    const fs::path p = fs::temp_directory_path() /
                       ("safesite-cli-" + tag + "-" + std::to_string(std::random_device{}()));
    fs::remove_all(p);
    return p;
}

const std::vector<std::string> k_verbs = {"check", "fit", "run", "eval", "simulate", "report"};

}  // namespace

TEST_CASE("help and version go to stdout with status 0", "[cli][unit]") {
    const Outcome top = run({"--help"});
    CHECK(top.status == 0);
    CHECK(top.err.empty());
    for (const auto& v : k_verbs) CHECK(top.out.find(v) != std::string::npos);
    for (const auto& v : k_verbs) {
        INFO(v);
        const Outcome h = run({v, "--help"});
        CHECK(h.status == 0);
        CHECK(h.err.empty());
        CHECK(h.out.find("safesite " + v) != std::string::npos);
    }
    const Outcome ver = run({"--version"});
    CHECK(ver.status == 0);
    CHECK(ver.out == "safesite " + safesite::version() + "\n");
}

TEST_CASE("misuse is status 2 with one error line and a short usage on stderr", "[cli][unit]") {
    const std::vector<std::vector<std::string>> cases = {
        {},                                         // no verb
        {"frobnicate"},                             // unknown verb
        {"run"},                                    // missing MODEL
        {"run", "m.toml", "--bogus"},               // unknown option
        {"simulate", "t.toml", "--plants", "10"},   // missing required options
        {"simulate", "t.toml", "--plants", "0", "--years", "3", "--seed", "1", "--out", "x"},
        {"eval", "m.toml", "--top", "zero"},        // not a number
        {"report"},                                 // missing DIR
    };
    for (const auto& args : cases) {
        std::string joined;
        for (const auto& a : args) joined += a + " ";
        INFO(joined);
        const Outcome o = run(args);
        CHECK(o.status == 2);
        CHECK(o.out.empty());
        CHECK(o.err.rfind("safesite: error: ", 0) == 0);
        CHECK(o.err.find("Usage: safesite") != std::string::npos);
    }
}

TEST_CASE("a bad model file is status 3 naming the file", "[cli][unit]") {
    const Outcome missing = run({"check", "no/such/model.toml"});
    CHECK(missing.status == 3);
    CHECK(missing.err.rfind("safesite: error: ", 0) == 0);
    CHECK(missing.err.find("no/such/model.toml") != std::string::npos);

    // An unknown key: SpecError located at its line (spec module), exit 3.
    const fs::path dir = fresh_dir("badmodel");
    fs::create_directories(dir);
    const fs::path model = dir / "model.toml";
    std::ofstream(model) << "[model]\nname = \"x\"\nsize_transfrom = \"log\"\n";
    const Outcome bad = run({"eval", model.string()});
    CHECK(bad.status == 3);
    CHECK(bad.err.find(model.string() + ":3") != std::string::npos);
    CHECK(std::count(bad.err.begin(), bad.err.end(), '\n') == 1);  // one line

    // `report` on a folder without summary.json: exit 3 naming the file.
    const Outcome report = run({"report", (dir / "no-such-folder").string()});
    CHECK(report.status == 3);
    CHECK(report.err.rfind("safesite: error: ", 0) == 0);
    CHECK(report.err.find("no-such-folder/summary.json") != std::string::npos);
    fs::remove_all(dir);
}

TEST_CASE("every option in the help of every verb is documented in docs/cli.md", "[cli][unit]") {
    const std::string docs = slurp(source("docs/cli.md"));
    REQUIRE_FALSE(docs.empty());
    const std::regex option("(^|[\\s,])(--?[a-z][a-z-]*)");
    std::set<std::string> seen;
    std::vector<std::vector<std::string>> helps = {{"--help"}};
    for (const auto& v : k_verbs) helps.push_back({v, "--help"});
    for (const auto& args : helps) {
        const std::string text = run(args).out;
        for (auto it = std::sregex_iterator(text.begin(), text.end(), option);
             it != std::sregex_iterator(); ++it) {
            seen.insert((*it)[2].str());
        }
        // The verb itself has its own section.
        if (args.size() == 2) {
            CHECK(docs.find("## `safesite " + args[0]) != std::string::npos);
        }
    }
    CHECK(seen.count("--plants") == 1);  // the pattern finds options at all
    for (const auto& o : seen) {
        INFO(o);
        CHECK(docs.find("`" + o) != std::string::npos);
    }
}

TEST_CASE("simulate writes the same files for the same seed", "[cli][unit]") {
    const fs::path a = fresh_dir("sim-a"), b = fresh_dir("sim-b"), c = fresh_dir("sim-c");
    const std::string truth = source("models/ridge-truth.toml");
    auto sim = [&](const fs::path& out, const std::string& seed) {
        return run({"simulate", truth, "--plants", "150", "--years", "4", "--seed", seed,
                    "--out", out.string(), "--burn-in", "3"});
    };
    const Outcome ra = sim(a, "11");
    INFO(ra.err);
    REQUIRE(ra.status == 0);
    REQUIRE(sim(b, "11").status == 0);
    REQUIRE(sim(c, "12").status == 0);
    for (const char* f : {"census.csv", "truth-years.csv", "truth-lambda.csv"}) {
        INFO(f);
        REQUIRE(fs::exists(a / f));
        CHECK(slurp(a / f) == slurp(b / f));
    }
    CHECK(slurp(a / "census.csv") != slurp(c / "census.csv"));
    for (const auto& d : {a, b, c}) fs::remove_all(d);
}

TEST_CASE("simulate with seed experiments writes them, the same for the same seed",
          "[cli][unit]") {
    const fs::path a = fresh_dir("simx-a"), b = fresh_dir("simx-b");
    const std::string truth = source("models/ridge-truth-experiments.toml");
    auto sim = [&](const fs::path& out) {
        return run({"simulate", truth, "--plants", "150", "--years", "3", "--seed", "5",
                    "--out", out.string(), "--burn-in", "2"});
    };
    const Outcome ra = sim(a);
    INFO(ra.err);
    REQUIRE(ra.status == 0);
    REQUIRE(sim(b).status == 0);
    // The summary shows the truth arrival table.
    CHECK(ra.out.find("truth-arrival") != std::string::npos);
    CHECK(ra.out.find("trapping trials") != std::string::npos);
    for (const char* f : {"census.csv", "truth-years.csv", "truth-lambda.csv", "trapping.csv",
                          "retention.csv", "truth-arrival.csv", "truth-trapping.csv",
                          "truth-hazards.csv"}) {
        INFO(f);
        REQUIRE(fs::exists(a / f));
        CHECK(slurp(a / f) == slurp(b / f));
    }
    CHECK(slurp(a / "trapping.csv").rfind("neighbour,form,neighbour_size,seed_type,", 0) == 0);
    CHECK(slurp(a / "census.csv").find(",neighbour_size,") != std::string::npos);
    for (const auto& d : {a, b}) fs::remove_all(d);
}
