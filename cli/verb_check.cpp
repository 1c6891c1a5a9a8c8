// `safesite check MODEL`: validate the model file and its census, summarise the census.
#include <memory>
#include <ostream>

#include <CLI/CLI.hpp>

#include "common.hpp"
#include "safesite/pipeline/check.hpp"
#include "safesite/report/text_summary.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

struct CheckOptions {
    std::string model;
    std::string out;
};

int run_check(const CheckOptions& o, const Streams& io) {
    const spec::ModelSpec model = load_model(o.model);
    // The folder `run` would write: it must be creatable or replaceable, and writable.
    check_output_folder(output_dir(o.out, model), model);
    progress(io, "reading and validating the census");
    const pipeline::CheckResult result = pipeline::check(model);
    // Every problem is reported at once (issue 4 §1): errors stop with exit 3, warnings go to
    // stderr and the summary still comes out.
    if (!result.valid()) throw result.report.to_error();
    if (result.report.warning_count() > 0) io.err << result.report.render();
    const auto tables = pipeline::check_tables(result);
    const auto info = run_info("check", o.model, model, std::nullopt, {}, {});
    io.out << "census: " << result.census_file << "\n";
    if (result.memory) io.out << "kernels: " << spec::describe(*result.memory) << "\n";
    report::TextOptions text;
    text.max_rows = 60;
    io.out << report::render_summary(
        pick_tables(tables, {"census_years", "census_microsites", "census_gaps",
                             "census_policies", "trapping_summary", "retention_summary"}),
        info, text);
    return 0;
}

}  // namespace

Verb add_check_verb(CLI::App& app) {
    auto o = std::make_shared<CheckOptions>();
    CLI::App* cmd = app.add_subcommand(
        "check", "Validate a model file and its census data; summarise the census (plants, "
                 "years, transitions, recruits per microsite) and list every problem found.");
    cmd->add_option("MODEL", o->model, "model file (TOML, docs/formats.md)")->required();
    cmd->add_option("--out", o->out,
                    "output folder to check as 'run' would write it (default: [output] dir of "
                    "the model file)")
        ->type_name("DIR");
    return {cmd, "safesite check MODEL [--out DIR]", [o](const Streams& io) { return run_check(*o, io); }};
}

}  // namespace safesite::cli
