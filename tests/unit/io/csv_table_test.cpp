// CSV reading. The rules checked here are those of RFC 4180 section 2 (Shafranovich 2005,
// "Common Format and MIME Type for Comma-Separated Values (CSV) Files", rules 1-7), plus the
// conventions of docs/formats.md ("CSV conventions": BOM, # comments, '.' decimals), which are
// common practice rather than part of the RFC.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "safesite/error.hpp"
#include "safesite/io/csv_table.hpp"

using safesite::DataError;
using safesite::io::CsvTable;

TEST_CASE("RFC 4180 rule 1-2: LF records, last line with or without a line break", "[io][unit]") {
    const auto a = CsvTable::parse("a,b\n1,2\n3,4\n", "f.csv");
    const auto b = CsvTable::parse("a,b\n1,2\n3,4", "f.csv");
    for (const auto* t : {&a, &b}) {
        REQUIRE(t->rows() == 2);
        REQUIRE(t->columns() == 2);
        CHECK(t->header()[1] == "b");
        CHECK(t->cell(1, 0) == "3");
        CHECK(t->cell(1, 1) == "4");
        CHECK(t->line(1) == 3);
    }
}

TEST_CASE("RFC 4180 rule 2: CRLF line ends are not part of the data", "[io][unit]") {
    const auto t = CsvTable::parse("a,b\r\nx,y\r\n\"p\r\nq\",z\r\n", "f.csv");
    REQUIRE(t.rows() == 2);
    CHECK(t.header()[1] == "b");
    CHECK(t.cell(0, 1) == "y");
    // rule 6: the line break inside quotes is data, kept exactly (CR LF).
    CHECK(t.cell(1, 0) == "p\r\nq");
    CHECK(t.cell(1, 1) == "z");
    CHECK(t.line(1) == 3);
    CHECK(t.line(1, 1) == 4);  // the second field starts on the next physical line
}

TEST_CASE("RFC 4180 rules 5-7: quoted fields, embedded commas, newlines and doubled quotes",
          "[io][unit]") {
    const auto t = CsvTable::parse(
        "name,note,n\n"
        "\"Smith, J.\",\"said \"\"hello\"\"\",1\n"
        "\"two\nlines\",\"\",2\n"
        "plain,,3\n",
        "f.csv");
    REQUIRE(t.rows() == 3);
    CHECK(t.cell(0, 0) == "Smith, J.");
    CHECK(t.cell(0, 1) == "said \"hello\"");
    CHECK(t.cell(1, 0) == "two\nlines");
    CHECK(t.cell(1, 1).empty());
    CHECK(t.integer(1, 2) == 2);
    CHECK(t.line(2) == 5);  // the quoted newline moved the following row one line down
    CHECK(t.cell(2, 1).empty());
    CHECK_FALSE(t.optional_text(2, 1).has_value());
}

TEST_CASE("a UTF-8 byte-order mark is skipped and # comments before the header are ignored",
          "[io][unit]") {
    const auto t = CsvTable::parse(
        "\xEF\xBB\xBF# source: somewhere, table 1\n#   second comment\n\nplant,year\nA,2019\n",
        "f.csv");
    CHECK(t.header()[0] == "plant");  // no BOM bytes glued to the first name
    CHECK(t.header_line() == 4);
    REQUIRE(t.rows() == 1);
    CHECK(t.line(0) == 5);
    // After the header a '#' is ordinary data.
    const auto u = CsvTable::parse("a\n#1\n", "f.csv");
    REQUIRE(u.rows() == 1);
    CHECK(u.cell(0, 0) == "#1");
}

