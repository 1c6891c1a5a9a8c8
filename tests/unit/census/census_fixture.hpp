#pragma once
// A small invented census shared by the census tests. Line numbers in the file are given
// beside each row (the header is line 1).
#include <string>

#include "safesite/census/census.hpp"
#include "safesite/io/csv_table.hpp"

namespace census_fixture {

inline const std::string k_header = "plant,year,plot,microsite,size,status,flowered,seeds,seedling\n";
inline const std::string k_rows =
    "A,2018,P1,gravel,2.0,alive,0,,0\n"      // line 2
    "A,2019,P1,gravel,3.0,alive,1,12,0\n"    // line 3
    "A,2020,P1,gravel,,dead,,,0\n"           // line 4
    "B,2018,P1,cushion,1.0,alive,0,,0\n"     // line 5
    "B,2019,P1,cushion,,notfound,,,0\n"      // line 6
    "B,2020,P1,cushion,1.5,alive,1,,0\n"     // line 7
    "C,2019,P1,cushion,0.5,alive,0,,1\n"     // line 8
    "C,2020,P1,cushion,0.8,alive,0,,0\n"     // line 9
    "D,2018,P2,gravel,4.0,alive,1,20,0\n"    // line 10
    "D,2019,P2,gravel,4.5,alive,1,30,0\n"    // line 11
    "D,2020,P2,gravel,5.0,alive,0,0,0\n"     // line 12
    "E,2020,P2,cushion,0.3,alive,0,,1\n";    // line 13

inline safesite::census::CensusOptions options(
    safesite::census::SizeTransform t = safesite::census::SizeTransform::log) {
    safesite::census::CensusOptions o;
    o.transform = t;
    o.microsites = {"gravel", "cushion"};
    return o;
}

inline safesite::census::Census read(const std::string& text,
                                     safesite::census::CensusOptions o = options()) {
    return safesite::census::read_census(safesite::io::CsvTable::parse(text, "census.csv"),
                                         std::move(o));
}

/// Replace the first occurrence of `from` (which must exist) by `to`.
inline std::string edit(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    if (at == std::string::npos) throw std::logic_error("fixture edit not found: " + from);
    return text.replace(at, from.size(), to);
}

inline std::string base() { return k_header + k_rows; }

}  // namespace census_fixture
