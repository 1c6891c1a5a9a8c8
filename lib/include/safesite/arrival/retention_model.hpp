#pragma once
/// \file retention_model.hpp
/// The retention (departure hazard) model: grouped-time survival. Each at-risk interval of Δ
/// days is a binomial trial "left during the interval" with a complementary log-log link and
/// offset log Δ. With a constant daily hazard h, P(left) = 1 − exp(−hΔ), so
/// \f[ \log(-\log(1 - P)) = \log h + \log\Delta = x^\top\beta + \log\Delta , \f]
/// and h = exp(xᵀβ) is a daily hazard comparable across unequal intervals (Prentice &
/// Gloeckler 1978; Kalbfleisch & Prentice 2002, grouped data; Allison 1982).

#include <string>
#include <vector>

#include <Eigen/Core>

#include "safesite/arrival/binomial_fit.hpp"
#include "safesite/stats/table.hpp"

namespace safesite::arrival {

/// The default retention formula (model file key `[arrival] retention_formula`); the offset
/// is added by fit_retention.
inline constexpr const char* default_retention_formula = "left ~ microsite + seed_type";

/// The formula actually fitted: `formula` + " + offset(log(interval_days))" unless it already
/// has an offset() term.
std::string retention_formula_with_offset(const std::string& formula);

/// Fit the retention model to a table from interval_table(): binomial, cloglog link, offset
/// log(interval_days), random intercepts for `groups` (e.g. {"station"}). Throws as
/// fit_binomial.
BinomialFit fit_retention(const stats::Table& intervals,
                          const std::string& formula = default_retention_formula,
                          const std::vector<std::string>& groups = {});

/// A daily departure hazard with its Wald interval, for one microsite × seed type.
struct HazardEstimate {
    std::string microsite;
    std::string seed_type;
    double hazard_per_day = 0;   ///< ĥ = exp(xᵀβ̂), per day
    double lower = 0;            ///< exp(xᵀβ̂ − z·se)
    double upper = 0;            ///< exp(xᵀβ̂ + z·se)
    double log_hazard_se = 0;    ///< se of xᵀβ̂ (log scale)
};

/// ĥ for every microsite × seed type (microsites outer, seed types inner), with intervals at
/// confidence `level` (0 < level < 1; z = Φ⁻¹((1 + level)/2)). Random intercepts are at 0
/// (a typical station). A formula reading columns other than microsite, seed_type and
/// interval_days throws stats::FormulaError; a level not in the data throws DataError.
std::vector<HazardEstimate> hazard_table(const BinomialFit& fit,
                                         const std::vector<std::string>& microsites,
                                         const std::vector<std::string>& seed_types,
                                         double level = 0.95);

/// Retention curve R(t) = exp(−h t) at the given days (h per day ≥ 0, t ≥ 0): the share of
/// seeds still in place t days after placement, without re-landing.
Eigen::VectorXd retention_curve(double hazard_per_day, const Eigen::VectorXd& days);

}  // namespace safesite::arrival
