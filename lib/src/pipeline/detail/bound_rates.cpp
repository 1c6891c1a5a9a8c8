#include "pipeline/detail/bound_rates.hpp"

#include <cmath>
#include <numeric>
#include <vector>

#include "safesite/stats/formula.hpp"
#include "safesite/stats/grouping_factor.hpp"

namespace safesite::pipeline::detail {

namespace {

std::vector<std::size_t> all_rows(const stats::Table& t) {
    std::vector<std::size_t> rows(t.rows());
    std::iota(rows.begin(), rows.end(), std::size_t{0});
    return rows;
}

}  // namespace

TablePrediction glm_mean(stats::DesignSpec design, Eigen::VectorXd beta, stats::Link link,
                         std::map<std::string, double> shift) {
    return [design = std::move(design), beta = std::move(beta), link,
            shift = std::move(shift)](const stats::Table& table) {
        const auto rows = all_rows(table);
        Eigen::VectorXd eta = design.model_matrix(table, rows) * beta + design.offset(table, rows);
        if (!shift.empty() && table.has("year")) {
            const auto& year = table.categorical("year").values;
            for (std::size_t i = 0; i < rows.size(); ++i) {
                const auto it = shift.find(year[i]);
                if (it != shift.end()) eta[static_cast<Eigen::Index>(i)] += it->second;
            }
        }
        for (Eigen::Index i = 0; i < eta.size(); ++i) eta[i] = stats::inverse_link(link, eta[i]);
        return eta;
    };
}

TablePrediction mixed_mean(stats::DesignSpec design, stats::MixedFit fit,
                           std::string slope_column) {
    return [design = std::move(design), fit = std::move(fit),
            slope_column = std::move(slope_column)](const stats::Table& table) {
        const auto rows = all_rows(table);
        const Eigen::MatrixXd X = design.model_matrix(table, rows);
        const Eigen::VectorXd offset = design.offset(table, rows);
        // The year factor of the new rows, matched to the fitted levels by label.
        stats::GroupingFactor year;
        year.name = "year";
        const auto& labels = table.categorical("year").values;
        for (const auto& label : labels) {
            std::size_t k = 0;
            while (k < year.level_names.size() && year.level_names[k] != label) ++k;
            if (k == year.level_names.size()) year.level_names.push_back(label);
            year.level.push_back(static_cast<int>(k));
        }
        if (!slope_column.empty()) {
            const auto& x = table.numeric(slope_column);
            year.slope = Eigen::Map<const Eigen::VectorXd>(x.data(),
                                                           static_cast<Eigen::Index>(x.size()));
            year.slope_name = slope_column;
        }
        return fit.inverse_link(fit.linear_predictor(X, offset, {year}, true));
    };
}

TablePrediction constant_sd(double sd) {
    return [sd](const stats::Table& table) {
        return Eigen::VectorXd::Constant(static_cast<Eigen::Index>(table.rows()), sd);
    };
}

TablePrediction spread_sd(std::string spread, double gamma0, double gamma1) {
    // x is built as the single column of the one-sided formula `~ <spread> - 1`; a column,
    // log() or pow() learns no constants, so learning on the prediction table is exact.
    const stats::Formula formula = stats::parse_formula("~ " + spread + " - 1", spread);
    return [formula, gamma0, gamma1](const stats::Table& table) {
        const auto rows = all_rows(table);
        const stats::DesignSpec design = stats::DesignSpec::learn(formula, table, rows);
        const Eigen::VectorXd x = design.model_matrix(table, rows).col(0);
        return Eigen::VectorXd((gamma0 + gamma1 * x.array()).exp());
    };
}

}  // namespace safesite::pipeline::detail
