#include "stats/detail/group_labels.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "safesite/error.hpp"

namespace safesite::stats::detail {

namespace {
// A numeric level as text: integers without a decimal point (year 2019 → "2019").
std::string format_level(double v) {
    char buf[32];
    if (v == std::floor(v) && std::abs(v) < 1e15)
        std::snprintf(buf, sizeof buf, "%.0f", v);
    else
        std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}
}  // namespace

std::string group_label(const Table& data, const std::string& name, std::size_t row) {
    if (data.is_categorical(name)) return data.categorical(name).values[row];
    const double v = data.numeric(name)[row];
    return std::isnan(v) ? std::string() : format_level(v);
}

GroupingFactor grouping_factor(const Table& data, const std::string& name,
                               const std::vector<std::size_t>& rows) {
    if (!data.has(name)) throw UsageError("grouping column '" + name + "' is not in the data");
    GroupingFactor g;
    g.name = name;
    std::vector<std::string> labels;
    labels.reserve(rows.size());
    for (std::size_t r : rows) labels.push_back(group_label(data, name, r));
    // Level order: the column's level list (categorical) or numeric order (numeric).
    std::vector<std::string> order;
    if (data.is_categorical(name)) {
        order = data.categorical(name).levels;
    } else {
        std::vector<double> values;
        for (std::size_t r : rows) values.push_back(data.numeric(name)[r]);
        std::sort(values.begin(), values.end());
        values.erase(std::unique(values.begin(), values.end()), values.end());
        for (double v : values) order.push_back(format_level(v));
    }
    std::map<std::string, bool> present;
    for (const auto& l : labels) present[l] = true;
    std::map<std::string, int> index;
    for (const auto& l : order) {
        if (present.count(l) == 0 || index.count(l) > 0) continue;
        index[l] = static_cast<int>(g.level_names.size());
        g.level_names.push_back(l);
    }
    g.level.reserve(labels.size());
    for (const auto& l : labels) {
        auto it = index.find(l);
        if (it == index.end())
            throw UsageError("grouping column '" + name + "': value '" + l + "' is not a level");
        g.level.push_back(it->second);
    }
    return g;
}

}  // namespace safesite::stats::detail
