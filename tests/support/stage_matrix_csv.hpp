#pragma once
// Read a stage matrix from a reference CSV: '#' header lines (the source), one line of
// column names, then rows of numbers.
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::test {

inline Eigen::MatrixXd read_stage_matrix(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw std::runtime_error("cannot open " + path);
    std::string line;
    std::vector<std::vector<double>> rows;
    bool names_seen = false;
    while (std::getline(in, line)) {
        if (line.empty() || line[0] == '#') continue;
        if (!names_seen) {
            names_seen = true;
            continue;
        }
        std::vector<double> row;
        std::stringstream ss(line);
        std::string cell;
        while (std::getline(ss, cell, ',')) row.push_back(std::stod(cell));
        rows.push_back(row);
    }
    Eigen::MatrixXd m(static_cast<Eigen::Index>(rows.size()),
                      static_cast<Eigen::Index>(rows.empty() ? 0 : rows[0].size()));
    for (std::size_t i = 0; i < rows.size(); ++i)
        for (std::size_t j = 0; j < rows[i].size(); ++j)
            m(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = rows[i][j];
    return m;
}

}  // namespace safesite::test
