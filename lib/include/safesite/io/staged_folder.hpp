#pragma once
/// \file staged_folder.hpp
/// An output folder written all or nothing (docs/formats.md "Output folder", docs/errors.md
/// "Output folder"). Every file goes into a temporary folder beside the target, in the same
/// parent (`.<name>.safesite-writing-<pid>-<six letters or digits>`); commit() then puts it in
/// place with one rename: a previous folder is exchanged with the new one atomically
/// (renameat2 RENAME_EXCHANGE; where the file system lacks it, the previous folder is renamed
/// aside as `.<name>.safesite-replaced-<pid>-<…>`, the new one renamed in, and the previous
/// one removed). So the target is at every instant the previous complete folder or the new
/// complete one (or absent when there was none). Until commit() the destructor removes the
/// temporary folder, whatever the error.
///
/// A previous folder is replaced as a whole only when it is safe to do so: it is empty, or it
/// lists what it holds in `.safesite-output` (written by commit()) and holds nothing else, or
/// it is a folder written before that list existed (StagedFolderRules::legacy_marker). A folder
/// that is or holds an input of the run, or the working folder, is refused.
///
/// Temporaries left by a killed process (their pid no longer alive) in the same parent are
/// removed by the next check() or StagedFolder in that parent; a previous folder left aside by
/// such a process is put back when its target is missing.
///
/// Folders are created with mode 0777 and files with mode 0666, less the umask.

#include <filesystem>
#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace safesite::io {

/// What an output folder may replace.
struct StagedFolderRules {
    /// Files of the run (model file, data files): the target may neither be one of them nor
    /// hold one, at any depth.
    std::vector<std::filesystem::path> inputs;
    /// A file whose presence marks a folder written before `.safesite-output` existed as
    /// replaceable (e.g. "summary.json"); empty: no such folders.
    std::string legacy_marker;
    /// For such a folder: true for a path (relative, generic form) that a writer of it could
    /// have written. Every file in it must pass.
    std::function<bool(const std::string&)> legacy_entry;
};

class TemporaryGuard;

/// A folder being written; see the file comment.
class StagedFolder {
public:
    /// Name of the list of files that commit() writes into the folder.
    static constexpr const char* k_manifest = ".safesite-output";

    /// Everything the constructor checks, without keeping anything: the parent exists and is a
    /// folder, the target is absent or a replaceable folder, no input is inside it, and a
    /// temporary folder can be created in the parent (one is created and removed). Stale
    /// temporaries in the parent are removed first. Call it before long work.
    /// \throws InputError (file: the target as given, key "out") saying what is wrong and what
    ///         to do.
    static void check(const std::filesystem::path& target, const StagedFolderRules& rules);

    /// check(), then create the temporary folder. Hold the object while writing into path().
    /// \throws as check(); io::Interrupted when a stop was requested.
    StagedFolder(const std::filesystem::path& target, StagedFolderRules rules);
    /// Removes the temporary folder unless commit() succeeded.
    ~StagedFolder();
    StagedFolder(const StagedFolder&) = delete;
    StagedFolder& operator=(const StagedFolder&) = delete;

    /// The target as given.
    const std::filesystem::path& target() const noexcept { return m_target; }
    /// The temporary folder: write every file here.
    const std::filesystem::path& path() const noexcept { return m_staging; }

    /// Write the list of files, check the target again and put the folder in place (see the
    /// file comment); the previous folder is removed. Returns the files, relative to the
    /// folder, in sorted order (the list itself not included).
    /// \throws io::Interrupted when a stop was requested (nothing replaced); InputError (key
    ///         "out") when the target changed into something that may not be replaced or a
    ///         rename fails. The temporary folder is removed on every failure.
    std::vector<std::string> commit();

    /// Add `relative` (generic form) to the list of a folder committed earlier, when it has
    /// one and lacks the name: for a file written into the folder afterwards (the HTML report
    /// re-rendered by `safesite report`). \throws Error when the list cannot be rewritten.
    static void record(const std::filesystem::path& folder, const std::string& relative);

private:
    std::filesystem::path m_target;    ///< as given
    std::filesystem::path m_resolved;  ///< absolute, symbolic links resolved
    std::filesystem::path m_staging;
    StagedFolderRules m_rules;
    bool m_committed = false;
    std::unique_ptr<TemporaryGuard> m_guard;
};

}  // namespace safesite::io
