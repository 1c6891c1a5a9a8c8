// Honest failure on bad CSV input (issue 11): long values quoted short, whole messages capped,
// missing-value markers named, files that are not UTF-8 CSV text refused at a location, and
// the path problems (folder, missing file) named as such. Failures are checked by type and
// location fields; the length bounds are the point of the long-value cases.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <string>

#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"
#include "safesite/io/quoted.hpp"

using safesite::DataError;
using safesite::io::CsvTable;

namespace {

DataError parse_error(const std::string& text) {
    try {
        (void)CsvTable::parse(text, "f.csv");
    } catch (const DataError& e) {
        return e;
    }
    FAIL("expected a DataError");
    throw std::logic_error("unreachable");
}

template <class F>
DataError cell_error(F&& read) {
    try {
        read();
    } catch (const DataError& e) {
        return e;
    }
    FAIL("expected a DataError");
    throw std::logic_error("unreachable");
}

// A scratch folder under the system temporary folder, removed at the end of the test.
struct Scratch {
    std::filesystem::path dir;
    explicit Scratch(const std::string& name)
        : dir(std::filesystem::temp_directory_path() / ("safesite-csv-input-" + name)) {
        std::filesystem::remove_all(dir);
        std::filesystem::create_directories(dir);
    }
    ~Scratch() { std::filesystem::remove_all(dir); }
};

}  // namespace

TEST_CASE("quoted_short keeps 40 characters of a long value and says how long it was",
          "[io][unit]") {
    using safesite::io::quoted_short;
    CHECK(quoted_short("12,3") == "\"12,3\"");
    CHECK(quoted_short("a\"b") == "\"a\"\"b\"");
    CHECK(quoted_short("a\nb\tc") == "\"a\\nb\\tc\"");
    const std::string long_value(10 * 1024 * 1024, 'x');  // a 10 MB cell
    const std::string q = quoted_short(long_value);
    CHECK(q.size() < 80);
    CHECK(q.find(std::string(40, 'x')) != std::string::npos);
    CHECK(q.find(std::string(41, 'x')) == std::string::npos);
    CHECK(q.find(std::to_string(long_value.size())) != std::string::npos);
    // Characters, not bytes: a cut never splits a UTF-8 sequence ("é" is 2 bytes).
    std::string accents;
    for (int i = 0; i < 50; ++i) accents += "\xC3\xA9";
    const std::string qa = quoted_short(accents);
    CHECK(safesite::io::character_count(accents) == 50);
    CHECK(qa.find(std::string("\xC3\xA9")) != std::string::npos);
    CHECK(qa.find("(50 characters)") != std::string::npos);
}

TEST_CASE("capped cuts a long message and keeps a short one", "[io][unit]") {
    using safesite::io::capped;
    CHECK(capped("short") == "short");
    const std::string big(100000, 'm');
    const std::string c = capped(big, 1000);
    CHECK(c.size() <= 1100);
    CHECK(c.compare(0, 900, big, 0, 900) == 0);
}

TEST_CASE("a 10 MB line gives a short message at its location", "[io][unit]") {
    const std::string huge(10 * 1024 * 1024, '7');
    SECTION("a ragged row") {
        const auto e = parse_error("a,b\n1,2\n" + huge + "\n");
        CHECK(e.line() == 3);
        CHECK(std::string(e.what()).size() < 2000);
    }
    SECTION("a value that is not a number") {
        const auto t = CsvTable::parse("a,b\n1," + huge + "x\n", "f.csv");
        const auto e = cell_error([&] { (void)t.real(0, 1); });
        CHECK(e.line() == 2);
        CHECK(e.column() == 2);
        CHECK(e.key() == "b");
        CHECK(std::string(e.what()).size() < 400);
    }
    SECTION("a 10 MB header name") {
        const auto e = parse_error("a," + huge + ",a\n1,2,3\n");
        CHECK(e.line() == 1);
        CHECK(e.column() == 3);
        const auto t = CsvTable::parse("a," + huge + "\n1,2\n", "f.csv");
        const auto m = cell_error([&] { (void)t.require("size"); });
        CHECK(m.line() == 1);
        CHECK(m.key() == "size");
        CHECK(std::string(m.what()).size() < 400);
    }
}

TEST_CASE("missing-value markers are refused with the cell's location", "[io][unit]") {
    const auto t = CsvTable::parse("n,x,f\nNA,NaN,.\n-,,N/A\n", "f.csv");
    for (auto read : {+[](const CsvTable& c) { (void)c.optional_integer(0, 0); },
                      +[](const CsvTable& c) { (void)c.integer(0, 0); }}) {
        const auto e = cell_error([&] { read(t); });
        CHECK(e.line() == 2);
        CHECK(e.column() == 1);
        CHECK(e.key() == "n");
    }
    CHECK(cell_error([&] { (void)t.optional_real(0, 1); }).column() == 2);
    CHECK(cell_error([&] { (void)t.optional_flag(0, 2); }).column() == 3);
    CHECK(cell_error([&] { (void)t.optional_integer(1, 0); }).line() == 3);
    CHECK(cell_error([&] { (void)t.optional_flag(1, 2); }).line() == 3);
    CHECK_FALSE(t.optional_real(1, 1).has_value());  // the empty cell is the missing value
}

TEST_CASE("text that is not UTF-8 CSV is refused at a location", "[io][unit]") {
    SECTION("UTF-16 little-endian with its byte-order mark") {
        const std::string text(
            "\xFF\xFE"
            "a\0,\0b\0\n\0",
            10);
        CHECK(parse_error(text).line() == 1);
    }
    SECTION("UTF-16 big-endian") {
        const std::string text("\xFE\xFF\0a\0,\0b\0\n", 10);
        CHECK(parse_error(text).line() == 1);
    }
    SECTION("a NUL byte names its line") {
        const std::string text("a,b\n1,2\n3,\0\n", 12);
        CHECK(parse_error(text).line() == 3);
    }
    SECTION("lone CR line ends") { CHECK(parse_error("a,b\r1,2\r3,4\r").line() == 1); }
    SECTION("an empty file and a file of comments") {
        CHECK(parse_error("").line() == 0);
        CHECK(parse_error("# only a comment\n\n").line() == 0);
    }
}

TEST_CASE("a UTF-8 byte-order mark and CRLF line ends are accepted together", "[io][unit]") {
    const auto t = CsvTable::parse("\xEF\xBB\xBFplant,size\r\nA,1.5\r\nB,x\r\n", "f.csv");
    REQUIRE(t.rows() == 2);
    CHECK(t.header()[0] == "plant");
    CHECK(t.real(0, 1) == 1.5);
    const auto e = cell_error([&] { (void)t.real(1, 1); });
    CHECK(e.line() == 3);
    CHECK(e.column() == 2);
}

TEST_CASE("a folder or a missing path is named as such", "[io][unit]") {
    Scratch s("paths");
    const auto folder = cell_error([&] { (void)CsvTable::read(s.dir); });
    CHECK(folder.file() == s.dir.string());
    CHECK(folder.line() == 0);
    const auto missing = cell_error([&] { (void)CsvTable::read(s.dir / "absent.csv"); });
    CHECK(missing.file() == (s.dir / "absent.csv").string());
    // A file holding binary data read from disk.
    const auto bin = s.dir / "bin.csv";
    {
        std::ofstream out(bin, std::ios::binary);
        out.write("a,b\n\0\x01\x02", 7);
    }
    const auto b = cell_error([&] { (void)CsvTable::read(bin); });
    CHECK(b.file() == bin.string());
    CHECK(b.line() == 2);
}
