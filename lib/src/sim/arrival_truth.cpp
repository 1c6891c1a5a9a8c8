// The true arrival chain of a truth file with seed experiments
// (docs/methods/simulation.md, "Seed experiments").
#include "safesite/sim/arrival_truth.hpp"

#include <cmath>
#include <limits>
#include <map>

#include <boost/math/distributions/normal.hpp>
#include <Eigen/Core>

#include "safesite/arrival/arrival_chain.hpp"
#include "safesite/arrival/chain_parameters.hpp"
#include "safesite/arrival/trapping_model.hpp"
#include "safesite/error.hpp"

namespace safesite::sim {

namespace {

double effect(const std::map<std::string, double>& m, const std::string& key) {
    auto it = m.find(key);
    return it == m.end() ? 0.0 : it->second;
}

}  // namespace

double true_trapping(const spec::TrappingTruthSpec& truth, const std::string& form,
                     const std::string& seed_type) {
    auto mean = truth.log_size_mean.find(form);
    if (mean == truth.log_size_mean.end())
        throw UsageError("true trapping: no log_size_mean for form \"" + form + "\"");
    // η_i = β0 + β_s x_i + α_f + γ_k at the midpoint quantiles x_i of N(μ_f, σ_s²):
    // x_i = μ_f + σ_s Φ⁻¹((i − ½)/n), each standing for probability 1/n of the sizes.
    const int n = k_trapping_size_quantiles;
    const boost::math::normal_distribution<double> standard(0.0, 1.0);
    const double base = truth.intercept + effect(truth.form_effect, form) +
                        effect(truth.seed_type_effect, seed_type);
    Eigen::VectorXd eta(n);
    for (int i = 0; i < n; ++i) {
        const double q = boost::math::quantile(standard, (i + 0.5) / n);
        eta[i] = base + truth.log_size_slope * (mean->second + truth.log_size_sd * q);
    }
    // The mean over i of E_b[logit⁻¹(η_i + b)], b ~ N(0, σ_b²) (Gauss–Hermite in arrival).
    return arrival::average_trapping(eta, truth.neighbour_sd);
}

ArrivalTruth true_arrival(const spec::ModelSpec& model) {
    if (!model.experiment_truth || model.arrival.method != spec::ArrivalMethod::experiments)
        throw SpecError({model.file.string(), 0, 0, "simulate"},
                        "the true arrival chain needs arrival.method = \"experiments\" with "
                        "[simulate.trapping] and [simulate.retention]");
    const auto& e = *model.experiment_truth;
    const auto& labels = model.microsites.labels;
    const std::size_t bare = model.microsites.bare_index;
    ArrivalTruth t;
    t.microsites = labels;
    t.bare = bare;
    t.seed_type = model.arrival.seed_type;
    t.relanding = model.arrival.relanding;
    t.exposure_days = model.arrival.exposure_days;

    std::map<std::string, double> cover, trapping, hazard;
    double covered = 0.0;
    for (std::size_t m = 0; m < labels.size(); ++m) {
        const std::string& label = labels[m];
        // h_m of a typical station (frailty u = 0): the fitted retention model with station
        // random intercepts reports the same typical-station hazard.
        hazard[label] = e.retention.hazard_per_day.at(label).at(t.seed_type);
        if (m == bare) continue;
        cover[label] = model.arrival.cover.at(label);
        covered += cover[label];
        trapping[label] = true_trapping(e.trapping, label, t.seed_type);
    }
    t.chain = arrival::make_chain_parameters(labels, model.microsites.bare, cover, trapping,
                                             hazard, t.relanding, t.exposure_days);
    const arrival::ArrivalResult r = arrival::arrival_fractions(t.chain);

    for (std::size_t m = 0; m < labels.size(); ++m) {
        const auto i = static_cast<Eigen::Index>(m);
        const bool is_bare = m == bare;
        t.cover.push_back(is_bare ? 1.0 - covered : cover.at(labels[m]));
        t.trapping.push_back(is_bare ? std::numeric_limits<double>::quiet_NaN()
                                     : trapping.at(labels[m]));
        t.hazard_per_day.push_back(hazard.at(labels[m]));
        t.landing.push_back(r.landing[i]);
        t.fractions.push_back(r.fractions[i]);
    }
    t.lost = r.lost;
    return t;
}

report::TidyTable truth_arrival_table(const ArrivalTruth& t) {
    report::TidyTable table{
        "truth-arrival",
        {"microsite", "cover", "trapping", "hazard_per_day", "landing", "fraction"},
        {}};
    for (std::size_t m = 0; m < t.microsites.size(); ++m) {
        table.rows.push_back({report::text(t.microsites[m]), report::number(t.cover[m]),
                              m == t.bare ? report::missing() : report::number(t.trapping[m]),
                              report::number(t.hazard_per_day[m]),
                              report::number(t.landing[m]), report::number(t.fractions[m])});
    }
    table.rows.push_back({report::text("lost"), report::missing(), report::missing(),
                          report::missing(), report::number(0.0), report::number(t.lost)});
    return table;
}

}  // namespace safesite::sim
