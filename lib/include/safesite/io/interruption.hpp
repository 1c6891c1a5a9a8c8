#pragma once
/// \file interruption.hpp
/// Stopping a run cleanly on SIGINT or SIGTERM (docs/errors.md "Output folder"). The program
/// installs a signal handler that calls request_stop(); the library never installs one.
///
/// While safesite has a temporary file or folder on disk (io::StagedFolder, the temporary of
/// io::write_file_atomic) it holds a TemporaryGuard. A stop request then only records the
/// signal, and the writers check it at safe points (between files, before the final rename),
/// throw Interrupted and remove their temporaries as the stack unwinds. With no temporary on
/// disk (fitting, bootstrap replicates) there is nothing to clean, and request_stop() tells
/// the handler so: the program may then end at once.

#include <string>

#include "safesite/error.hpp"

namespace safesite::io {

/// A run stopped by a signal at a safe point; its temporaries are removed by the time the
/// error leaves the writer. The program exits with 128 + signal() (130 for SIGINT, 143 for
/// SIGTERM).
class Interrupted : public Error {
public:
    Interrupted(int signal, const std::string& what) : Error(what), m_signal(signal) {}
    int signal() const noexcept { return m_signal; }

private:
    int m_signal;
};

/// Record a stop request for `signal` (async-signal-safe: lock-free atomics only). Returns true
/// when no temporary of safesite exists at this moment and none can be created afterwards
/// (TemporaryGuard sees the request first), so the caller may end the process at once.
bool request_stop(int signal) noexcept;

/// The signal of the first stop request, or 0 when none.
int stop_signal() noexcept;

/// Throw Interrupted when a stop was requested; `what` says what was being done (e.g.
/// "writing out/lambda.csv").
void throw_if_stopped(const std::string& what);

/// Forget a stop request (tests that simulate one in-process).
void clear_stop() noexcept;

/// Held while a temporary file or folder of safesite exists. Constructing it throws
/// Interrupted when a stop was already requested, so no temporary is created after the
/// handler decided that the process could end at once.
class TemporaryGuard {
public:
    explicit TemporaryGuard(const std::string& what);
    ~TemporaryGuard();
    TemporaryGuard(const TemporaryGuard&) = delete;
    TemporaryGuard& operator=(const TemporaryGuard&) = delete;
};

}  // namespace safesite::io
