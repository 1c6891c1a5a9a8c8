#pragma once
/// \file progress_line.hpp
/// A progress line on a terminal, rewritten in place with '\r' (e.g. the bootstrap: replicates
/// done, time elapsed, estimated time left). Drawn only when the verb's Streams allow progress
/// (stderr is a terminal and `--quiet` was not given); otherwise nothing is written.

#include <chrono>
#include <cstddef>
#include <string>

#include "verbs.hpp"

namespace safesite::cli {

/// A duration in whole seconds as "m:ss", or "h:mm:ss" from one hour on (negative as 0).
std::string clock_text(double seconds);

/// The text of a progress line: "safesite: <what> <done>/<total>, <elapsed> elapsed, about
/// <left> left", where left = elapsed / done × (total − done) (the mean time per item so far);
/// without an estimate while done = 0, and "done" instead of the estimate once done = total.
std::string progress_text(const std::string& what, std::size_t done, std::size_t total,
                          double elapsed_seconds);

class ProgressLine {
public:
    /// `what` names the items, e.g. "bootstrap replicates".
    ProgressLine(const Streams& io, std::string what);
    ProgressLine(const ProgressLine&) = delete;
    ProgressLine& operator=(const ProgressLine&) = delete;
    /// Ends the line (finish()).
    ~ProgressLine();

    /// Redraw with `done` of `total` items: at most about 5 times a second, and always for the
    /// last item.
    void update(std::size_t done, std::size_t total);
    /// Move to a new line when a line was drawn; later updates draw nothing.
    void finish();

private:
    const Streams& m_io;
    std::string m_what;
    std::chrono::steady_clock::time_point m_start;
    std::chrono::steady_clock::time_point m_last;
    std::size_t m_width = 0;  ///< length of the longest line drawn, to blank its tail
    bool m_drawn = false;
    bool m_finished = false;
};

}  // namespace safesite::cli
