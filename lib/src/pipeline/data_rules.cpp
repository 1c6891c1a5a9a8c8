#include "safesite/pipeline/data_rules.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "safesite/error.hpp"

namespace safesite::pipeline {

std::pair<double, double> derive_mesh_bounds(const stats::Table& transitions,
                                             const stats::Table& recruits, double margin) {
    if (!(margin >= 0.0) || !std::isfinite(margin))
        throw UsageError("mesh margin must be finite and >= 0");
    double lo = std::numeric_limits<double>::infinity();
    double hi = -lo;
    auto scan = [&](const stats::Table& t, const char* column) {
        if (t.rows() == 0) return;
        for (double x : t.numeric(column))
            if (std::isfinite(x)) {
                lo = std::min(lo, x);
                hi = std::max(hi, x);
            }
    };
    scan(transitions, "size");
    scan(transitions, "size_next");
    scan(recruits, "size");
    if (!std::isfinite(lo) || !(hi > lo))
        throw DataError({"", 0, 0, "size"},
                        "cannot derive mesh bounds: fewer than two distinct finite sizes in the "
                        "census; give [mesh] lower and upper");
    const double range = hi - lo;
    return {lo - margin * range, hi + margin * range};
}

Eigen::VectorXd census_cover(const stats::Table& transitions,
                             const std::vector<std::string>& microsites, std::size_t bare) {
    if (transitions.rows() == 0) throw UsageError("census cover: no plant records");
    const auto& site = transitions.categorical("microsite").values;
    Eigen::VectorXd cover = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(microsites.size()));
    double total = 0.0;
    for (const auto& label : site) {
        if (label.empty()) continue;
        const auto it = std::find(microsites.begin(), microsites.end(), label);
        if (it == microsites.end()) continue;
        total += 1.0;
        const auto m = static_cast<std::size_t>(it - microsites.begin());
        if (m != bare) cover[static_cast<Eigen::Index>(m)] += 1.0;
    }
    if (total == 0.0) throw UsageError("census cover: no plant with a known microsite");
    return cover / total;
}

}  // namespace safesite::pipeline
