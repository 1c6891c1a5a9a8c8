#include "safesite/census/census_summary.hpp"

#include <string>

#include "safesite/error.hpp"

namespace safesite::census {

std::vector<double> CensusSummary::microsite_share(int year) const {
    for (const auto& y : per_year) {
        if (y.year != year) continue;
        std::vector<double> share(y.alive_by_microsite.size(), 0.0);
        if (y.alive == 0) return share;
        for (std::size_t m = 0; m < share.size(); ++m)
            share[m] = static_cast<double>(y.alive_by_microsite[m]) / static_cast<double>(y.alive);
        return share;
    }
    throw UsageError("year " + std::to_string(year) + " is not a census year");
}

std::vector<double> CensusSummary::microsite_share() const {
    if (per_year.empty()) return {};
    std::vector<double> share(per_year.front().alive_by_microsite.size(), 0.0);
    double total = 0.0;
    for (const auto& y : per_year) {
        for (std::size_t m = 0; m < share.size(); ++m)
            share[m] += static_cast<double>(y.alive_by_microsite[m]);
        total += static_cast<double>(y.alive);
    }
    if (total > 0.0)
        for (auto& v : share) v /= total;
    return share;
}

}  // namespace safesite::census
