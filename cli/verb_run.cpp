// `safesite run MODEL [--out DIR] [--seed S] [--replicates B] [--threads T]`: everything,
// written to the output folder; bootstrap intervals when replicates > 0.
#include <memory>
#include <optional>
#include <ostream>

#include <CLI/CLI.hpp>
#include <fmt/format.h>

#include "common.hpp"
#include "options.hpp"
#include "safesite/io/staged_folder.hpp"
#include "progress_line.hpp"
#include "safesite/pipeline/bootstrap.hpp"
#include "safesite/pipeline/kernel_matrices.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/report/figures.hpp"
#include "safesite/report/html_report.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/text_summary.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

struct RunOptions {
    std::string model;
    std::string out;
    std::optional<std::uint64_t> seed;
    std::optional<std::size_t> replicates;
    unsigned threads = 0;
};

int run_run(const RunOptions& o, const Streams& io) {
    spec::ModelSpec model = load_model(o.model);
    if (o.seed) model.uncertainty.seed = *o.seed;
    if (o.replicates) {
        // The fewest replicates depend on the model file's level: checked here, before any work.
        const std::size_t least = spec::min_replicates(model.uncertainty.level);
        if (*o.replicates > 0 && *o.replicates < least)
            throw UsageError("--replicates: value '" + std::to_string(*o.replicates) +
                             "' is too few for percentile intervals at level " +
                             fmt::format("{}", model.uncertainty.level) +
                             " ([uncertainty] level); expected 0 (no intervals) or at least " +
                             std::to_string(least));
        model.uncertainty.replicates = *o.replicates;
    }
    const std::filesystem::path dir = output_dir(o.out, model);
    check_output_folder(dir, model);  // before any fitting: fail early
    progress(io, "fitting the vital rates and building the kernels");
    const pipeline::RunResult result = pipeline::run(model);
    auto tables = pipeline::run_tables(result);
    // The analysis's warnings begin with those of the fit (PreparedModel::warnings): taking
    // both printed each fit warning twice.
    std::vector<std::string> warnings = result.analysis.warnings;
    if (model.uncertainty.replicates > 0) {
        progress(io, "bootstrap: " + std::to_string(model.uncertainty.replicates) +
                         " replicates (refit and reanalyse each)");
        pipeline::BootstrapOptions b;
        b.replicates = model.uncertainty.replicates;
        b.seed = model.uncertainty.seed;
        b.level = model.uncertainty.level;
        b.threads = o.threads;
        ProgressLine line(io, "bootstrap replicates");
        b.progress = [&line](std::size_t done, std::size_t total) { line.update(done, total); };
        const pipeline::BootstrapResult boot = pipeline::bootstrap(model, result, b);
        line.finish();
        for (auto& t : pipeline::bootstrap_tables(boot)) tables.push_back(std::move(t));
        warnings.insert(warnings.end(), boot.warnings.begin(), boot.warnings.end());
    }
    for (const auto& w : warnings) io.err << "safesite: warning: " << w << "\n";
    // The seed is recorded only when the run draws random numbers (bootstrap replicates, the
    // year draws of the stochastic growth rate). The thread count is not recorded: it does not
    // change any result.
    std::optional<std::uint64_t> seed;
    if (model.uncertainty.replicates > 0 || result.analysis.stochastic)
        seed = model.uncertainty.seed;
    const auto info =
        run_info("run", o.model, model, seed, result.analysis.assumptions, warnings);
    progress(io, "writing " + dir.string());
    // All or nothing: everything goes into a temporary folder beside `dir`, which replaces
    // `dir` as a whole at the end (io::StagedFolder).
    io::StagedFolder folder(dir, report::output_folder_rules(input_files(model)));
    report::write_output_folder(folder.path(), tables, info);
    // Figures drawn once, for their files and for the HTML report.
    const std::vector<report::Figure> figures = report::all_figures(tables);
    report::write_figures(folder.path(), figures);
    report::write_html_report(folder.path(), tables, info, figures);
    if (model.output.matrices)
        pipeline::write_kernel_matrices(folder.path(), result.fit.model, result.analysis);
    const auto written = folder.commit();
    report::TextOptions text;
    text.max_rows = 40;
    // The terminal shows the scenarios of the pooled kernel; every year is in the files.
    auto shown =
        pick_tables(tables, {"arrival_chain", "lambda", "stochastic_lambda", "arrival",
                             "scenarios", "intervals"});
    for (auto& t : shown)
        if (t.name == "scenarios")
            std::erase_if(t.rows, [](const std::vector<report::Cell>& row) {
                return row.size() > 1 && row[1] != report::Cell(std::string("pooled"));
            });
    io.out << report::render_summary(shown, info, text);
    io.out << "wrote " << written.size() << " files to " << dir.string() << "\n";
    return 0;
}

}  // namespace

Verb add_run_verb(CLI::App& app) {
    auto o = std::make_shared<RunOptions>();
    CLI::App* cmd = app.add_subcommand(
        "run", "Fit, build the kernels and run every analysis of a model file (λ per census "
               "year and pooled, perturbations, arrival, scenarios, sensitivities); write the "
               "output folder and print a short summary.");
    cmd->add_option("MODEL", o->model, "model file (TOML, docs/formats.md)")->required();
    cmd->add_option("--out", o->out,
                    "output folder (default: [output] dir of the model file, relative to it)")
        ->type_name("DIR");
    add_integer(cmd, "--seed", o->seed, 0, static_cast<std::int64_t>(spec::k_max_seed),
                "random seed of the bootstrap (overrides [uncertainty] seed)")
        ->type_name("S");
    add_integer(cmd, "--replicates", o->replicates, 0,
                static_cast<std::int64_t>(spec::k_max_replicates),
                "bootstrap replicates for confidence intervals (overrides [uncertainty] "
                "replicates; 0: none; at least 41 for 95 % intervals, docs/cli.md)")
        ->type_name("B");
    add_integer(cmd, "--threads", o->threads, 1, 1024,
                "worker threads of the bootstrap (default: all hardware threads; results "
                "do not depend on it)")
        ->type_name("T");
    return {cmd, "safesite run MODEL [--out DIR] [--seed S] [--replicates B] [--threads T]",
            [o](const Streams& io) { return run_run(*o, io); }};
}

}  // namespace safesite::cli
