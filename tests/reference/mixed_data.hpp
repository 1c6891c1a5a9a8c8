#pragma once
// Test helper: reads the small comma-separated reference files of tests/data (header line
// after the '#' source comments, plain unquoted fields) into named string columns.
#include <algorithm>
#include <fstream>
#include <map>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "safesite/stats/grouping_factor.hpp"
#include "safesite/stats/table.hpp"

namespace mixed_test {

using Columns = std::map<std::string, std::vector<std::string>>;

inline std::vector<std::string> split(const std::string& line) {
    std::vector<std::string> out;
    std::stringstream ss(line);
    std::string field;
    while (std::getline(ss, field, ',')) {
        if (!field.empty() && field.back() == '\r') field.pop_back();
        out.push_back(field);
    }
    return out;
}

inline Columns read_columns(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw std::runtime_error("cannot open " + path);
    std::string line;
    std::vector<std::string> header;
    Columns cols;
    while (std::getline(in, line)) {
        if (line.empty() || line[0] == '#') continue;
        const auto fields = split(line);
        if (header.empty()) {
            header = fields;
            continue;
        }
        for (std::size_t j = 0; j < header.size(); ++j) cols[header[j]].push_back(fields.at(j));
    }
    return cols;
}

inline Eigen::VectorXd numbers(const std::vector<std::string>& v) {
    Eigen::VectorXd out(static_cast<Eigen::Index>(v.size()));
    for (std::size_t i = 0; i < v.size(); ++i) out[static_cast<Eigen::Index>(i)] = std::stod(v[i]);
    return out;
}

/// A grouping factor from labels, levels in order of first appearance.
inline safesite::stats::GroupingFactor factor(const std::string& name,
                                              const std::vector<std::string>& labels) {
    safesite::stats::GroupingFactor g;
    g.name = name;
    std::map<std::string, int> index;
    for (const auto& l : labels) {
        auto it = index.find(l);
        if (it == index.end()) {
            it = index.emplace(l, static_cast<int>(g.level_names.size())).first;
            g.level_names.push_back(l);
        }
        g.level.push_back(it->second);
    }
    return g;
}

/// A Table with the named columns numeric and every other column categorical (levels sorted
/// as text, so "1" < "2" < … for the single-digit codes of these files).
inline safesite::stats::Table make_table(const Columns& cols, const std::vector<std::string>& numeric) {
    safesite::stats::Table t;
    for (const auto& [name, values] : cols) {
        if (std::find(numeric.begin(), numeric.end(), name) != numeric.end()) {
            std::vector<double> v;
            for (const auto& s : values) v.push_back(std::stod(s));
            t.add_numeric(name, v);
        } else {
            t.add_categorical(name, values);
        }
    }
    return t;
}

}  // namespace mixed_test
