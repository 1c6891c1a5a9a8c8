#pragma once
/// \file atomic_file.hpp
/// Writing outputs so that a reader never sees a half-written file (DEVELOPERS.md: "write to a
/// temporary file in the target folder, then rename").

#include <filesystem>
#include <string_view>

namespace safesite::io {

/// Write `content` to `path` atomically: the bytes go to a new temporary file in the same
/// directory (`.<name>.safesite-tmp-<pid>-<six letters or digits>`), which is flushed to disk
/// and then renamed over `path` (rename(2) within one file system is atomic on POSIX). The file
/// is created with mode 0666 less the process's umask, like any file a program creates. On any
/// failure the temporary file is removed and `path` is left as it was. Temporaries of the same
/// file left by a killed process (its pid no longer alive) are removed first.
/// Throws safesite::Error naming the path and the system's reason when the directory does not
/// exist or is not writable, or a write, flush or rename fails; io::Interrupted when a stop was
/// requested (interruption.hpp) before the rename.
void write_file_atomic(const std::filesystem::path& path, std::string_view content);

/// Create the folder `dir` and its missing parents (nothing to do when it exists), with mode
/// 0777 less the umask.
/// Throws safesite::Error when it cannot be created or exists as something other than a folder.
void ensure_directory(const std::filesystem::path& dir);

}  // namespace safesite::io
