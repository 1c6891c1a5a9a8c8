#include "safesite/stats/design.hpp"

#include <algorithm>

#include "stats/detail/design_detail.hpp"
#include "safesite/error.hpp"

namespace safesite::stats {

Design build_design(const Formula& formula, const Table& data, const DesignOptions& options) {
    // Types and names are checked by learning on no rows first; that also gives the columns
    // whose missing values drop a row.
    const DesignSpec probe = DesignSpec::learn_types(formula, data);
    const std::vector<std::size_t> rows =
        probe.complete_rows(data, options.with_response, options.also_required);
    if (rows.empty())
        throw UsageError("formula '" + formula.text + "': no row of the data has all of its "
                         "columns present (" + std::to_string(data.rows()) + " rows)");
    Design d;
    d.spec = DesignSpec::learn(formula, data, rows);
    d.rows = rows;
    d.dropped = data.rows() - rows.size();
    d.X = d.spec.model_matrix(data, rows);
    d.offset = d.spec.offset(data, rows);
    if (options.with_response && formula.has_response) {
        d.spec.response(data, rows, d.y, d.trials);
    } else {
        d.trials = Eigen::VectorXd::Ones(static_cast<Eigen::Index>(rows.size()));
    }
    d.column_names = d.spec.column_names();
    return d;
}

Design build_design(const std::string& formula, const Table& data, const DesignOptions& options) {
    return build_design(parse_formula(formula), data, options);
}

}  // namespace safesite::stats
