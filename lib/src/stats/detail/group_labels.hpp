#pragma once
/// \file group_labels.hpp
/// (private) Grouping factors from table columns: the level label of every row of a
/// categorical or numeric column, and the factor over a subset of rows.

#include <cstddef>
#include <string>
#include <vector>

#include "safesite/stats/grouping_factor.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::stats::detail {

/// Label of `row` in column `name`: the category, or the number written without a trailing
/// ".0" for integers (a year 2019 is "2019"); "" for a missing value.
std::string group_label(const Table& data, const std::string& name, std::size_t row);

/// The grouping factor of column `name` over `rows`, levels ordered as the column's levels
/// (categorical) or numerically (numeric), keeping only levels present in `rows`.
/// Throws UsageError when the column is absent.
GroupingFactor grouping_factor(const Table& data, const std::string& name,
                               const std::vector<std::size_t>& rows);

}  // namespace safesite::stats::detail
