#pragma once
// Names of safesite's temporaries beside their target (private to io): a hidden name that says
// what it is, whose process made it and for which target, e.g.
//     .out.safesite-writing-4711-q3Zt9a    an output folder being written by process 4711
//     .out.safesite-replaced-4711-q3Zt9a   the previous `out`, moved aside while it is replaced
//     .report.html.safesite-tmp-4711-q3Zt9a   a file being written
// A temporary whose process is gone was left by a killed run and may be removed.

#include <sys/types.h>

#include <filesystem>
#include <optional>
#include <string>

namespace safesite::io::detail {

/// Kinds of temporaries.
inline constexpr const char* k_writing = "writing";    ///< a staged folder
inline constexpr const char* k_replaced = "replaced";  ///< a previous folder moved aside
inline constexpr const char* k_file = "tmp";           ///< a file being written

/// `.<target>.safesite-<kind>-<pid>-<six random letters or digits>` for this process.
std::string temporary_name(const std::string& target, const std::string& kind);

/// The parts of a temporary's name, when `name` follows the pattern above.
struct TemporaryName {
    std::string target;
    std::string kind;
    pid_t pid = 0;
};
std::optional<TemporaryName> parse_temporary_name(const std::string& name);

/// True when process `pid` exists (kill(pid, 0) succeeds or is refused for permission).
bool process_alive(pid_t pid);

/// Remove the temporaries of `kind` in `dir` (for `target` only when it is not empty) whose
/// process is gone; best effort, errors ignored. A folder of kind k_replaced whose target is
/// missing is renamed back to the target instead (a run killed between the two renames of a
/// replacement). Returns the number handled.
std::size_t clean_stale_temporaries(const std::filesystem::path& dir, const std::string& kind,
                                    const std::string& target = {});

}  // namespace safesite::io::detail
