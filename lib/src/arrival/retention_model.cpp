// The retention (departure hazard) model: grouped-time survival with a cloglog link and
// offset log(interval length) (docs/methods/arrival.md, "The retention model").
//
// References: Prentice & Gloeckler (1978); Kalbfleisch & Prentice (2002), grouped data;
// Allison (1982).
#include "safesite/arrival/retention_model.hpp"

#include <cmath>

#include <boost/math/distributions/normal.hpp>

#include "arrival/detail/prediction_table.hpp"
#include "safesite/error.hpp"

namespace safesite::arrival {

std::string retention_formula_with_offset(const std::string& formula) {
    if (formula.find("offset(") != std::string::npos) return formula;
    return formula + " + offset(log(interval_days))";
}

BinomialFit fit_retention(const stats::Table& intervals, const std::string& formula,
                          const std::vector<std::string>& groups) {
    return fit_binomial(intervals, retention_formula_with_offset(formula), stats::Link::cloglog,
                        groups);
}

std::vector<HazardEstimate> hazard_table(const BinomialFit& fit,
                                         const std::vector<std::string>& microsites,
                                         const std::vector<std::string>& seed_types,
                                         double level) {
    if (!(level > 0.0 && level < 1.0))
        throw UsageError("hazard table: confidence level must be in (0, 1)");
    std::vector<std::string> micro, type;
    for (const auto& m : microsites)
        for (const auto& s : seed_types) {
            micro.push_back(m);
            type.push_back(s);
        }
    // One row per cell with Δ = 1 day: the offset log Δ is 0, so η = xᵀβ̂ = log ĥ per day.
    stats::Table table;
    detail::add_factor(table, fit.spec, "microsite", micro, "retention checks");
    detail::add_factor(table, fit.spec, "seed_type", type, "retention checks");
    table.add_numeric("interval_days", std::vector<double>(micro.size(), 1.0));
    const Eigen::VectorXd eta = fit.linear_predictor(table);
    const Eigen::VectorXd se = fit.linear_predictor_se(table);
    const double z = boost::math::quantile(boost::math::normal(), 0.5 + level / 2.0);
    std::vector<HazardEstimate> out;
    for (std::size_t i = 0; i < micro.size(); ++i) {
        const auto k = static_cast<Eigen::Index>(i);
        HazardEstimate h;
        h.microsite = micro[i];
        h.seed_type = type[i];
        h.hazard_per_day = std::exp(eta[k]);
        h.log_hazard_se = se[k];
        h.lower = std::exp(eta[k] - z * se[k]);
        h.upper = std::exp(eta[k] + z * se[k]);
        out.push_back(h);
    }
    return out;
}

Eigen::VectorXd retention_curve(double hazard_per_day, const Eigen::VectorXd& days) {
    if (!(hazard_per_day >= 0.0 && std::isfinite(hazard_per_day)))
        throw UsageError("retention curve: hazard must be finite and ≥ 0 per day");
    if ((days.array() < 0.0).any())
        throw UsageError("retention curve: days must be ≥ 0");
    return (-hazard_per_day * days.array()).exp().matrix();
}

}  // namespace safesite::arrival
