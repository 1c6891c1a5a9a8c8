#include "safesite/stats/model_comparison.hpp"

#include <algorithm>
#include <cmath>

#include "safesite/error.hpp"

namespace safesite::stats {

ComparisonTable compare_models(const std::vector<GlmFit>& fits,
                               const std::vector<std::string>& labels) {
    if (fits.empty()) throw UsageError("compare_models: no models");
    if (fits.size() != labels.size())
        throw UsageError("compare_models: " + std::to_string(fits.size()) + " fits but " +
                         std::to_string(labels.size()) + " labels");
    for (std::size_t i = 1; i < fits.size(); ++i) {
        if (fits[i].n_used != fits[0].n_used)
            throw UsageError("compare_models: '" + labels[i] + "' used " +
                             std::to_string(fits[i].n_used) + " rows but '" + labels[0] + "' " +
                             std::to_string(fits[0].n_used) +
                             "; AIC compares models on the same rows only");
    }
    ComparisonTable t;
    for (std::size_t i = 0; i < fits.size(); ++i) {
        const GlmFit& f = fits[i];
        t.rows.push_back({labels[i], i, f.aic, 0.0, 0.0, f.loglik, f.n_parameters, f.deviance,
                          f.n_used});
    }
    // Sorted by AIC; equal AICs keep their input order (stable sort).
    std::stable_sort(t.rows.begin(), t.rows.end(),
                     [](const auto& a, const auto& b) { return a.aic < b.aic; });
    const double best = t.rows.front().aic;
    double total = 0.0;
    for (auto& r : t.rows) {
        r.delta_aic = r.aic - best;
        r.weight = std::exp(-0.5 * r.delta_aic);
        total += r.weight;
    }
    for (auto& r : t.rows) r.weight /= total;
    return t;
}

}  // namespace safesite::stats
