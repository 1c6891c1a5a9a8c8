#pragma once
/// \file design.hpp
/// A design: the model matrix, response, binomial trials and offsets of a formula on a table,
/// built once per fit, with the DesignSpec that rebuilds the same columns for new data.

#include <cstddef>
#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/formula.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::stats {

/// Model matrix and response of a formula on the complete rows of a table.
struct Design {
    Eigen::MatrixXd X;                      ///< n × p model matrix
    Eigen::VectorXd y;                      ///< response (successes for `s / n`)
    Eigen::VectorXd trials;                 ///< binomial trials; 1 for 0/1 or non-binomial data
    Eigen::VectorXd offset;                 ///< sum of offset() terms; zeros when none
    std::vector<std::string> column_names;  ///< p names (docs/formats.md)
    std::vector<std::size_t> rows;          ///< indices of the table rows used (n of them)
    std::size_t dropped = 0;                ///< rows left out for a missing value
    DesignSpec spec;                        ///< rebuilds the columns for new data
};

/// Options of build_design.
struct DesignOptions {
    bool with_response = true;              ///< read the response (false: model matrix only)
    std::vector<std::string> also_required; ///< extra columns whose missing values drop rows
                                            ///< (e.g. grouping factors of a mixed model)
};

/// Build the design of `formula` on `data`: rows with a missing value in any used column are
/// dropped (counted in `dropped`), the constants are learned from the remaining rows and the
/// matrices are filled. Throws FormulaError (unknown column, wrong type; position in the
/// formula), DataError (log of a value ≤ 0, too few distinct values for a spline) and
/// UsageError when no complete row is left.
Design build_design(const Formula& formula, const Table& data, const DesignOptions& options = {});
/// Same, parsing the formula first.
Design build_design(const std::string& formula, const Table& data,
                    const DesignOptions& options = {});

}  // namespace safesite::stats
