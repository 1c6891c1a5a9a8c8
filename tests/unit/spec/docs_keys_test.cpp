// The model file round-trips (issue 4, "Checks"): every key shown in the model-file block of
// docs/formats.md (also the commented-out ones) is read by the spec reader from at least one
// tested fixture, every key a fixture uses is documented there, and the block (its uncommented
// lines) is itself a valid model file.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <regex>
#include <set>
#include <sstream>
#include <string>

#include "safesite/spec/model_spec.hpp"

namespace fs = std::filesystem;

namespace {

/// The text of the ```toml block under "## Model file (TOML)", as written.
std::string documented_block() {
    std::ifstream in(fs::path(SAFESITE_SOURCE_DIR) / "docs" / "formats.md");
    REQUIRE(in);
    std::string line, text;
    bool in_section = false, in_block = false;
    while (std::getline(in, line)) {
        if (line.rfind("## ", 0) == 0) in_section = line == "## Model file (TOML)";
        if (!in_section) continue;
        if (line.rfind("```", 0) == 0) {
            if (in_block) break;
            in_block = line == "```toml";
            continue;
        }
        if (in_block) text += line + "\n";
    }
    return text;
}

/// Key paths of the block: section headers (possibly behind a leading '#', as for the
/// truth-file tables) set the prefix, `key = ...` lines (possibly behind a leading '#') give
/// the keys.
std::set<std::string> documented_keys() {
    std::istringstream in(documented_block());
    std::string line, prefix;
    std::set<std::string> keys;
    const std::regex header(R"(^#?\s*\[\[?([A-Za-z0-9_.]+)\]\]?)");
    const std::regex key(R"(^#?\s*([A-Za-z_][A-Za-z0-9_]*)\s*=)");
    while (std::getline(in, line)) {
        std::smatch m;
        if (std::regex_search(line, m, header)) {
            prefix = m[1];
        } else if (std::regex_search(line, m, key)) {
            keys.insert(prefix.empty() ? std::string(m[1]) : prefix + "." + std::string(m[1]));
        }
    }
    return keys;
}

std::vector<fs::path> fixtures() {
    std::vector<fs::path> out;
    for (const auto& dir : {fs::path(SAFESITE_TEST_DATA), fs::path(SAFESITE_SOURCE_DIR) / "models"}) {
        if (!fs::is_directory(dir)) continue;
        for (const auto& e : fs::directory_iterator(dir))
            if (e.path().extension() == ".toml") out.push_back(e.path());
    }
    return out;
}

/// rates.<any>.key → rates.*.key, data.<x>columns.<name> → data.<x>columns.*
std::string generic(const std::string& key) {
    static const std::regex rate(R"(^rates\.[a-z_]+\.)");
    static const std::regex columns(R"(^(data\.[a-z_]*columns)\.[a-z_]+$)");
    return std::regex_replace(std::regex_replace(key, rate, "rates.*."), columns, "$1.*");
}

}  // namespace

TEST_CASE("every key documented in docs/formats.md is read from a tested fixture",
          "[spec][unit]") {
    const auto documented = documented_keys();
    // The block is long: a sanity floor so a broken extractor cannot pass vacuously.
    REQUIRE(documented.size() >= 60);
    std::set<std::string> read;
    for (const auto& file : fixtures()) {
        INFO("fixture " << file);
        const auto spec = safesite::spec::read_model_spec(file);
        read.insert(spec.keys.begin(), spec.keys.end());
    }
    REQUIRE(read.size() > 0);
    for (const auto& k : documented) {
        INFO("documented key " << k);
        CHECK(read.count(k) == 1);
    }
    // And the other way: every key a fixture uses is documented (up to the rate name and the
    // column-map entries, which the block shows by example).
    std::set<std::string> documented_generic;
    for (const auto& k : documented) documented_generic.insert(generic(k));
    for (const auto& k : read) {
        INFO("fixture key " << k);
        CHECK(documented_generic.count(generic(k)) == 1);
    }
}

TEST_CASE("the model-file example of docs/formats.md is itself a valid model file",
          "[spec][unit]") {
    const std::string block = documented_block();
    REQUIRE(block.size() > 1000);
    const auto spec = safesite::spec::parse_model_spec(block, "docs/model.toml");
    CHECK(spec.microsites.labels.size() == 3);
    CHECK(spec.scenarios.size() == 2);
    CHECK(spec.rates.size() == 5);
}
