#include "safesite/io/interruption.hpp"

#include <atomic>
#include <csignal>

namespace safesite::io {

namespace {

// Lock-free, so usable from a signal handler (C++17 [support.signal]).
std::atomic<int> g_signal{0};
std::atomic<int> g_temporaries{0};
static_assert(std::atomic<int>::is_always_lock_free);

std::string signal_name(int signal) {
    switch (signal) {
        case SIGINT: return "SIGINT";
        case SIGTERM: return "SIGTERM";
        case SIGHUP: return "SIGHUP";
        default: return "signal " + std::to_string(signal);
    }
}

}  // namespace

bool request_stop(int signal) noexcept {
    int none = 0;
    g_signal.compare_exchange_strong(none, signal);  // keep the first signal
    // Sequentially consistent with TemporaryGuard's increment-then-check: either the guard's
    // holder sees the request, or this load sees its temporary.
    return g_temporaries.load() == 0;
}

int stop_signal() noexcept { return g_signal.load(); }

void throw_if_stopped(const std::string& what) {
    const int s = g_signal.load();
    if (s == 0) return;
    std::string text = "interrupted by ";
    text += signal_name(s);
    text += " while ";
    text += what;
    throw Interrupted(s, text);
}

void clear_stop() noexcept { g_signal.store(0); }

TemporaryGuard::TemporaryGuard(const std::string& what) {
    g_temporaries.fetch_add(1);
    if (g_signal.load() != 0) {
        g_temporaries.fetch_sub(1);
        throw_if_stopped(what);
    }
}

TemporaryGuard::~TemporaryGuard() { g_temporaries.fetch_sub(1); }

}  // namespace safesite::io
