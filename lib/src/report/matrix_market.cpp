// Matrix Market coordinate files (Boisvert, Pozo & Remington 1996; the format as published by
// NIST, from memory: banner line, '%' comments, "M N L" size line, L lines "I J A(I,J)" with
// 1-based indices).
#include "safesite/report/matrix_market.hpp"

#include <cmath>
#include <cstdio>
#include <utility>

#include "safesite/error.hpp"

namespace safesite::report {

MatrixMarketText to_matrix_market(const Eigen::MatrixXd& matrix,
                                  const std::vector<std::string>& comments) {
    if (!matrix.allFinite()) throw UsageError("Matrix Market: the matrix has a non-finite entry");
    for (const auto& c : comments)
        if (c.find_first_of("\r\n") != std::string::npos)
            throw UsageError("Matrix Market: a comment must be one line");
    const double largest = matrix.size() > 0 ? matrix.cwiseAbs().maxCoeff() : 0.0;
    const double threshold = matrix_market_relative_threshold * largest;
    std::string body;
    long long entries = 0;
    char line[96];
    for (Eigen::Index j = 0; j < matrix.cols(); ++j)
        for (Eigen::Index i = 0; i < matrix.rows(); ++i) {
            const double a = matrix(i, j);
            if (!(std::abs(a) > threshold)) continue;
            std::snprintf(line, sizeof line, "%lld %lld %.17g\n", static_cast<long long>(i + 1),
                          static_cast<long long>(j + 1), a);
            body += line;
            ++entries;
        }
    std::string out = "%%MatrixMarket matrix coordinate real general\n";
    for (const auto& c : comments) out += "% " + c + "\n";
    std::snprintf(line, sizeof line, "%lld %lld %lld\n", static_cast<long long>(matrix.rows()),
                  static_cast<long long>(matrix.cols()), entries);
    out += line;
    out += body;
    return {std::move(out), static_cast<std::size_t>(entries)};
}

}  // namespace safesite::report
