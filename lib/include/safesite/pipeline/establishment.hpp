#pragma once
/// \file establishment.hpp
/// Establishment probability per microsite estimated from the census (design.md §3;
/// docs/methods/pipeline.md, "Establishment").
///
/// With the stand closed to seed immigration (every recruit seen at t+1 comes from a seed
/// produced in the stand at t), the recruits R_{m,t+1} seen in microsite m are the seeds
/// S_t produced at t times the fraction a_m arriving in m times the establishment
/// probability e_m. The moment estimators are
///
/// \f[ \hat e_{m,t} = \frac{R_{m,t+1}}{S_t\,a_m}, \qquad
///     \hat e_m = \frac{\sum_t R_{m,t+1}}{a_m \sum_t S_t} \f]
///
/// (per year and pooled; the pooled estimator is the ratio of sums, not the mean of the
/// per-year ratios, so that years with few seeds weigh little). Duncan et al. (2009) Ecology
/// 90:2129 discuss recruitment as seeds × per-seed establishment; Ellner, Childs & Rees (2016)
/// §2.5 estimate the recruit fraction the same way.

#include <string>
#include <vector>

#include <Eigen/Core>

namespace safesite::pipeline {

/// The seeds produced in one census year t and the recruits seen at the next census t+1.
struct SeedsAndRecruits {
    std::string year;              ///< label of census year t (the transition t → t+1)
    double seeds_counted = 0.0;    ///< Σ observed seed counts of plants alive at t, ≥ 0
    double seeds_predicted = 0.0;  ///< Σ predicted counts for flowering plants without a count, ≥ 0
    std::vector<double> recruits;  ///< recruits seen at t+1, one per microsite, ≥ 0
};

/// One estimate: a census year t (or "pooled") and a microsite.
struct EstablishmentRow {
    std::string year;            ///< year label t, or "pooled"
    std::string microsite;       ///< microsite label
    double seeds = 0.0;          ///< S_t (pooled: Σ_t S_t), seeds per stand
    double arrival = 0.0;        ///< a_m, fraction of seeds reaching m (0 ≤ a_m ≤ 1)
    double recruits = 0.0;       ///< R_{m,t+1} (pooled: Σ_t R_{m,t+1})
    double establishment = 0.0;  ///< ê = R / (S·a); NaN when S·a = 0
};

/// All estimates, by year and pooled, with the warnings met on the way.
struct EstablishmentEstimate {
    std::vector<std::string> microsites;
    std::vector<std::string> years;        ///< year labels t in input order
    std::vector<Eigen::VectorXd> by_year;  ///< ê_{·,t} per year (NaN where S_t a_m = 0)
    Eigen::VectorXd pooled;                ///< ê_m pooled over years
    std::vector<EstablishmentRow> rows;    ///< long form: every year × microsite, then pooled
    std::vector<std::string> warnings;     ///< estimates above 1, undefined estimates

    /// The estimate to build the kernel of year `year` with: that year's ê, with the pooled
    /// value where that year's is undefined. Throws UsageError for an unknown year.
    Eigen::VectorXd for_year(const std::string& year) const;
};

/// Estimate establishment per microsite, per year and pooled.
///
/// \param data       one entry per census transition t → t+1 (at least one); each
///                   `recruits` has one entry per microsite
/// \param microsites microsite labels (M ≥ 1)
/// \param arrival    arrival fractions a (size M, 0 ≤ a_m ≤ 1)
/// \throws UsageError on mismatched sizes or negative inputs; NumericalError when a pooled
///         estimate is undefined (no seeds ever reach a microsite in which recruits are seen,
///         or no seeds at all).
EstablishmentEstimate estimate_establishment(const std::vector<SeedsAndRecruits>& data,
                                             const std::vector<std::string>& microsites,
                                             const Eigen::VectorXd& arrival);

}  // namespace safesite::pipeline
