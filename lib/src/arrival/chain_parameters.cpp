#include "safesite/arrival/chain_parameters.hpp"

#include <cmath>
#include <cstdio>
#include <set>
#include <string>

#include "core/number_text.hpp"
#include "arrival/detail/csv_text.hpp"
#include "safesite/error.hpp"

namespace safesite::arrival {
namespace {

std::string number(double x) { return core::number_text(x, 10); }

void check_length(const Eigen::VectorXd& v, std::size_t m, const char* name) {
    if (static_cast<std::size_t>(v.size()) != m)
        throw UsageError(std::string("arrival chain: ") + name + " has " +
                         std::to_string(v.size()) + " entries; expected one per microsite (" +
                         std::to_string(m) + ")");
}

void check_range(double x, double lo, double hi, const std::string& what) {
    if (!(x >= lo && x <= hi))
        throw UsageError("arrival chain: " + what + " = " + number(x) + " is outside [" +
                         number(lo) + ", " + number(hi) + "]");
}

// Tolerance on Σ c_f ≤ 1: cover read from a file or multiplied by a scenario factor may
// exceed 1 by rounding only (common practice).
constexpr double cover_sum_slack = 1e-12;

}  // namespace

void validate(const ChainParameters& p) {
    const std::size_t m = p.microsites.size();
    if (m == 0) throw UsageError("arrival chain: no microsites");
    std::set<std::string> seen;
    for (const auto& l : p.microsites) {
        if (l.empty()) throw UsageError("arrival chain: empty microsite label");
        if (!seen.insert(l).second)
            throw UsageError("arrival chain: microsite \"" + l + "\" is listed twice");
    }
    if (p.bare >= m)
        throw UsageError("arrival chain: bare-soil index " + std::to_string(p.bare) +
                         " is not a microsite index (0.." + std::to_string(m - 1) + ")");
    check_length(p.cover, m, "cover");
    check_length(p.trapping, m, "trapping");
    check_length(p.hazard_per_day, m, "hazard_per_day");
    double cover_sum = 0.0;
    for (std::size_t i = 0; i < m; ++i) {
        const std::string& l = p.microsites[i];
        if (i != p.bare) {
            check_range(p.cover[i], 0.0, 1.0, "cover of \"" + l + "\"");
            check_range(p.trapping[i], 0.0, 1.0, "trapping probability of \"" + l + "\"");
            cover_sum += p.cover[i];
        }
        const double h = p.hazard_per_day[i];
        if (!(h >= 0.0 && std::isfinite(h)))
            throw UsageError("arrival chain: departure hazard of \"" + l + "\" = " + number(h) +
                             " per day; expected a finite value ≥ 0");
    }
    if (cover_sum > 1.0 + cover_sum_slack)
        throw UsageError("arrival chain: neighbour cover sums to " + number(cover_sum) +
                         "; expected at most 1 (the rest is bare ground)");
    check_range(p.relanding, 0.0, 1.0, "re-landing probability");
    if (!(p.exposure_days >= 0.0 && std::isfinite(p.exposure_days)))
        throw UsageError("arrival chain: exposure_days = " + number(p.exposure_days) +
                         "; expected a finite number of days ≥ 0");
}

ChainParameters make_chain_parameters(const std::vector<std::string>& microsites,
                                      const std::string& bare,
                                      const std::map<std::string, double>& cover,
                                      const std::map<std::string, double>& trapping,
                                      const std::map<std::string, double>& hazard_per_day,
                                      double relanding, double exposure_days) {
    ChainParameters p;
    p.microsites = microsites;
    p.bare = microsite_index(p, bare);
    const auto m = static_cast<Eigen::Index>(microsites.size());
    p.cover = Eigen::VectorXd::Zero(m);
    p.trapping = Eigen::VectorXd::Zero(m);
    p.hazard_per_day = Eigen::VectorXd::Zero(m);
    p.relanding = relanding;
    p.exposure_days = exposure_days;
    // Every label given must be a microsite (and not bare for cover/trapping); every needed
    // label must be given.
    auto fill = [&](const std::map<std::string, double>& values, Eigen::VectorXd& out,
                    const char* what, bool bare_too) {
        for (const auto& [label, x] : values) {
            const std::size_t i = microsite_index(p, label);
            if (i == p.bare && !bare_too)
                throw UsageError(std::string("arrival chain: ") + what + " given for the "
                                 "bare-soil microsite \"" + label + "\"");
            out[static_cast<Eigen::Index>(i)] = x;
        }
        for (std::size_t i = 0; i < microsites.size(); ++i)
            if ((bare_too || i != p.bare) && values.count(microsites[i]) == 0)
                throw UsageError(std::string("arrival chain: no ") + what + " for microsite \"" +
                                 microsites[i] + "\"");
    };
    fill(cover, p.cover, "cover", false);
    fill(trapping, p.trapping, "trapping probability", false);
    fill(hazard_per_day, p.hazard_per_day, "departure hazard", true);
    validate(p);
    return p;
}

std::size_t microsite_index(const ChainParameters& p, const std::string& label) {
    for (std::size_t i = 0; i < p.microsites.size(); ++i)
        if (p.microsites[i] == label) return i;
    throw UsageError("arrival chain: unknown microsite \"" + label + "\"; the microsites are " +
                     detail::quoted_list(p.microsites));
}

Eigen::VectorXd landing_split(const ChainParameters& p) {
    validate(p);
    const Eigen::Index m = static_cast<Eigen::Index>(p.microsites.size());
    const Eigen::Index bare = static_cast<Eigen::Index>(p.bare);
    // ℓ_f = c_f τ_f; ℓ_bare = 1 − Σ c_f τ_f (untrapped seeds and seeds meeting no neighbour
    // lie on bare soil).
    Eigen::VectorXd split = Eigen::VectorXd::Zero(m);
    double trapped = 0.0;
    for (Eigen::Index i = 0; i < m; ++i) {
        if (i == bare) continue;
        split[i] = p.cover[i] * p.trapping[i];
        trapped += split[i];
    }
    split[bare] = 1.0 - trapped;
    return split;
}

ChainParameters apply_modifiers(const ChainParameters& params, const ChainModifiers& mod) {
    validate(params);
    ChainParameters p = params;
    auto factor_ok = [](double k, const std::string& what, const std::string& label) {
        if (!(k >= 0.0 && std::isfinite(k)))
            throw UsageError("arrival scenario: " + what + " of \"" + label + "\" = " +
                             number(k) + "; expected a finite factor ≥ 0");
    };
    for (const auto& [label, k] : mod.cover_factor) {
        const std::size_t i = microsite_index(p, label);
        factor_ok(k, "cover factor", label);
        if (i == p.bare)
            throw UsageError("arrival scenario: cover factor given for the bare-soil microsite "
                             "\"" + label + "\"; bare ground is 1 − Σ neighbour cover");
        p.cover[static_cast<Eigen::Index>(i)] *= k;
    }
    for (const auto& [label, k] : mod.trapping_odds_factor) {
        const std::size_t i = microsite_index(p, label);
        factor_ok(k, "trapping odds factor", label);
        if (i == p.bare)
            throw UsageError("arrival scenario: trapping odds factor given for the bare-soil "
                             "microsite \"" + label + "\"");
        // odds' = k·τ/(1−τ)  ⇒  τ' = kτ / (1 − τ + kτ); τ = 1 (infinite odds) stays 1 for k > 0.
        double& tau = p.trapping[static_cast<Eigen::Index>(i)];
        const double denom = 1.0 - tau + k * tau;
        tau = denom > 0.0 ? k * tau / denom : 0.0;
    }
    for (const auto& [label, k] : mod.hazard_factor) {
        const std::size_t i = microsite_index(p, label);
        factor_ok(k, "hazard factor", label);
        p.hazard_per_day[static_cast<Eigen::Index>(i)] *= k;
    }
    if (mod.exposure_days) p.exposure_days = *mod.exposure_days;
    if (mod.relanding) p.relanding = *mod.relanding;
    validate(p);
    return p;
}

}  // namespace safesite::arrival
