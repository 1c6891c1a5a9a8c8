#include "pipeline/detail/bound_rates.hpp"

#include <cmath>
#include <numeric>
#include <vector>

#include "safesite/stats/grouping_factor.hpp"

namespace safesite::pipeline::detail {

namespace {

std::vector<std::size_t> all_rows(const stats::Table& t) {
    std::vector<std::size_t> rows(t.rows());
    std::iota(rows.begin(), rows.end(), std::size_t{0});
    return rows;
}

}  // namespace

BoundRate glm_rate(const stats::GlmFit& fit, std::map<std::string, double> shift) {
    BoundRate out;
    if (shift.empty()) {
        out.mean = [fit](const stats::Table& table) { return fit.predict(table); };
    } else {
        out.mean = [fit, shift = std::move(shift)](const stats::Table& table) {
            Eigen::VectorXd eta = fit.predict(table, stats::Scale::link);
            const auto& year = table.categorical("year").values;
            for (std::size_t i = 0; i < year.size(); ++i) {
                const auto it = shift.find(year[i]);
                if (it != shift.end()) eta[static_cast<Eigen::Index>(i)] += it->second;
            }
            for (Eigen::Index i = 0; i < eta.size(); ++i)
                eta[i] = stats::inverse_link(fit.link, eta[i]);
            return eta;
        };
    }
    if (fit.family == stats::Family::gaussian || fit.family == stats::Family::gaussian_spread)
        out.sd = [fit](const stats::Table& table) { return fit.sd(table); };
    return out;
}

TablePrediction mixed_mean(stats::DesignSpec design, stats::MixedFit fit, bool year_effects,
                           std::string slope_column) {
    return [design = std::move(design), fit = std::move(fit), year_effects,
            slope_column = std::move(slope_column)](const stats::Table& table) {
        const auto rows = all_rows(table);
        const Eigen::MatrixXd X = design.model_matrix(table, rows);
        const Eigen::VectorXd offset = design.offset(table, rows);
        if (!year_effects) return fit.inverse_link(fit.linear_predictor(X, offset, {}, false));
        // The year factor of the new rows, matched to the fitted levels by label.
        stats::GroupingFactor year;
        year.name = "year";
        for (const auto& label : table.categorical("year").values) {
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

}  // namespace safesite::pipeline::detail
