#pragma once
/// \file atomic_file.hpp
/// Writing outputs so that a reader never sees a half-written file (DEVELOPERS.md: "write to a
/// temporary file in the target folder, then rename").

#include <filesystem>
#include <string_view>

namespace safesite::io {

/// Write `content` to `path` atomically: the bytes go to a new temporary file in the same
/// directory (`.<name>.tmp-` plus a unique six-character suffix from mkstemp(3)), which is flushed to disk and then renamed over `path`
/// (rename(2) within one file system is atomic on POSIX). On any failure the temporary file is
/// removed and `path` is left as it was.
/// Throws safesite::Error naming the path and the system's reason when the directory does not
/// exist or is not writable, or a write, flush or rename fails.
void write_file_atomic(const std::filesystem::path& path, std::string_view content);

/// Create the folder `dir` and its missing parents (nothing to do when it exists).
/// Throws safesite::Error when it cannot be created or exists as something other than a folder.
void ensure_directory(const std::filesystem::path& dir);

}  // namespace safesite::io
