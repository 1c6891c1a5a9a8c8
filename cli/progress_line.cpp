#include "progress_line.hpp"

#include <cmath>
#include <ostream>

#include <fmt/format.h>

namespace safesite::cli {

std::string clock_text(double seconds) {
    const auto s = static_cast<long long>(
        std::isfinite(seconds) && seconds > 0.0 ? std::floor(seconds + 0.5) : 0.0);
    if (s >= 3600) return fmt::format("{}:{:02}:{:02}", s / 3600, (s / 60) % 60, s % 60);
    return fmt::format("{}:{:02}", s / 60, s % 60);
}

std::string progress_text(const std::string& what, std::size_t done, std::size_t total,
                          double elapsed_seconds) {
    std::string line = fmt::format("safesite: {} {}/{}, {} elapsed", what, done, total,
                                   clock_text(elapsed_seconds));
    if (done >= total && total > 0) {
        line += ", done";
    } else if (done > 0) {
        const double left =
            elapsed_seconds / static_cast<double>(done) * static_cast<double>(total - done);
        line += ", about " + clock_text(left) + " left";
    }
    return line;
}

ProgressLine::ProgressLine(const Streams& io, std::string what)
    : m_io(io),
      m_what(std::move(what)),
      m_start(std::chrono::steady_clock::now()),
      m_last(m_start) {}

ProgressLine::~ProgressLine() { finish(); }

void ProgressLine::update(std::size_t done, std::size_t total) {
    if (!m_io.progress || m_finished) return;
    const auto now = std::chrono::steady_clock::now();
    if (m_drawn && done < total && now - m_last < std::chrono::milliseconds(200)) return;
    m_last = now;
    const double elapsed = std::chrono::duration<double>(now - m_start).count();
    std::string line = progress_text(m_what, done, total, elapsed);
    const std::size_t n = line.size();
    if (n < m_width) line.append(m_width - n, ' ');  // blank what a longer line left
    m_width = std::max(m_width, n);
    m_io.err << '\r' << line << std::flush;
    m_drawn = true;
}

void ProgressLine::finish() {
    if (m_finished) return;
    m_finished = true;
    if (m_drawn) m_io.err << '\n' << std::flush;
}

}  // namespace safesite::cli
