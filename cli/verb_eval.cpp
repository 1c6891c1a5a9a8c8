// `safesite eval MODEL [--out DIR] [--top K]`: a model whose vital rates are all given.
#include <algorithm>
#include <cmath>
#include <memory>
#include <ostream>

#include <CLI/CLI.hpp>

#include "common.hpp"
#include "options.hpp"
#include "safesite/pipeline/kernel_matrices.hpp"
#include "safesite/io/staged_folder.hpp"
#include "safesite/pipeline/run.hpp"
#include "safesite/report/output_folder.hpp"
#include "safesite/report/text_summary.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

struct EvalOptions {
    std::string model;
    std::string out;
    std::size_t top = 10;
};

int run_eval(const EvalOptions& o, const Streams& io) {
    const spec::ModelSpec model = load_model(o.model);
    if (!o.out.empty()) check_output_folder(o.out, model);  // before any work: fail early
    progress(io, "building the kernels");
    const pipeline::RunResult result = pipeline::evaluate_fixed(model);
    const auto& a = result.analysis;
    for (const auto& w : a.warnings) io.err << "safesite: warning: " << w << "\n";
    const auto info = run_info("eval", o.model, model, std::nullopt, a.assumptions, a.warnings);

    report::TidyTable growth{"growth_rate", {"kernel", "lambda", "R0", "generation_time"}, {}};
    for (const auto& k : a.kernels) {
        growth.rows.push_back({report::text(k.label), report::number(k.lambda),
                               report::number(k.r0), report::number(k.generation_time)});
    }
    // The largest elasticities of the pooled λ, by absolute value.
    std::vector<pipeline::ParameterSensitivity> s = a.sensitivities;
    std::stable_sort(s.begin(), s.end(), [](const auto& x, const auto& y) {
        return std::abs(x.elasticity) > std::abs(y.elasticity);
    });
    if (s.size() > o.top) s.resize(o.top);
    report::TidyTable elas{
        "top_elasticities", {"parameter", "target", "value", "sensitivity", "elasticity"}, {}};
    for (const auto& p : s) {
        elas.rows.push_back({report::text(p.parameter), report::text(p.target),
                             report::number(p.value), report::number(p.sensitivity),
                             report::number(p.elasticity)});
    }
    // The largest kernel-level elasticities of the pooled λ, summed over blocks.
    auto blocks = a.pooled().block_elasticities;
    std::stable_sort(blocks.begin(), blocks.end(), [](const auto& x, const auto& y) {
        return std::abs(x.elasticity) > std::abs(y.elasticity);
    });
    if (blocks.size() > o.top) blocks.resize(o.top);
    report::TidyTable kernel_elas{"top_kernel_elasticities", {"to", "from", "part", "elasticity"},
                                  {}};
    for (const auto& b : blocks) {
        kernel_elas.rows.push_back({report::text(b.to), report::text(b.from),
                                    report::text(b.part), report::number(b.elasticity)});
    }
    io.out << report::render_summary({growth, kernel_elas, elas}, info);
    if (!o.out.empty()) {
        io::StagedFolder folder(o.out, report::output_folder_rules(input_files(model)));
        report::write_output_folder(folder.path(), pipeline::run_tables(result), info);
        if (model.output.matrices)
            pipeline::write_kernel_matrices(folder.path(), result.fit.model, a);
        const auto written = folder.commit();
        io.out << "wrote " << written.size() << " files to " << o.out << "\n";
    }
    return 0;
}

}  // namespace

Verb add_eval_verb(CLI::App& app) {
    auto o = std::make_shared<EvalOptions>();
    CLI::App* cmd = app.add_subcommand(
        "eval", "Evaluate a model file whose vital rates are all given as fixed parameter "
                "values (no data): print λ, R0 and generation time of every kernel and the "
                "largest elasticities of the pooled λ.");
    cmd->add_option("MODEL", o->model, "model file (TOML) with coefficients for every rate")
        ->required();
    cmd->add_option("--out", o->out, "also write every output table to DIR")->type_name("DIR");
    add_integer(cmd, "--top", o->top, 1, 1000, "number of elasticities to print (default 10)")
        ->type_name("K");
    return {cmd, "safesite eval MODEL [--out DIR] [--top K]",
            [o](const Streams& io) { return run_eval(*o, io); }};
}

}  // namespace safesite::cli
