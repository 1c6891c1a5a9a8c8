#include "safesite/stats/mixed_fit.hpp"

#include <cmath>
#include <limits>
#include <unordered_map>

#include "safesite/error.hpp"
#include "stats/detail/group_labels.hpp"

namespace safesite::stats {

namespace {
const GroupEffects& find_group(const MixedFit& fit, const std::string& group) {
    for (const GroupEffects& g : fit.random_effects)
        if (g.group == group) return g;
    std::string known;
    for (const GroupEffects& g : fit.random_effects) known += (known.empty() ? "" : ", ") + g.group;
    throw UsageError("the mixed model has no grouping factor '" + group + "' (it has: " + known + ")");
}

Eigen::Index find_term(const GroupEffects& g, const std::string& term) {
    for (std::size_t t = 0; t < g.terms.size(); ++t)
        if (g.terms[t] == term) return static_cast<Eigen::Index>(t);
    throw UsageError("grouping factor '" + g.group + "' has no random term '" + term + "'");
}
}  // namespace

double MixedFit::random_effect(const std::string& group, const std::string& level,
                               const std::string& term) const {
    const GroupEffects& g = find_group(*this, group);
    const Eigen::Index t = find_term(g, term);
    for (std::size_t j = 0; j < g.levels.size(); ++j)
        if (g.levels[j] == level) return g.modes(static_cast<Eigen::Index>(j), t);
    return 0.0;  // a level not seen in the fit: its expected effect is the population mean 0
}

Eigen::VectorXd MixedFit::linear_predictor(const Eigen::MatrixXd& X, const Eigen::VectorXd& offset,
                                           const std::vector<GroupingFactor>& groups,
                                           bool include_random) const {
    if (X.cols() != fixed.size())
        throw UsageError("prediction design has " + std::to_string(X.cols()) +
                         " columns; the model has " + std::to_string(fixed.size()));
    const Eigen::Index n = X.rows();
    if (offset.size() != 0 && offset.size() != n)
        throw UsageError("prediction offset has " + std::to_string(offset.size()) +
                         " values for " + std::to_string(n) + " rows");
    Eigen::VectorXd eta = X * fixed;
    if (offset.size() == n) eta += offset;
    if (!include_random) return eta;
    for (const GroupingFactor& g : groups) {
        const GroupEffects* fitted = nullptr;
        for (const GroupEffects& e : random_effects)
            if (e.group == g.name) fitted = &e;
        if (fitted == nullptr) continue;  // not a factor of this model
        if (g.level.size() != static_cast<std::size_t>(n))
            throw UsageError("grouping factor '" + g.name + "' has " +
                             std::to_string(g.level.size()) + " entries for " +
                             std::to_string(n) + " prediction rows");
        const bool slope = fitted->terms.size() == 2;
        if (slope && g.slope.size() != n)
            throw UsageError("prediction needs the random-slope covariate '" + fitted->terms[1] +
                             "' for every row");
        // Map the new factor's level labels onto the fitted levels (−1: unseen → effect 0).
        std::unordered_map<std::string, Eigen::Index> index;
        for (std::size_t j = 0; j < fitted->levels.size(); ++j)
            index.emplace(fitted->levels[j], static_cast<Eigen::Index>(j));
        std::vector<Eigen::Index> map(g.level_names.size(), -1);
        for (std::size_t j = 0; j < g.level_names.size(); ++j) {
            auto it = index.find(g.level_names[j]);
            if (it != index.end()) map[j] = it->second;
        }
        for (Eigen::Index i = 0; i < n; ++i) {
            const int lv = g.level[static_cast<std::size_t>(i)];
            if (lv < 0 || static_cast<std::size_t>(lv) >= map.size() || map[lv] < 0) continue;
            eta[i] += fitted->modes(map[lv], 0);
            if (slope) eta[i] += fitted->modes(map[lv], 1) * g.slope[i];
        }
    }
    return eta;
}

Eigen::VectorXd MixedFit::linear_predictor(const Table& newdata, bool include_random) const {
    if (!has_spec)
        throw UsageError("this mixed model was fitted without a formula; predict from a design "
                         "matrix with linear_predictor(X, offset, groups, include_random)");
    const std::vector<std::size_t> rows = spec.complete_rows(newdata, false);
    const Eigen::MatrixXd X = spec.model_matrix(newdata, rows);
    const Eigen::VectorXd off = spec.offset(newdata, rows);
    std::vector<GroupingFactor> groups;
    if (include_random) {
        for (const std::string& name : group_columns) {
            if (!newdata.has(name)) continue;  // absent: the average level, effect 0
            GroupingFactor g;
            g.name = name;
            std::unordered_map<std::string, int> index;
            for (std::size_t r : rows) {
                const std::string label = detail::group_label(newdata, name, r);
                auto it = index.find(label);
                if (it == index.end()) {
                    it = index.emplace(label, static_cast<int>(g.level_names.size())).first;
                    g.level_names.push_back(label);  // "" never matches a fitted level
                }
                g.level.push_back(it->second);
            }
            const GroupEffects& fitted = find_group(*this, name);
            if (fitted.terms.size() == 2) {
                if (!newdata.is_numeric(slope_column))
                    throw UsageError("prediction with random effects needs the random-slope "
                                     "column '" + slope_column + "'");
                const auto& x = newdata.numeric(slope_column);
                g.slope.resize(static_cast<Eigen::Index>(rows.size()));
                for (std::size_t i = 0; i < rows.size(); ++i)
                    g.slope[static_cast<Eigen::Index>(i)] = x[rows[i]];
            }
            groups.push_back(std::move(g));
        }
    }
    const Eigen::VectorXd eta = linear_predictor(X, off, groups, include_random);
    Eigen::VectorXd out = Eigen::VectorXd::Constant(static_cast<Eigen::Index>(newdata.rows()),
                                                    std::numeric_limits<double>::quiet_NaN());
    for (std::size_t i = 0; i < rows.size(); ++i)
        out[static_cast<Eigen::Index>(rows[i])] = eta[static_cast<Eigen::Index>(i)];
    return out;
}

Eigen::VectorXd MixedFit::predict(const Table& newdata, Scale scale, bool include_random) const {
    const Eigen::VectorXd eta = linear_predictor(newdata, include_random);
    return scale == Scale::link ? eta : inverse_link(eta);  // NaN rows stay NaN
}

Eigen::VectorXd MixedFit::inverse_link(const Eigen::VectorXd& eta) const {
    Eigen::VectorXd mu(eta.size());
    for (Eigen::Index i = 0; i < eta.size(); ++i) mu[i] = stats::inverse_link(link, eta[i]);
    return mu;
}

}  // namespace safesite::stats
