#include "app.hpp"

#include <unistd.h>

#include <exception>
#include <iostream>
#include <ostream>
#include <vector>

#include <CLI/CLI.hpp>

#include "safesite/error.hpp"
#include "safesite/version.hpp"
#include "verbs.hpp"

namespace safesite::cli {

namespace {

constexpr const char* k_short_usage =
    "Usage: safesite <verb> [options]   (verbs: check, fit, run, simulate, eval, report)\n"
    "Run 'safesite --help' for the verbs, 'safesite <verb> --help' for their options.\n";

constexpr const char* k_description =
    "safesite: vital rates, seed arrival and microsite-split integral projection models (IPMs)\n"
    "for plant populations censused every year.";

void error_line(std::ostream& err, const std::string& message) {
    err << "safesite: error: " << message << "\n";
}

}  // namespace

void progress(const Streams& io, const std::string& message) {
    if (io.progress) io.err << "safesite: " << message << "\n";
}

int run(const std::vector<std::string>& args, std::ostream& out, std::ostream& err) {
    // Progress lines only for a person watching: stderr is the process's stderr and a terminal.
    Streams io{out, err, &err == &std::cerr && ::isatty(STDERR_FILENO) == 1};

    CLI::App app(k_description, "safesite");
    app.set_help_flag("-h,--help", "print this help and exit");
    bool show_version = false;
    app.add_flag("--version", show_version, "print the version and exit");
    bool quiet = false;
    app.add_flag("-q,--quiet", quiet,
                 "no progress lines on the terminal (warnings and errors are still printed); "
                 "before or after the verb");
    app.fallthrough();  // --quiet is also taken after the verb
    app.require_subcommand(0, 1);
    app.footer("Run 'safesite <verb> --help' for the options of a verb. Exit status: 0 ok, "
               "2 bad usage, 3 bad input (data, model file, output folder), 4 numerical "
               "failure.");

    std::vector<Verb> verbs = {add_check_verb(app), add_fit_verb(app), add_run_verb(app),
                               add_simulate_verb(app), add_eval_verb(app),
                               add_report_verb(app)};

    const Verb* chosen = nullptr;
    try {
        // CLI11 parses arguments given last-to-first.
        std::vector<std::string> reversed(args.rbegin(), args.rend());
        app.parse(reversed);
        for (const auto& v : verbs) {
            if (v.command->parsed()) chosen = &v;
        }
        if (show_version) {
            out << "safesite " << version() << "\n";
            return exit_ok;
        }
        if (!chosen) {
            error_line(err, args.empty() ? "no verb given" : "no verb given before the options");
            err << k_short_usage;
            return exit_usage;
        }
    } catch (const CLI::CallForHelp&) {
        out << app.help();  // delegates to the chosen verb's help
        return exit_ok;
    } catch (const CLI::CallForAllHelp&) {
        out << app.help("", CLI::AppFormatMode::All);
        return exit_ok;
    } catch (const CLI::ParseError& e) {
        error_line(err, e.what());
        const Verb* v = nullptr;
        for (const auto& cand : verbs) {
            if (cand.command->parsed()) v = &cand;
        }
        if (v) {
            err << "Usage: " << v->usage << "\nRun 'safesite " << v->command->get_name()
                << " --help' for its options.\n";
        } else {
            err << k_short_usage;
        }
        return exit_usage;
    }

    if (quiet) io.progress = false;
    try {
        return chosen->action(io);
    } catch (const UsageError& e) {
        error_line(err, e.what());
        err << "Usage: " << chosen->usage << "\n";
        return exit_usage;
    } catch (const InputError& e) {
        error_line(err, e.what());
        return exit_input;
    } catch (const NumericalError& e) {
        error_line(err, e.what());
        return exit_numerical;
    } catch (const Error& e) {
        // Other safesite errors are about the environment (e.g. an unwritable file).
        error_line(err, e.what());
        return exit_input;
    } catch (const std::exception& e) {
        error_line(err, std::string("internal: ") + e.what());
        return 1;
    }
}

}  // namespace safesite::cli
