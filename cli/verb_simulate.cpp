// `safesite simulate TRUTH --plants N --years Y --seed S --out DIR`: invent a census from a
// truth model file (docs/methods/simulation.md).
#include <filesystem>
#include <memory>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <fmt/format.h>

#include "common.hpp"
#include "options.hpp"
#include "safesite/arrival/retention_data.hpp"
#include "safesite/arrival/trapping_data.hpp"
#include "safesite/io/staged_folder.hpp"
#include "safesite/pipeline/analyse.hpp"
#include "safesite/pipeline/fixed_model.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/text_summary.hpp"
#include "safesite/sim/census_simulation.hpp"
#include "safesite/sim/seed_experiments.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

struct SimulateOptions {
    std::string truth;
    std::string out;
    sim::SimulationOptions sim;
    bool no_coordinates = false;
};

/// λ of every true year kernel (and of the pooled kernel without deviations), when the truth
/// file gives mesh bounds. With seed experiments the kernels use the true arrival chain.
report::TidyTable true_lambda(const spec::ModelSpec& model, const sim::CensusSimulation& s,
                              const std::optional<sim::SeedExperiments>& experiments) {
    pipeline::FixedModelOptions fo;
    if (experiments) fo.chain = experiments->truth.chain;
    // Transitions t → t+1 exist for every census year but the last.
    fo.years.assign(s.years.begin(), s.years.end() - 1);
    fo.shifts = s.deviations;
    pipeline::PreparedModel prepared = pipeline::prepare_fixed(model, fo);
    prepared.break_even = false;
    prepared.mesh_check = false;
    prepared.scenarios.clear();
    prepared.survival_changes.clear();
    const pipeline::AnalysisResult a = pipeline::analyse(prepared);
    report::TidyTable t{"truth-lambda", {"year", "lambda"}, {}};
    for (const auto& k : a.kernels) {
        t.rows.push_back({report::text(k.label), report::number(k.lambda)});
    }
    return t;
}

int run_simulate(SimulateOptions o, const Streams& io) {
    const spec::ModelSpec model = load_model(o.truth);
    check_output_folder(o.out, model);  // before any work: fail early
    o.sim.coordinates = !o.no_coordinates;
    progress(io, fmt::format("simulating {} plants over {} census years", o.sim.plants,
                             o.sim.years));
    const sim::CensusSimulation s = sim::simulate_census(model, o.sim);
    std::vector<report::TidyTable> written_tables = {s.census, s.truth_years};
    report::TidyTable counts{"counts", {"year", "alive", "recruits", "untagged_recruits"}, {}};
    for (std::size_t k = 0; k < s.years.size(); ++k) {
        counts.rows.push_back({report::text(s.years[k]),
                               report::integer(static_cast<std::int64_t>(s.alive[k])),
                               report::integer(static_cast<std::int64_t>(s.recruits[k])),
                               report::integer(static_cast<std::int64_t>(s.untagged[k]))});
    }
    std::vector<report::TidyTable> shown = {counts};
    std::optional<sim::SeedExperiments> experiments;
    if (model.experiment_truth) {
        progress(io, "simulating the trapping trials and retention checks");
        experiments = sim::simulate_experiments(model, o.sim.seed);
        written_tables.push_back(experiments->truth_arrival);
        written_tables.push_back(experiments->truth_trapping);
        written_tables.push_back(experiments->truth_hazards);
        shown.push_back(experiments->truth_arrival);
    }
    if (model.mesh.lower && model.mesh.upper) {
        progress(io, "computing λ of the true year kernels");
        written_tables.push_back(true_lambda(model, s, experiments));
        shown.push_back(written_tables.back());
    }
    // All or nothing: a temporary folder beside `--out` replaces it as a whole at the end.
    io::StagedFolder folder(o.out, report::output_folder_rules(input_files(model)));
    for (const auto& t : written_tables) report::write_csv(folder.path(), t);
    if (experiments) {
        report::write_output_file(folder.path() / "trapping.csv",
                                  arrival::format_trapping_csv(experiments->trapping));
        report::write_output_file(folder.path() / "retention.csv",
                                  arrival::format_retention_csv(experiments->retention));
    }
    folder.commit();
    const auto info = run_info("simulate", o.truth, model, o.sim.seed, {}, {});
    io.out << report::render_summary(shown, info);
    io.out << "wrote " << s.census.rows.size() << " census rows";
    if (experiments) {
        io.out << ", " << experiments->trapping.size() << " trapping trials, "
               << experiments->retention.size() << " retention checks";
    }
    io.out << " and the truth to " << o.out << "\n";
    return 0;
}

}  // namespace

Verb add_simulate_verb(CLI::App& app) {
    auto o = std::make_shared<SimulateOptions>();
    CLI::App* cmd = app.add_subcommand(
        "simulate", "Invent a census from a truth model file whose vital rates are all given "
                    "(with year_sd for year-to-year variation): writes census.csv, "
                    "truth-years.csv (the drawn year deviations) and, when the truth file "
                    "gives mesh bounds, truth-lambda.csv. A truth with [simulate.trapping] and "
                    "[simulate.retention] also gets trapping.csv, retention.csv and "
                    "truth-arrival.csv, truth-trapping.csv, truth-hazards.csv, and its census "
                    "arrives by the true arrival chain. Same seed, same files.");
    cmd->add_option("TRUTH", o->truth, "truth model file (TOML) with coefficients for every rate")
        ->required();
    add_integer(cmd, "--plants", o->sim.plants, 1, 1000000, "tagged plants at the first census")
        ->type_name("N")
        ->required();
    add_integer(cmd, "--years", o->sim.years, 2, 200, "census years")
        ->type_name("Y")
        ->required();
    add_integer(cmd, "--seed", o->sim.seed, 0, static_cast<std::int64_t>(spec::k_max_seed),
                "random seed")
        ->type_name("S")
        ->required();
    cmd->add_option("--out", o->out, "folder to write the files to (created, or replaced as a whole: docs/formats.md)")
        ->type_name("DIR")
        ->required();
    add_integer(cmd, "--first-year", o->sim.first_year, 1, 9999,
                "label of the first census year (2015)")
        ->type_name("YEAR");
    add_integer(cmd, "--plots", o->sim.plots, 1, 10000, "number of plots (8)")->type_name("K");
    add_integer(cmd, "--burn-in", o->sim.burn_in, 0, 1000,
                "untagged years simulated before the first census (15)")
        ->type_name("B");
    add_decimal(cmd, "--notfound-rate", o->sim.notfound_rate, 0.0, 0.99,
                "probability that an alive plant is not found in a census (0.02)")
        ->type_name("P");
    add_decimal(cmd, "--missing-seed-rate", o->sim.missing_seed_rate, 0.0, 1.0,
                "probability that a flowering plant's seeds are not counted (0.05)")
        ->type_name("P");
    add_integer(cmd, "--max-new-per-plot", o->sim.max_new_per_plot, 0, 1000000,
                "most recruits newly tagged per plot and year; 0 = no cap (0)")
        ->type_name("K");
    cmd->add_flag("--no-coordinates", o->no_coordinates, "leave out the x, y columns");
    return {cmd, "safesite simulate TRUTH --plants N --years Y --seed S --out DIR [options]",
            [o](const Streams& io) { return run_simulate(*o, io); }};
}

}  // namespace safesite::cli
