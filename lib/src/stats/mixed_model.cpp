// The formula front end of the mixed models: design from the formula (stats/design.hpp),
// grouping factors from the table columns named next to the formula, then fit_mixed_core.
#include "safesite/stats/mixed_model.hpp"

#include <set>

#include "safesite/error.hpp"
#include "safesite/stats/design.hpp"
#include "stats/detail/group_labels.hpp"

namespace safesite::stats {

MixedFit fit_mixed(const std::string& formula, const Table& data, const MixedOptions& options) {
    if (options.groups.empty())
        throw UsageError("a mixed model needs at least one grouping column (key `groups`)");
    std::set<std::string> seen;
    for (const auto& g : options.groups)
        if (!seen.insert(g).second)
            throw UsageError("grouping column '" + g + "' is named twice");
    const bool slope = !options.slope_column.empty();
    if (slope && seen.count(options.slope_group) == 0)
        throw UsageError("the random slope of '" + options.slope_column + "' is by '" +
                         options.slope_group + "', which is not one of the grouping columns");
    if (slope && !data.is_numeric(options.slope_column))
        throw UsageError("random-slope column '" + options.slope_column +
                         "' must be a numeric column of the data");
    for (const auto& g : options.groups)
        if (!data.has(g)) throw UsageError("grouping column '" + g + "' is not in the data");

    DesignOptions dopt;
    dopt.with_response = true;
    dopt.also_required = options.groups;
    if (slope) dopt.also_required.push_back(options.slope_column);
    const Design d = build_design(formula, data, dopt);

    std::vector<GroupingFactor> groups;
    for (const auto& name : options.groups) {
        GroupingFactor g = detail::grouping_factor(data, name, d.rows);
        if (slope && name == options.slope_group) {
            const auto& x = data.numeric(options.slope_column);
            g.slope.resize(static_cast<Eigen::Index>(d.rows.size()));
            for (std::size_t i = 0; i < d.rows.size(); ++i)
                g.slope[static_cast<Eigen::Index>(i)] = x[d.rows[i]];
            g.slope_name = options.slope_column;
        }
        groups.push_back(std::move(g));
    }
    MixedFit fit = fit_mixed_core(d.X, d.y, d.trials, d.offset, groups, options, d.column_names);
    fit.spec = d.spec;
    fit.has_spec = true;
    fit.group_columns = options.groups;
    fit.slope_column = slope ? options.slope_column : std::string();
    return fit;
}

}  // namespace safesite::stats
