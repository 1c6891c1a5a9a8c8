#include "safesite/io/staged_folder.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <iterator>
#include <set>
#include <system_error>

#include "io/detail/temporary_names.hpp"
#include "safesite/error.hpp"
#include "safesite/io/atomic_file.hpp"
#include "safesite/io/interruption.hpp"

namespace safesite::io {

namespace {

namespace fs = std::filesystem;

/// The parts appended in order (rather than `"…" + std::string`, which draws a false
/// -Wrestrict warning from g++ 12: see error.hpp).
template <class... Parts>
std::string cat(const Parts&... parts) {
    std::string out;
    (out.append(std::string_view(parts)), ...);
    return out;
}

[[noreturn]] void refuse(const fs::path& target, const std::string& reason) {
    throw InputError({target.string(), 0, 0, "out"}, reason);
}

std::string quoted(const fs::path& p) { return cat("'", p.string(), "'"); }

/// Absolute, lexically normal, with the symbolic links of its existing part resolved.
fs::path resolve(const fs::path& p) {
    std::error_code ec;
    fs::path abs = fs::absolute(p, ec).lexically_normal();
    if (ec) abs = p.lexically_normal();
    if (!abs.has_filename() && abs.has_relative_path()) abs = abs.parent_path();  // "out/"
    const fs::path canon = fs::weakly_canonical(abs, ec);
    return ec ? abs : canon;
}

/// True when `p` is `dir` or lies inside it (component by component).
bool within(const fs::path& p, const fs::path& dir) {
    auto pi = p.begin();
    for (auto di = dir.begin(); di != dir.end(); ++di, ++pi) {
        if (di->empty()) continue;  // a trailing separator
        if (pi == p.end() || *pi != *di) return false;
    }
    return true;
}

struct Resolved {
    fs::path folder;  ///< absolute target, links resolved
    fs::path parent;
    std::string name;
    bool exists = false;
};

/// The regular files (and links) under `folder`, relative, generic form, sorted; safesite's own
/// temporaries left out.
std::vector<std::string> files_under(const fs::path& target, const fs::path& folder) {
    std::vector<std::string> out;
    std::error_code ec;
    fs::recursive_directory_iterator it(folder, ec), end;
    if (ec) refuse(target, cat("cannot list the folder: ", ec.message()));
    for (; it != end; it.increment(ec)) {
        if (ec) break;
        const auto& entry = *it;
        std::error_code e;
        if (!entry.is_symlink(e) && entry.is_directory(e)) continue;
        if (detail::parse_temporary_name(entry.path().filename().string())) continue;
        out.push_back(entry.path().lexically_relative(folder).generic_string());
    }
    if (ec) refuse(target, cat("cannot list the folder: ", ec.message()));
    std::sort(out.begin(), out.end());
    return out;
}

std::set<std::string> read_manifest(const fs::path& file) {
    std::set<std::string> names;
    std::ifstream in(file);
    std::string line;
    while (std::getline(in, line)) {
        if (!line.empty() && line.back() == '\r') line.pop_back();
        if (line.empty() || line[0] == '#') continue;
        names.insert(line);
    }
    return names;
}

/// An existing folder may be replaced as a whole (see staged_folder.hpp).
void check_replaceable(const fs::path& target, const fs::path& folder,
                       const StagedFolderRules& rules) {
    const std::vector<std::string> files = files_under(target, folder);
    if (files.empty()) return;
    std::error_code ec;
    const std::string tail = "; replacing the folder as a whole would delete it. Move it out of "
                             "the folder, or choose another output folder";
    if (fs::is_regular_file(folder / StagedFolder::k_manifest, ec)) {
        const std::set<std::string> listed = read_manifest(folder / StagedFolder::k_manifest);
        for (const auto& f : files) {
            if (f == StagedFolder::k_manifest || listed.count(f)) continue;
            refuse(target, cat("holds '", f, "', which the last safesite run did not write", tail));
        }
        return;
    }
    if (!rules.legacy_marker.empty() && fs::is_regular_file(folder / rules.legacy_marker, ec)) {
        for (const auto& f : files) {
            if (rules.legacy_entry && rules.legacy_entry(f)) continue;
            refuse(target, cat("holds '", f, "', which is not a file safesite writes", tail));
        }
        return;
    }
    std::string markers = std::string(StagedFolder::k_manifest);
    if (!rules.legacy_marker.empty()) markers += cat(" or ", rules.legacy_marker);
    refuse(target, cat("exists, is not empty and is not a safesite output folder (it has no ",
                       markers, "); replacing it as a whole would delete its files. Choose a new "
                       "or an empty folder"));
}

/// Every check of StagedFolder::check() but the probe; stale temporaries removed on the way.
Resolved inspect(const fs::path& target, const StagedFolderRules& rules) {
    if (target.empty()) refuse(target, "no output folder given");
    Resolved r;
    r.folder = resolve(target);
    if (!r.folder.has_filename() || r.folder == r.folder.root_path())
        refuse(target, "the root folder cannot be an output folder; name a folder inside it");
    r.parent = r.folder.parent_path();
    r.name = r.folder.filename().string();

    std::error_code ec;
    if (!fs::is_directory(r.parent, ec)) {
        // The nearest existing ancestor says which of the two it is.
        fs::path up = r.parent;
        while (up.has_relative_path() && !fs::exists(up, ec)) up = up.parent_path();
        if (fs::exists(up, ec) && !fs::is_directory(up, ec))
            refuse(target, quoted(up) + " is a file, not a folder, so the output folder cannot "
                           "be created under it; choose another output folder");
        refuse(target, cat("the folder ", quoted(r.parent), " that should hold the output folder "
                       "does not exist; create it first, or choose another output folder"));
    }
    detail::clean_stale_temporaries(r.parent, detail::k_replaced);
    detail::clean_stale_temporaries(r.parent, detail::k_writing);

    const fs::file_status st = fs::symlink_status(r.folder, ec);
    r.exists = fs::exists(st);
    if (r.exists && !fs::is_directory(st))
        refuse(target, "exists and is not a folder; choose another output folder, or remove it "
                       "if it is not needed");
    for (const auto& input : rules.inputs) {
        if (input.empty()) continue;
        if (within(resolve(input), r.folder))
            refuse(target, cat("holds the input ", quoted(input), " of this run; replacing the "
                           "output folder as a whole would delete it. Choose an output folder "
                           "that holds no input"));
    }
    const fs::path cwd = fs::current_path(ec);
    if (!ec && within(resolve(cwd), r.folder))
        refuse(target, "is the working folder or holds it; replacing it as a whole would move "
                       "the folder you are working in. Choose another output folder");
    if (r.exists) check_replaceable(target, r.folder, rules);
    return r;
}

/// A new empty temporary folder in `parent` for target `name` (mode 0777 less the umask).
fs::path make_staging(const fs::path& target, const Resolved& r) {
    for (int attempt = 0; attempt < 16; ++attempt) {
        const fs::path p = r.parent / detail::temporary_name(r.name, detail::k_writing);
        if (::mkdir(p.c_str(), 0777) == 0) return p;
        if (errno != EEXIST)
            refuse(target, cat("cannot create a folder in ", quoted(r.parent), ": ",
                               std::strerror(errno), " (the output folder and its parent "
                               "must be writable)"));
    }
    refuse(target, cat("cannot find a free name for a temporary folder in ", quoted(r.parent)));
}

void sync_folder(const fs::path& dir) {
    const int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (fd < 0) return;
    ::fsync(fd);  // best effort: the renames are done either way
    ::close(fd);
}

/// renameat2(2) with `flags`; -1 with errno = EINVAL when the system lacks it.
int rename_with(const fs::path& from, const fs::path& to, unsigned flags) {
#if defined(RENAME_EXCHANGE) && defined(RENAME_NOREPLACE)
    return ::renameat2(AT_FDCWD, from.c_str(), AT_FDCWD, to.c_str(), flags);
#else
    (void)from;
    (void)to;
    (void)flags;
    errno = EINVAL;
    return -1;
#endif
}

#if defined(RENAME_EXCHANGE) && defined(RENAME_NOREPLACE)
constexpr unsigned k_exchange = RENAME_EXCHANGE;
constexpr unsigned k_noreplace = RENAME_NOREPLACE;
#else
constexpr unsigned k_exchange = 2;
constexpr unsigned k_noreplace = 1;
#endif

bool unsupported(int err) { return err == EINVAL || err == ENOSYS || err == ENOTSUP; }

}  // namespace

void StagedFolder::check(const fs::path& target, const StagedFolderRules& rules) {
    const TemporaryGuard guard(cat("checking the output folder ", target.string()));
    const Resolved r = inspect(target, rules);
    const fs::path probe = make_staging(target, r);
    std::error_code ec;
    fs::remove(probe, ec);
}

StagedFolder::StagedFolder(const fs::path& target, StagedFolderRules rules)
    : m_target(target), m_rules(std::move(rules)) {
    m_guard = std::make_unique<TemporaryGuard>(cat("writing the output folder ", target.string()));
    const Resolved r = inspect(target, m_rules);
    m_resolved = r.folder;
    m_staging = make_staging(target, r);
}

StagedFolder::~StagedFolder() {
    if (!m_staging.empty()) {
        std::error_code ec;
        fs::remove_all(m_staging, ec);  // the unused new folder, or the previous one replaced
    }
}

void StagedFolder::record(const fs::path& folder, const std::string& relative) {
    const fs::path list = folder / k_manifest;
    std::error_code ec;
    if (!fs::is_regular_file(list, ec) || read_manifest(list).count(relative)) return;
    std::ifstream in(list, std::ios::binary);
    std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    if (!in.good() && !in.eof()) throw Error(cat("cannot read '", list.string(), "'"));
    if (!text.empty() && text.back() != '\n') text += '\n';
    write_file_atomic(list, text + relative + "\n");
}

std::vector<std::string> StagedFolder::commit() {
    if (m_committed) throw UsageError("StagedFolder::commit() called twice");
    std::vector<std::string> files = files_under(m_target, m_staging);
    std::string manifest =
        "# safesite output folder. The files below were written together by one run and are\n"
        "# replaced together by the next run into this folder; a file not listed here stops\n"
        "# that replacement (so nothing of yours is deleted). Do not edit.\n";
    for (const auto& f : files) manifest += f + "\n";
    try {
        write_file_atomic(m_staging / k_manifest, manifest);
    } catch (const Interrupted&) {
        throw;
    } catch (const Error& e) {
        refuse(m_target, e.what());
    }
    throw_if_stopped(cat("writing the output folder ", m_target.string()));

    // The target may have changed while we wrote: check it again just before the rename.
    const Resolved r = inspect(m_target, m_rules);
    if (r.folder != m_resolved || r.parent != m_staging.parent_path())
        refuse(m_target, cat("changed while it was written (now ", quoted(r.folder),
                             "); nothing was replaced. Run again"));
    if (!r.exists) {
        if (rename_with(m_staging, m_resolved, k_noreplace) != 0) {
            int err = errno;
            if (unsupported(err)) {
                err = ::rename(m_staging.c_str(), m_resolved.c_str()) == 0 ? 0 : errno;
            }
            if (err != 0)
                refuse(m_target, std::string("cannot move the new folder in place: ") +
                                     std::strerror(err) + "; nothing was replaced");
        }
        m_staging.clear();  // it is the target now
    } else if (rename_with(m_staging, m_resolved, k_exchange) == 0) {
        // m_staging now holds the previous folder; the destructor removes it.
    } else {
        const int err = errno;
        if (!unsupported(err))
            refuse(m_target, std::string("cannot exchange the new folder with the previous "
                                         "one: ") + std::strerror(err) + "; nothing was replaced");
        // Two renames: the previous folder aside, the new one in.
        const fs::path aside = r.parent / detail::temporary_name(r.name, detail::k_replaced);
        if (::rename(m_resolved.c_str(), aside.c_str()) != 0)
            refuse(m_target, std::string("cannot move the previous folder aside: ") +
                                 std::strerror(errno) + "; nothing was replaced");
        if (::rename(m_staging.c_str(), m_resolved.c_str()) != 0) {
            const int e2 = errno;
            ::rename(aside.c_str(), m_resolved.c_str());  // the previous folder back
            refuse(m_target, std::string("cannot move the new folder in place: ") +
                                 std::strerror(e2) + "; the previous folder was kept");
        }
        m_staging = aside;  // the destructor removes the previous folder
    }
    m_committed = true;
    sync_folder(r.parent);
    if (!m_staging.empty()) {
        std::error_code ec;
        fs::remove_all(m_staging, ec);
        m_staging.clear();
    }
    m_guard.reset();
    return files;
}

}  // namespace safesite::io
