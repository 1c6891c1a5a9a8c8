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
};

/// Run the program with `args` (without the program name). Results go to `out`; warnings,
/// progress and the one-line error reason go to `err`. Returns the exit status.
int run(const std::vector<std::string>& args, std::ostream& out, std::ostream& err);

}  // namespace safesite::cli
