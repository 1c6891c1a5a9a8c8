#pragma once
// Helpers shared by the design-matrix sources. Private to lib/src/stats.

#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/formula.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::stats::detail {

/// Values of a numeric expression on the given rows (NaN propagates). Throws DataError for
/// log of a value ≤ 0; `key` names the formula in the message.
Eigen::VectorXd evaluate(const NumExpr& e, const Table& data, const std::vector<std::size_t>& rows,
                         const std::string& key);

/// True when `column` is missing (NaN or empty label) in `row`.
bool row_missing(const Table& data, const std::string& column, std::size_t row);

}  // namespace safesite::stats::detail
