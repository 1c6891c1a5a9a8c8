#pragma once
/// \file grouping_factor.hpp
/// One grouping factor of a mixed model: the level of every row, the level names, and an
/// optional numeric covariate whose slope varies between levels (a random slope).

#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::stats {

/// A grouping factor g with levels 0..L-1 and, optionally, a random slope of a covariate x.
///
/// Row i of the data contributes the random terms \f$ b_{g[i],0} + b_{g[i],1} x_i \f$ to the
/// linear predictor (the second term only when `slope` is given), where the level effects
/// \f$ b_j \f$ are independent draws from \f$ N(0, \Sigma_g) \f$ (docs/methods/mixed-models.md).
///
/// Admissible values: `level.size()` equals the number of data rows, every entry lies in
/// \f$ 0 \le \mathrm{level}[i] < \mathrm{level\_names.size()} \f$; `slope` is empty or has
/// one finite value per row. Violations are reported by the fitting functions as UsageError.
struct GroupingFactor {
    std::string name;                      ///< column name, e.g. "year" or "plant"
    std::vector<int> level;                ///< 0-based level index of every row
    std::vector<std::string> level_names;  ///< label of each level, in index order
    Eigen::VectorXd slope;                 ///< covariate with a random slope (empty: none)
    std::string slope_name;                ///< name of that covariate (used in output tables)

    /// True when this factor carries a random slope besides its random intercept.
    bool has_slope() const noexcept { return slope.size() > 0; }
};

}  // namespace safesite::stats
