#include "safesite/pipeline/establishment.hpp"

#include <cmath>
#include <cstdio>
#include <limits>

#include "core/number_text.hpp"
#include "safesite/error.hpp"

namespace safesite::pipeline {

namespace {

constexpr double k_nan = std::numeric_limits<double>::quiet_NaN();

std::string fmt_number(double x) { return core::number_text(x, 4); }

}  // namespace

Eigen::VectorXd EstablishmentEstimate::for_year(const std::string& year) const {
    for (std::size_t t = 0; t < years.size(); ++t) {
        if (years[t] != year) continue;
        Eigen::VectorXd e = by_year[t];
        for (Eigen::Index m = 0; m < e.size(); ++m)
            if (!std::isfinite(e[m])) e[m] = pooled[m];
        return e;
    }
    throw UsageError("establishment: no estimate for year '" + year + "'");
}

EstablishmentEstimate estimate_establishment(const std::vector<SeedsAndRecruits>& data,
                                             const std::vector<std::string>& microsites,
                                             const Eigen::VectorXd& arrival) {
    const auto n_sites = static_cast<Eigen::Index>(microsites.size());
    if (n_sites == 0) throw UsageError("establishment: no microsites");
    if (arrival.size() != n_sites)
        throw UsageError("establishment: " + std::to_string(arrival.size()) +
                         " arrival fractions for " + std::to_string(n_sites) + " microsites");
    if (data.empty()) throw UsageError("establishment: no census transitions");
    for (Eigen::Index m = 0; m < n_sites; ++m)
        if (!(arrival[m] >= 0.0 && arrival[m] <= 1.0))
            throw UsageError("establishment: arrival fraction of '" + microsites[m] + "' is " +
                             fmt_number(arrival[m]) + "; expected 0 <= a <= 1");

    EstablishmentEstimate out;
    out.microsites = microsites;
    Eigen::VectorXd recruits_total = Eigen::VectorXd::Zero(n_sites);
    double seeds_total = 0.0;

    for (const auto& year : data) {
        if (static_cast<Eigen::Index>(year.recruits.size()) != n_sites)
            throw UsageError("establishment: year " + year.year + " has " +
                             std::to_string(year.recruits.size()) + " recruit counts for " +
                             std::to_string(n_sites) + " microsites");
        if (!(year.seeds_counted >= 0.0) || !(year.seeds_predicted >= 0.0))
            throw UsageError("establishment: year " + year.year + " has negative seed numbers");
        const double seeds = year.seeds_counted + year.seeds_predicted;
        seeds_total += seeds;
        Eigen::VectorXd e(n_sites);
        for (Eigen::Index m = 0; m < n_sites; ++m) {
            const double r = year.recruits[static_cast<std::size_t>(m)];
            if (!(r >= 0.0)) throw UsageError("establishment: negative recruit count");
            recruits_total[m] += r;
            // ê_{m,t} = R_{m,t+1} / (S_t a_m); undefined when no seed can reach m.
            const double expected_seeds = seeds * arrival[m];
            e[m] = expected_seeds > 0.0 ? r / expected_seeds : k_nan;
            if (!std::isfinite(e[m]))
                out.warnings.push_back("establishment in '" + microsites[m] + "' for year " +
                                       year.year +
                                       " is undefined (no seeds reach it); the pooled value "
                                       "is used for that year's kernel");
            else if (e[m] > 1.0)
                out.warnings.push_back(
                    "establishment in '" + microsites[m] + "' for year " + year.year + " is " +
                    fmt_number(e[m]) +
                    " > 1: more recruits than arriving seeds (seed immigration, or an arrival "
                    "fraction that is too small)");
            out.rows.push_back({year.year, microsites[m], seeds, arrival[m], r, e[m]});
        }
        out.years.push_back(year.year);
        out.by_year.push_back(e);
    }

    // Pooled: ratio of sums, ê_m = Σ_t R_{m,t+1} / (a_m Σ_t S_t).
    out.pooled.resize(n_sites);
    for (Eigen::Index m = 0; m < n_sites; ++m) {
        const double expected_seeds = seeds_total * arrival[m];
        if (expected_seeds > 0.0) {
            out.pooled[m] = recruits_total[m] / expected_seeds;
        } else if (recruits_total[m] == 0.0) {
            // No seed reaches m and no recruit is seen there: the data say nothing about e_m,
            // and it does not matter for λ because a_m e_m = 0 whatever e_m is.
            out.pooled[m] = 0.0;
            out.warnings.push_back("establishment in '" + microsites[m] +
                                   "' cannot be estimated (no seeds reach it, no recruits); "
                                   "set to 0, which does not change λ because a_m = 0");
        } else {
            throw NumericalError("establishment in '" + microsites[m] +
                                 "' is undefined: " + fmt_number(recruits_total[m]) +
                                 " recruits seen but no seeds reach it (seeds produced " +
                                 fmt_number(seeds_total) + ", arrival fraction " +
                                 fmt_number(arrival[m]) + ")");
        }
        if (out.pooled[m] > 1.0)
            out.warnings.push_back("pooled establishment in '" + microsites[m] + "' is " +
                                   fmt_number(out.pooled[m]) +
                                   " > 1: more recruits than arriving seeds");
        out.rows.push_back(
            {"pooled", microsites[m], seeds_total, arrival[m], recruits_total[m], out.pooled[m]});
    }
    return out;
}

}  // namespace safesite::pipeline
