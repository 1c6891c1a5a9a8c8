// `safesite fit MODEL [--out DIR]`: fit every vital rate and print the fits.
#include <memory>
#include <ostream>

#include <CLI/CLI.hpp>

#include "common.hpp"
#include "safesite/io/staged_folder.hpp"
#include "safesite/pipeline/fit.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/text_summary.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

struct FitOptions {
    std::string model;
    std::string out;
};

int run_fit(const FitOptions& o, const Streams& io) {
    const spec::ModelSpec model = load_model(o.model);
    if (!o.out.empty()) check_output_folder(o.out, model);  // before any fitting: fail early
    progress(io, "reading the data and fitting the vital rates");
    const pipeline::FitResult result = pipeline::fit(model);
    const auto tables = pipeline::fit_tables(result);
    for (const auto& w : result.warnings) io.err << "safesite: warning: " << w << "\n";
    const auto info = run_info("fit", o.model, model, std::nullopt, {}, result.warnings);
    report::TextOptions text;
    text.max_rows = 100;  // every coefficient of the demo, trapping and retention included
    io.out << report::render_summary(
        pick_tables(tables, {"coefficients", "model_comparison", "establishment", "hazards",
                             "trapping", "arrival_chain"}), info, text);
    if (!o.out.empty()) {
        io::StagedFolder folder(o.out, report::output_folder_rules(input_files(model)));
        report::write_output_folder(folder.path(), tables, info);
        const auto written = folder.commit();
        io.out << "wrote " << written.size() << " files to " << o.out << "\n";
    }
    return 0;
}

}  // namespace

Verb add_fit_verb(CLI::App& app) {
    auto o = std::make_shared<FitOptions>();
    CLI::App* cmd = app.add_subcommand(
        "fit", "Fit every vital rate of a model file to its census (with the candidate formulas "
               "compared by AIC), estimate establishment, and print the coefficients and the "
               "model comparison.");
    cmd->add_option("MODEL", o->model, "model file (TOML, docs/formats.md)")->required();
    cmd->add_option("--out", o->out, "also write the fit tables (CSV and summary.json) to DIR")
        ->type_name("DIR");
    return {cmd, "safesite fit MODEL [--out DIR]",
            [o](const Streams& io) { return run_fit(*o, io); }};
}

}  // namespace safesite::cli
