#pragma once
/// \file app.hpp
/// The `safesite` program as a function, so tests can run it in-process (style guide 4.11).

#include <iosfwd>
#include <string>
#include <vector>

namespace safesite::cli {

/// Exit statuses (design.md section 7).
enum ExitCode : int {
    exit_ok = 0,
    exit_usage = 2,      ///< bad command-line use
    exit_input = 3,      ///< bad input data or model file
    exit_numerical = 4,  ///< numerical failure
    exit_interrupted = 128,  ///< plus the signal number: 130 SIGINT, 143 SIGTERM, 129 SIGHUP
};

/// Install the handlers of SIGINT, SIGTERM and SIGHUP (main() only, before run()): a stop
/// removes safesite's temporaries and the program exits with 128 + signal (130 for Ctrl-C,
/// 143 for SIGTERM), the previous output folder intact (docs/errors.md "Output folder").
void install_signal_handlers();

/// Run the program with `args` (without the program name). Results go to `out`; warnings,
/// progress and the one-line error reason go to `err`. Returns the exit status.
int run(const std::vector<std::string>& args, std::ostream& out, std::ostream& err);

}  // namespace safesite::cli
