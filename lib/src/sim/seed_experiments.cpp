// Simulated seed experiments from a truth file (docs/methods/simulation.md, "Seed
// experiments"). The draws themselves are arrival's (experiment_simulation.hpp); this file
// maps the truth file onto them and gives each its own seed.
#include "safesite/sim/seed_experiments.hpp"

#include <string>

#include <fmt/format.h>

#include "detail/streams.hpp"
#include "core/variates.hpp"
#include "safesite/arrival/experiment_simulation.hpp"
#include "safesite/error.hpp"

namespace safesite::sim {

SeedExperiments simulate_experiments(const spec::ModelSpec& model, std::uint64_t seed) {
    SeedExperiments out;
    out.truth = true_arrival(model);  // throws SpecError without an experiment truth
    const auto& e = *model.experiment_truth;
    const auto& labels = model.microsites.labels;
    const std::vector<std::string> types = e.trapping.seed_types();

    // The seeds of arrival's streams, drawn in a fixed order from the experiments' own stream
    // (never from the census streams): retention, trapping, then one per neighbour form in
    // label order (simulate_neighbours seeds its stream from its arguments, so each form needs
    // its own seed or all forms would share one sequence of normal deviates).
    core::Variates seeds(seed, detail::experiments_stream);
    const std::uint64_t retention_seed = seeds.bits();
    const std::uint64_t trapping_seed = seeds.bits();

    arrival::TrappingTruth trapping;
    trapping.intercept = e.trapping.intercept;
    trapping.log_size_slope = e.trapping.log_size_slope;
    trapping.form_effect = e.trapping.form_effect;
    trapping.seed_type_effect = e.trapping.seed_type_effect;
    trapping.neighbour_sd = e.trapping.neighbour_sd;
    arrival::TrappingDesign design;
    design.seed_types = types;
    design.launched = e.trapping.launched;
    for (std::size_t m = 0; m < labels.size(); ++m) {
        const std::uint64_t form_seed = seeds.bits();  // drawn for bare soil too: order fixed
        if (m == model.microsites.bare_index) continue;
        auto neighbours = arrival::simulate_neighbours(
            {labels[m]}, e.trapping.neighbours_per_form, e.trapping.log_size_mean.at(labels[m]),
            e.trapping.log_size_sd, form_seed);
        for (auto& n : neighbours) {
            // Recorded to 4 significant digits, as a field team would write it; the trials
            // use the recorded size.
            n.size = std::stod(fmt::format("{:.4g}", n.size));
            design.neighbours.push_back(std::move(n));
        }
    }
    out.trapping = arrival::simulate_trapping(trapping, design, trapping_seed);

    arrival::RetentionTruth retention;
    retention.hazard_per_day = e.retention.hazard_per_day;
    retention.station_sd = e.retention.station_sd;
    arrival::RetentionDesign rdesign;
    rdesign.microsites = labels;
    rdesign.seed_types = types;
    rdesign.stations_per_microsite = e.retention.stations_per_microsite;
    rdesign.seeds_per_station = e.retention.seeds_per_station;
    rdesign.schedule = e.retention.schedule;
    rdesign.irregular_schedule = e.retention.irregular_schedule;
    rdesign.irregular_share = e.retention.irregular_share;
    out.retention = arrival::simulate_retention(retention, rdesign, retention_seed);

    out.truth_arrival = truth_arrival_table(out.truth);
    out.truth_hazards = {"truth-hazards", {"microsite", "seed_type", "hazard_per_day"}, {}};
    for (const auto& site : labels)
        for (const auto& type : types)
            out.truth_hazards.rows.push_back(
                {report::text(site), report::text(type),
                 report::number(e.retention.hazard_per_day.at(site).at(type))});
    out.truth_trapping = {"truth-trapping", {"form", "seed_type", "trapping"}, {}};
    for (std::size_t m = 0; m < labels.size(); ++m) {
        if (m == model.microsites.bare_index) continue;
        for (const auto& type : types)
            out.truth_trapping.rows.push_back(
                {report::text(labels[m]), report::text(type),
                 report::number(true_trapping(e.trapping, labels[m], type))});
    }
    return out;
}

}  // namespace safesite::sim
