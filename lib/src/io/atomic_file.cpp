#include "safesite/io/atomic_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <string>
#include <system_error>

#include "io/detail/temporary_names.hpp"
#include "safesite/error.hpp"
#include "safesite/io/interruption.hpp"

namespace safesite::io {

namespace {

[[noreturn]] void fail(const std::filesystem::path& path, const std::string& what, int err) {
    throw Error("cannot " + what + " '" + path.string() + "': " + std::strerror(err));
}

}  // namespace

void write_file_atomic(const std::filesystem::path& path, std::string_view content) {
    const std::filesystem::path dir = path.has_parent_path() ? path.parent_path() : ".";
    const std::string target = path.filename().string();
    const std::string doing = "writing " + path.native();
    const TemporaryGuard guard(doing);
    // Temporaries of this file left by a killed run.
    detail::clean_stale_temporaries(dir, detail::k_file, target);
    // O_EXCL on a fresh name; mode 0666 so that the kernel applies the user's umask, as for
    // any file a program creates.
    std::string temp;
    int fd = -1;
    for (int attempt = 0; attempt < 16 && fd < 0; ++attempt) {
        temp = (dir / detail::temporary_name(target, detail::k_file)).string();
        fd = ::open(temp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
        if (fd < 0 && errno != EEXIST) break;
    }
    if (fd < 0) fail(path, "create a temporary file for", errno);
    auto abandon = [&](const std::string& what, int err) {
        ::close(fd);
        ::unlink(temp.c_str());
        fail(path, what, err);
    };
    std::size_t done = 0;
    while (done < content.size()) {
        const ssize_t n = ::write(fd, content.data() + done, content.size() - done);
        if (n < 0) {
            if (errno == EINTR) continue;
            abandon("write", errno);
        }
        done += static_cast<std::size_t>(n);
    }
    if (::fsync(fd) != 0) abandon("flush", errno);
    if (::close(fd) != 0) {
        const int err = errno;
        ::unlink(temp.c_str());
        fail(path, "close", err);
    }
    try {
        throw_if_stopped(doing);
    } catch (...) {
        ::unlink(temp.c_str());
        throw;
    }
    if (::rename(temp.c_str(), path.c_str()) != 0) {
        const int err = errno;
        ::unlink(temp.c_str());
        fail(path, "rename the temporary file onto", err);
    }
}

void ensure_directory(const std::filesystem::path& dir) {
    std::error_code ec;
    if (std::filesystem::is_directory(dir, ec)) return;
    if (std::filesystem::exists(dir, ec))
        throw Error("cannot use '" + dir.string() + "' as output folder: it exists and is not a "
                    "folder");
    // create_directories uses mode 0777, less the umask.
    std::filesystem::create_directories(dir, ec);
    if (ec) throw Error("cannot create folder '" + dir.string() + "': " + ec.message());
}

}  // namespace safesite::io
