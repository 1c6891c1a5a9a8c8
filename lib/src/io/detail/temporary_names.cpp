#include "io/detail/temporary_names.hpp"

#include <signal.h>
#include <unistd.h>

#include <atomic>
#include <cerrno>
#include <random>
#include <system_error>

namespace safesite::io::detail {

namespace fs = std::filesystem;

namespace {

constexpr const char* k_marker = ".safesite-";
constexpr std::size_t k_suffix_length = 6;

std::string random_suffix() {
    static const char alphabet[] =
        "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789";
    // Uniqueness only (not reproducibility): the device seed plus a process-wide counter.
    static const std::uint64_t base = std::random_device{}();
    static std::atomic<std::uint64_t> counter{0};
    std::mt19937_64 gen(base ^ (0x9e3779b97f4a7c15ULL * (counter.fetch_add(1) + 1)));
    std::string s;
    for (std::size_t i = 0; i < k_suffix_length; ++i) s += alphabet[gen() % (sizeof alphabet - 1)];
    return s;
}

bool all_digits(const std::string& s) {
    if (s.empty() || s.size() > 10) return false;
    for (char c : s)
        if (c < '0' || c > '9') return false;
    return true;
}

}  // namespace

std::string temporary_name(const std::string& target, const std::string& kind) {
    std::string name = ".";
    name += target;
    name += k_marker;
    name += kind;
    name += '-';
    name += std::to_string(::getpid());
    name += '-';
    name += random_suffix();
    return name;
}

std::optional<TemporaryName> parse_temporary_name(const std::string& name) {
    if (name.size() < 2 || name[0] != '.') return std::nullopt;
    const std::size_t at = name.rfind(k_marker);
    if (at == std::string::npos || at < 2) return std::nullopt;  // a target name is not empty
    const std::string rest = name.substr(at + std::char_traits<char>::length(k_marker));
    // rest = <kind>-<pid>-<suffix>
    const std::size_t d1 = rest.find('-');
    const std::size_t d2 = rest.rfind('-');
    if (d1 == std::string::npos || d2 == d1) return std::nullopt;
    TemporaryName out;
    out.kind = rest.substr(0, d1);
    if (out.kind != k_writing && out.kind != k_replaced && out.kind != k_file)
        return std::nullopt;
    const std::string pid = rest.substr(d1 + 1, d2 - d1 - 1);
    if (!all_digits(pid) || rest.size() - d2 - 1 != k_suffix_length) return std::nullopt;
    out.pid = static_cast<pid_t>(std::stoll(pid));
    out.target = name.substr(1, at - 1);
    return out;
}

bool process_alive(pid_t pid) {
    if (pid <= 0) return true;  // not a process we could have been: leave it alone
    if (pid == ::getpid()) return true;
    return ::kill(pid, 0) == 0 || errno == EPERM;
}

std::size_t clean_stale_temporaries(const fs::path& dir, const std::string& kind,
                                    const std::string& target) {
    std::size_t handled = 0;
    std::error_code ec;
    fs::directory_iterator it(dir, ec);
    if (ec) return 0;
    std::vector<std::pair<fs::path, TemporaryName>> stale;
    for (const auto& entry : it) {
        const auto parsed = parse_temporary_name(entry.path().filename().string());
        if (!parsed || parsed->kind != kind) continue;
        if (!target.empty() && parsed->target != target) continue;
        if (process_alive(parsed->pid)) continue;
        stale.emplace_back(entry.path(), *parsed);
    }
    for (const auto& [path, parsed] : stale) {
        std::error_code e;
        if (parsed.kind == k_replaced && !fs::exists(dir / parsed.target, e) && !e &&
            fs::is_directory(path, e)) {
            fs::rename(path, dir / parsed.target, e);  // the previous folder, back in place
            if (!e) {
                ++handled;
                continue;
            }
        }
        e.clear();
        fs::remove_all(path, e);
        if (!e) ++handled;
    }
    return handled;
}

}  // namespace safesite::io::detail
