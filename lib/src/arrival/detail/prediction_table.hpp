#pragma once
// Building prediction tables for fitted arrival models (private to lib/src/arrival).

#include <algorithm>
#include <string>
#include <vector>

#include "safesite/error.hpp"
#include "safesite/stats/design_spec.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::arrival::detail {

/// Add a categorical column to a prediction table. When the fitted formula uses the column,
/// its levels are the training levels and a value outside them is a UsageError naming the
/// experiment ("form \"moss\" does not occur in the trapping trials"); otherwise the column is
/// informational and its levels are the values themselves.
inline void add_factor(stats::Table& table, const stats::DesignSpec& spec,
                       const std::string& column, std::vector<std::string> values,
                       const std::string& experiment) {
    const auto used = spec.predictor_columns();
    if (std::find(used.begin(), used.end(), column) == used.end()) {
        table.add_categorical(column, std::move(values));
        return;
    }
    std::vector<std::string> levels = spec.levels(column);
    for (const auto& v : values)
        if (std::find(levels.begin(), levels.end(), v) == levels.end())
            throw UsageError(column + " \"" + v + "\" does not occur in the " + experiment +
                             "; no estimate for it");
    table.add_categorical(column, std::move(values), std::move(levels));
}

}  // namespace safesite::arrival::detail