TEST_CASE("malformed CSV is a DataError at the right line and field", "[io][unit]") {
    SECTION("ragged row") {
        try {
            CsvTable::parse("a,b,c\n1,2,3\n4,5\n", "r.csv");
            FAIL("no error");
        } catch (const DataError& e) {
            CHECK(e.file() == "r.csv");
            CHECK(e.line() == 3);
        }
        CHECK_THROWS_AS(CsvTable::parse("a,b\n1,2,3\n", "r.csv"), DataError);
    }
    SECTION("unterminated quote reports the line where the field starts") {
        try {
            CsvTable::parse("a,b\n1,\"open\n\n", "q.csv");
            FAIL("no error");
        } catch (const DataError& e) {
            CHECK(e.line() == 2);
            CHECK(e.column() == 2);
        }
    }
    SECTION("stray quotes") {
        CHECK_THROWS_AS(CsvTable::parse("a,b\n1,ab\"c\n", "q.csv"), DataError);
        CHECK_THROWS_AS(CsvTable::parse("a,b\n1,\"ab\"c\n", "q.csv"), DataError);
    }
    SECTION("header problems") {
        CHECK_THROWS_AS(CsvTable::parse("", "e.csv"), DataError);
        CHECK_THROWS_AS(CsvTable::parse("# only a comment\n", "e.csv"), DataError);
        try {
            CsvTable::parse("a,b,a\n1,2,3\n", "d.csv");
            FAIL("no error");
        } catch (const DataError& e) {
            CHECK(e.line() == 1);
            CHECK(e.column() == 3);
            CHECK(e.key() == "a");
        }
    }
}

TEST_CASE("typed access converts cells and locates bad values", "[io][unit]") {
    const auto t = CsvTable::parse(
        "# comment\nplant,size,seeds,flowered\n"
        "A, 2.5 ,12,1\n"
        "B,\"12,3\",,0\n"
        "C,1e400,1.5,2\n",
        "census.csv");
    const std::size_t size = t.require("size");
    const std::size_t seeds = t.require("seeds");
    const std::size_t flowered = t.require("flowered");
    CHECK(t.real(0, size) == 2.5);  // surrounding spaces allowed for numbers
    CHECK(t.integer(0, seeds) == 12);
    CHECK(t.flag(0, flowered));
    CHECK_FALSE(t.flag(1, flowered));
    CHECK_FALSE(t.optional_integer(1, seeds).has_value());
    CHECK(t.optional_integer(0, seeds).value() == 12);

    // The example of the style guide, section 4.7.
    try {
        (void)t.real(1, size);
        FAIL("no error");
    } catch (const DataError& e) {
        CHECK(e.file() == "census.csv");
        CHECK(e.line() == 4);
        CHECK(e.column() == 2);
        CHECK(e.key() == "size");
        CHECK(std::string(e.what()) ==
              "census.csv:4:2: size \"12,3\" is not a number; expected a decimal with '.'");
    }
    CHECK_THROWS_AS(t.real(2, size), DataError);      // out of range
    CHECK_THROWS_AS(t.integer(2, seeds), DataError);  // not whole
    CHECK_THROWS_AS(t.integer(1, seeds), DataError);  // empty but required
    CHECK_THROWS_AS(t.flag(2, flowered), DataError);  // 2 is not a flag
    CHECK_THROWS_AS(t.text(1, seeds), DataError);
    try {
        (void)t.flag(2, flowered);
    } catch (const DataError& e) {
        CHECK(e.line() == 5);
        CHECK(e.column() == 4);
        CHECK(e.key() == "flowered");
    }
    const auto nan = CsvTable::parse("x\nnan\ninf\n-0.5\n", "n.csv");
    CHECK_THROWS_AS(nan.real(0, 0), DataError);
    CHECK_THROWS_AS(nan.real(1, 0), DataError);
    CHECK(nan.real(2, 0) == -0.5);
}

TEST_CASE("header lookup maps our names to the file's and lists the header when missing",
          "[io][unit]") {
    const auto t = CsvTable::parse("tag,rosette_cm\nA,1\n", "c.csv");
    const safesite::io::ColumnMap map{{"plant", "tag"}, {"size", "rosette_cm"}};
    CHECK(t.require("plant", map) == 0);
    CHECK(t.require("size", map) == 1);
    CHECK_FALSE(t.locate("status", map).has_value());
    try {
        (void)t.require("status", map);
        FAIL("no error");
    } catch (const DataError& e) {
        CHECK(e.line() == 1);
        CHECK(e.key() == "status");
        CHECK(e.reason().find("tag, rosette_cm") != std::string::npos);
    }
}
