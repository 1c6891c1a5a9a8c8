// `safesite report DIR`: re-render DIR/report.html from DIR/summary.json and DIR/figures/*.svg.
#include <memory>
#include <ostream>

#include <CLI/CLI.hpp>

#include "safesite/report/output_folder_reader.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

struct ReportOptions {
    std::string dir;
};

int run_report(const ReportOptions& o, const Streams& io) {
    progress(io, "reading " + o.dir);
    const std::filesystem::path written = report::rerender_html_report(o.dir);
    io.out << "wrote " << written.string() << "\n";
    return 0;
}

}  // namespace

Verb add_report_verb(CLI::App& app) {
    auto o = std::make_shared<ReportOptions>();
    CLI::App* cmd = app.add_subcommand(
        "report", "Render the HTML report of an output folder (DIR/report.html, one "
                  "self-contained file that opens offline) from its summary.json and "
                  "figures/*.svg.");
    cmd->add_option("DIR", o->dir, "output folder written by 'safesite run'")->required();
    return {cmd, "safesite report DIR", [o](const Streams& io) { return run_report(*o, io); }};
}

}  // namespace safesite::cli
