// Atomic output files (DEVELOPERS.md "Outputs": temporary file in the target folder, then a
// rename). Checks are behavioural: content, no temporary files left, failures leave the
// previous file intact.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "safesite/error.hpp"
#include "safesite/io/atomic_file.hpp"

namespace fs = std::filesystem;

namespace {

std::string slurp(const fs::path& p) {
    std::ifstream in(p, std::ios::binary);
    std::ostringstream s;
    s << in.rdbuf();
    return s.str();
}

fs::path fresh_dir(const std::string& name) {
    const fs::path dir = fs::temp_directory_path() / ("safesite-io-test-" + name);
    fs::remove_all(dir);
    return dir;
}

std::size_t entries(const fs::path& dir) {
    std::size_t n = 0;
    for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir)) ++n;
    return n;
}

}  // namespace

TEST_CASE("write_file_atomic writes, replaces and leaves no temporary file", "[io][unit]") {
    const fs::path dir = fresh_dir("write");
    safesite::io::ensure_directory(dir / "a" / "b");
    REQUIRE(fs::is_directory(dir / "a" / "b"));
    safesite::io::ensure_directory(dir / "a" / "b");  // existing folder: nothing to do

    const fs::path file = dir / "a" / "b" / "table.csv";
    safesite::io::write_file_atomic(file, "x,y\n1,2\n");
    CHECK(slurp(file) == "x,y\n1,2\n");
    safesite::io::write_file_atomic(file, std::string("second\0bytes", 12));
    CHECK(slurp(file) == std::string("second\0bytes", 12));
    CHECK(entries(dir / "a" / "b") == 1);
    fs::remove_all(dir);
}

TEST_CASE("write_file_atomic fails cleanly and keeps the old file", "[io][unit]") {
    const fs::path dir = fresh_dir("fail");
    safesite::io::ensure_directory(dir);
    // Missing folder: an Error naming the path.
    try {
        safesite::io::write_file_atomic(dir / "missing" / "t.csv", "x");
        FAIL("no error");
    } catch (const safesite::Error& e) {
        CHECK(std::string(e.what()).find("t.csv") != std::string::npos);
    }
    // Renaming onto a non-empty folder fails: the folder and its content stay, no temp left.
    safesite::io::ensure_directory(dir / "taken");
    safesite::io::write_file_atomic(dir / "taken" / "keep.txt", "old");
    CHECK_THROWS_AS(safesite::io::write_file_atomic(dir / "taken", "new"), safesite::Error);
    CHECK(slurp(dir / "taken" / "keep.txt") == "old");
    CHECK(entries(dir) == 1);
    // A file where a folder is wanted.
    safesite::io::write_file_atomic(dir / "plain", "x");
    CHECK_THROWS_AS(safesite::io::ensure_directory(dir / "plain"), safesite::Error);
    fs::remove_all(dir);
}
