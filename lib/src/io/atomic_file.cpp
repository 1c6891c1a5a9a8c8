#include "safesite/io/atomic_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <string>
#include <system_error>

#include "safesite/error.hpp"

namespace safesite::io {

namespace {

[[noreturn]] void fail(const std::filesystem::path& path, const std::string& what, int err) {
    throw Error("cannot " + what + " '" + path.string() + "': " + std::strerror(err));
}

}  // namespace

void write_file_atomic(const std::filesystem::path& path, std::string_view content) {
    const std::filesystem::path dir = path.has_parent_path() ? path.parent_path() : ".";
    std::string name = ".";  // appended piecewise: see the -Wrestrict note in error.hpp
    name += path.filename().string();
    name += ".tmp-";
    name.append(6, 'X');  // mkstemp(3) replaces the last six characters with a unique suffix
    std::string pattern = (dir / name).string();
    const int fd = ::mkstemp(pattern.data());
    if (fd < 0) fail(path, "create a temporary file for", errno);
    const std::string temp = pattern;
    auto abandon = [&](const std::string& what, int err) {
        ::close(fd);
        ::unlink(temp.c_str());
        fail(path, what, err);
    };
    // mkstemp creates the file with mode 0600; outputs are ordinary files (0644 before umask).
    if (::fchmod(fd, 0644) != 0) abandon("set permissions of", errno);
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
    std::filesystem::create_directories(dir, ec);
    if (ec) throw Error("cannot create folder '" + dir.string() + "': " + ec.message());
}

}  // namespace safesite::io
