// Atomic file writes and reading a whole file.
#include "moderato/support/file_util.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <random>

#include "moderato/support/error.hpp"

namespace moderato {

std::string read_file_bytes(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path + ": cannot be read (" + std::strerror(errno) + ")");
    std::string out((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    if (in.bad()) throw InputError(path + ": read error");
    return out;
}

void write_file_atomically(const std::string& path, std::string_view content) {
    namespace fs = std::filesystem;
    // Writing through a symbolic link replaces the file it points to, not the link.
    fs::path target(path);
    std::error_code ec;
    if (fs::is_symlink(target, ec)) {
        const fs::path real = fs::weakly_canonical(target, ec);
        if (!ec) target = real;
    }
    const fs::path dir = target.has_parent_path() ? target.parent_path() : fs::path(".");
    // A replaced file keeps its permissions; a new one gets 0666 less the umask.
    mode_t mode = 0666;
    bool keep_mode = false;
    struct stat old {};
    if (::stat(target.c_str(), &old) == 0 && S_ISREG(old.st_mode)) {
        mode = old.st_mode & 07777;
        keep_mode = true;
    }
    std::random_device rd;
    std::string temp;
    int fd = -1;
    for (int attempt = 0; attempt < 16 && fd < 0; ++attempt) {
        temp = (dir / ("." + target.filename().string() + ".tmp-" + std::to_string(rd() & 0xffffff))).string();
        fd = ::open(temp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, mode);
        if (fd < 0 && errno != EEXIST) break;
    }
    if (fd < 0)
        throw InputError(path + ": cannot be written (" + std::strerror(errno) + "); the file was left as it was");
    const auto fail = [&](const char* what) {
        const int err = errno;
        ::close(fd);
        ::unlink(temp.c_str());
        throw InputError(path + ": " + what + " (" + std::strerror(err) + "); the file was left as it was");
    };
    if (keep_mode && ::fchmod(fd, mode) != 0) fail("cannot be written");
    std::size_t done = 0;
    while (done < content.size()) {
        const ssize_t n = ::write(fd, content.data() + done, content.size() - done);
        if (n < 0) {
            if (errno == EINTR) continue;
            fail("cannot be written");
        }
        done += static_cast<std::size_t>(n);
    }
    if (::fsync(fd) != 0) fail("cannot be flushed to disk");
    if (::close(fd) != 0) {
        const int err = errno;
        ::unlink(temp.c_str());
        throw InputError(path + ": cannot be written (" + std::strerror(err) + "); the file was left as it was");
    }
    if (::rename(temp.c_str(), target.c_str()) != 0) {
        const int err = errno;
        ::unlink(temp.c_str());
        throw InputError(path + ": cannot be replaced (" + std::strerror(err) + "); the file was left as it was");
    }
    // Make the rename itself durable (best effort: some file systems refuse).
    const int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (dfd >= 0) {
        ::fsync(dfd);
        ::close(dfd);
    }
}

}  // namespace moderato
