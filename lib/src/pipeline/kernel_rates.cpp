#include "safesite/pipeline/kernel_rates.hpp"

#include <algorithm>

namespace safesite::pipeline {

stats::Table covariate_table(const KernelLayout& layout, const Eigen::VectorXd& sizes,
                             std::size_t microsite, bool seedling, const std::string& year) {
    const auto n = static_cast<std::size_t>(sizes.size());
    stats::Table table;
    table.add_numeric("size", std::vector<double>(sizes.data(), sizes.data() + n));
    table.add_categorical("microsite",
                          std::vector<std::string>(n, layout.microsites.at(microsite)),
                          layout.microsites);
    table.add_numeric("seedling", std::vector<double>(n, seedling ? 1.0 : 0.0));
    std::vector<std::string> years = layout.year_levels;
    if (std::find(years.begin(), years.end(), year) == years.end()) years.push_back(year);
    table.add_categorical("year", std::vector<std::string>(n, year), years);
    return table;
}

namespace {
TablePrediction pinned(TablePrediction f, const std::string& label) {
    if (!f) return f;
    return [f = std::move(f), label](const stats::Table& table) {
        stats::Table at = table;
        std::vector<std::string> levels = table.categorical("year").levels;
        if (std::find(levels.begin(), levels.end(), label) == levels.end())
            levels.push_back(label);
        at.add_categorical("year", std::vector<std::string>(table.rows(), label), levels);
        return f(at);
    };
}
}  // namespace

BoundRate pin_year(const BoundRate& rate, const std::string& label) {
    return {pinned(rate.mean, label), pinned(rate.sd, label)};
}

}  // namespace safesite::pipeline
