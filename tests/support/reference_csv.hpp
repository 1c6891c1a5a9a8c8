#pragma once
// Test helper: read a reference CSV of tests/data (comment lines '#' before the header kept as
// the source record) into a stats::Table. Simple comma-separated files without quoting only:
// the reference datasets are written that way. Columns named in `categorical` become
// categorical columns (levels sorted), the others numeric (empty field = NaN).

#include <fstream>
#include <limits>
#include <set>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "safesite/stats/table.hpp"

namespace safesite::test {

inline std::vector<std::string> split_commas(const std::string& line) {
    std::vector<std::string> out;
    std::string field;
    std::istringstream in(line);
    while (std::getline(in, field, ',')) out.push_back(field);
    if (!line.empty() && line.back() == ',') out.emplace_back();
    return out;
}

inline stats::Table read_reference_csv(const std::string& path,
                                       const std::set<std::string>& categorical = {}) {
    std::ifstream in(path);
    if (!in) throw std::runtime_error("cannot open " + path);
    std::string line;
    std::vector<std::string> header;
    std::vector<std::vector<std::string>> cells;
    while (std::getline(in, line)) {
        if (!line.empty() && line.back() == '\r') line.pop_back();
        if (line.empty() || line[0] == '#') continue;
        if (header.empty()) {
            header = split_commas(line);
            cells.resize(header.size());
            continue;
        }
        auto f = split_commas(line);
        if (f.size() != header.size()) throw std::runtime_error("ragged row in " + path);
        for (std::size_t j = 0; j < f.size(); ++j) cells[j].push_back(f[j]);
    }
    stats::Table t;
    for (std::size_t j = 0; j < header.size(); ++j) {
        if (categorical.count(header[j])) {
            t.add_categorical(header[j], cells[j]);
        } else {
            std::vector<double> v;
            for (const auto& s : cells[j])
                v.push_back(s.empty() ? std::numeric_limits<double>::quiet_NaN() : std::stod(s));
            t.add_numeric(header[j], std::move(v));
        }
    }
    return t;
}

}  // namespace safesite::test
