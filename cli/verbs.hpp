#pragma once
/// \file verbs.hpp
/// The verbs of the `safesite` program. Each verb lives in its own file (`verb_<name>.cpp`),
/// registers its options on the CLI11 application and returns the action that runs it. Verbs
/// are thin: they call library functions and print; the catch ladder in app.cpp maps errors
/// to exit codes (design.md section 7).

#include <functional>
#include <iosfwd>
#include <string>

namespace CLI {
class App;
}

namespace safesite::cli {

/// Where a verb writes: results to `out`, warnings and progress to `err`; progress messages
/// only when `progress` (stderr is a terminal).
struct Streams {
    std::ostream& out;
    std::ostream& err;
    bool progress = false;
};

/// A registered verb: its CLI11 subcommand, a one-line usage for error messages, its action
/// (returns the exit status).
struct Verb {
    CLI::App* command = nullptr;
    std::string usage;
    std::function<int(const Streams&)> action;
};

Verb add_check_verb(CLI::App& app);
Verb add_fit_verb(CLI::App& app);
Verb add_run_verb(CLI::App& app);
Verb add_simulate_verb(CLI::App& app);
Verb add_eval_verb(CLI::App& app);
Verb add_report_verb(CLI::App& app);

/// Print a progress line on stderr when it is a terminal.
void progress(const Streams& io, const std::string& message);

}  // namespace safesite::cli
