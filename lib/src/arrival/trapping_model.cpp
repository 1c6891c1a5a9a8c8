// The trapping model and the size-averaged trapping probability per form
// (docs/methods/arrival.md, "The trapping model").
#include "safesite/arrival/trapping_model.hpp"

#include <algorithm>
#include <cmath>

#include "arrival/detail/gauss_hermite.hpp"
#include "arrival/detail/prediction_table.hpp"
#include "safesite/error.hpp"

namespace safesite::arrival {
namespace {

double inverse_logit(double eta) {
    // Written to avoid overflow of exp for large |η|.
    if (eta >= 0.0) return 1.0 / (1.0 + std::exp(-eta));
    const double e = std::exp(eta);
    return e / (1.0 + e);
}

// 40 nodes: the logistic function is analytic in the strip |Im z| < π, so the Gauss–Hermite
// error decays geometrically in the node count; with 40 nodes it is far below 1e-10 for
// sd ≤ 3 (checked in the tests against a fine trapezoid rule).
constexpr int hermite_nodes = 40;

}  // namespace

BinomialFit fit_trapping(const stats::Table& trials, const std::string& formula,
                         const std::vector<std::string>& groups) {
    return fit_binomial(trials, formula, stats::Link::logit, groups);
}

double average_trapping(const Eigen::VectorXd& eta, double sd) {
    if (eta.size() == 0) throw UsageError("average_trapping: no neighbours to average over");
    if (!(sd >= 0.0 && std::isfinite(sd)))
        throw UsageError("average_trapping: random-intercept SD must be finite and ≥ 0");
    double total = 0.0;
    if (sd == 0.0) {
        for (Eigen::Index i = 0; i < eta.size(); ++i) total += inverse_logit(eta[i]);
        return total / static_cast<double>(eta.size());
    }
    static const detail::NormalRule rule = detail::normal_rule(hermite_nodes);
    for (Eigen::Index i = 0; i < eta.size(); ++i) {
        // E_b[logit⁻¹(η + b)], b = sd·Z, Z ~ N(0, 1).
        double e = 0.0;
        for (std::size_t k = 0; k < rule.nodes.size(); ++k)
            e += rule.weights[k] * inverse_logit(eta[i] + sd * rule.nodes[k]);
        total += e;
    }
    return total / static_cast<double>(eta.size());
}

std::map<std::string, double> trapping_by_form(
    const BinomialFit& fit, const std::string& seed_type,
    const std::map<std::string, std::vector<double>>& sizes_by_form) {
    std::map<std::string, double> out;
    for (const auto& [form, sizes] : sizes_by_form) {
        if (sizes.empty())
            throw UsageError("trapping: no neighbour sizes for form \"" + form + "\"");
        for (double z : sizes)
            if (!(z > 0.0 && std::isfinite(z)))
                throw UsageError("trapping: neighbour size of form \"" + form +
                                 "\" must be > 0 (raw scale)");
        const std::size_t n = sizes.size();
        stats::Table table;
        table.add_numeric("neighbour_size", sizes);
        detail::add_factor(table, fit.spec, "form", std::vector<std::string>(n, form),
                           "trapping trials");
        detail::add_factor(table, fit.spec, "seed_type", std::vector<std::string>(n, seed_type),
                           "trapping trials");
        out[form] = average_trapping(fit.linear_predictor(table), fit.total_group_sd());
    }
    return out;
}

}  // namespace safesite::arrival
