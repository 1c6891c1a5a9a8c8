#include "app.hpp"

#include <signal.h>
#include <unistd.h>

#include <cstring>
#include <exception>
#include <iostream>
#include <ostream>
#include <vector>

#include <CLI/CLI.hpp>

#include "options.hpp"
#include "safesite/error.hpp"
#include "safesite/io/near_match.hpp"
#include "safesite/io/interruption.hpp"
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

/// CLI11's message, or ours for a mistyped option or verb with a "did you mean" from the
/// options of the verb (`verb`, or nothing before a verb) or from the verb names.
std::string parse_error_message(const CLI::ParseError& e, const CLI::App* verb,
                                const std::vector<Verb>& verbs,
                                const std::vector<std::string>& args) {
    // A mistyped option explains most parse errors (an extra argument, a missing required
    // option that was typed wrongly): say it first, whatever CLI11 stopped at.
    if (verb) {
        const std::string given = unknown_option(*verb, args);
        if (!given.empty())
            return verb->get_name() + ": unknown option " + shown_value(given) +
                   (option_hint(*verb, given).empty() ? "." : option_hint(*verb, given)) +
                   " See 'safesite " + verb->get_name() + " --help' for the options.";
        return e.what();
    }
    if (dynamic_cast<const CLI::ExtrasError*>(&e) == nullptr) return e.what();
    // No verb recognised: the first word that is not an option is a mistyped verb.
    std::vector<std::string> names;
    for (const auto& v : verbs) names.push_back(v.command->get_name());
    for (const auto& a : args) {
        if (a.rfind("-", 0) == 0) continue;
        const std::string hint = io::did_you_mean(a, names);
        return "unknown verb " + shown_value(a) + (hint.empty() ? "." : hint) +
               " The verbs are: check, fit, run, simulate, eval, report.";
    }
    return e.what();
}

std::string signal_name(int signal) {
    switch (signal) {
        case SIGINT: return "SIGINT";
        case SIGTERM: return "SIGTERM";
        case SIGHUP: return "SIGHUP";
        default: return "signal " + std::to_string(signal);
    }
}

/// SIGINT, SIGTERM, SIGHUP: record the stop (io::request_stop). With no temporary of safesite
/// on disk (fitting, bootstrap) there is nothing to clean: say so and end at once with
/// 128 + signal. Otherwise the writers stop at their next safe point, remove their
/// temporaries and run() returns 128 + signal. Only async-signal-safe calls here.
void on_stop_signal(int signal) {
    if (!io::request_stop(signal)) return;
    const char* text = signal == SIGINT    ? "safesite: error: interrupted by SIGINT\n"
                       : signal == SIGTERM ? "safesite: error: interrupted by SIGTERM\n"
                                           : "safesite: error: interrupted by a signal\n";
    const ssize_t ignored = ::write(STDERR_FILENO, text, std::strlen(text));
    (void)ignored;
    ::_exit(128 + signal);
}

}  // namespace

void install_signal_handlers() {
    struct sigaction action;
    std::memset(&action, 0, sizeof action);
    action.sa_handler = on_stop_signal;
    ::sigemptyset(&action.sa_mask);
    action.sa_flags = SA_RESTART;  // the writing goes on to its next safe point
    for (int signal : {SIGINT, SIGTERM, SIGHUP}) {
        struct sigaction previous;
        // SIGHUP ignored by the parent (`nohup`) stays ignored. SIGINT is handled even when
        // ignored at start (a shell ignores it for `cmd &`), so a stop always cleans up.
        if (signal == SIGHUP && ::sigaction(signal, nullptr, &previous) == 0 &&
            previous.sa_handler == SIG_IGN)
            continue;
        ::sigaction(signal, &action, nullptr);
    }
}

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
        const Verb* v = nullptr;
        for (const auto& cand : verbs) {
            if (cand.command->parsed()) v = &cand;
        }
        error_line(err, parse_error_message(e, v ? v->command : nullptr, verbs, args));
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
        const int status = chosen->action(io);
        // A stop requested after the last safe point: the output is complete, but the run was
        // asked to stop, and says so.
        if (const int signal = io::stop_signal(); signal != 0) {
            std::string text = "interrupted by ";
            text += signal_name(signal);
            text += " after the output was written in full";
            error_line(err, text);
            return exit_interrupted + signal;
        }
        return status;
    } catch (const io::Interrupted& e) {
        error_line(err, std::string(e.what()) + "; nothing was written (a previous output "
                        "folder is as it was)");
        return exit_interrupted + e.signal();
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
