// Atomic file writes and reading a whole file.
#include "moderato/support/file_util.hpp"

#include <fcntl.h>
#include <signal.h>
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

namespace {

// A temporary file of ours is named ".<target>.tmp-<pid>-<number>": the
// process that wrote it is in its name, so a later run can tell a file left
// by a process that died (killed, crashed, power cut) from one being written.
std::string temp_name(const std::string& target_name, unsigned number) {
    return "." + target_name + ".tmp-" + std::to_string(::getpid()) + "-" + std::to_string(number);
}

// The writer's process id when `name` is one of our temporary files, else 0.
pid_t temp_owner(const std::string& name) {
    const auto mark = name.rfind(".tmp-");
    if (name.empty() || name[0] != '.' || mark == std::string::npos || mark < 2) return 0;
    std::size_t i = mark + 5, digits = 0;
    long long pid = 0;
    for (; i < name.size() && name[i] >= '0' && name[i] <= '9' && digits < 10; ++i, ++digits)
        pid = pid * 10 + (name[i] - '0');
    if (digits == 0 || i >= name.size() || name[i] != '-' || i + 1 == name.size()) return 0;
    for (++i; i < name.size(); ++i)
        if (name[i] < '0' || name[i] > '9') return 0;
    return pid > 0 && pid <= 0x7fffffff ? static_cast<pid_t>(pid) : 0;
}

}  // namespace

int remove_stale_temp_files(const std::string& dir) {
    namespace fs = std::filesystem;
    std::error_code ec;
    int removed = 0;
    for (fs::directory_iterator it(dir, ec), end; !ec && it != end; it.increment(ec)) {
        const pid_t owner = temp_owner(it->path().filename().string());
        if (owner == 0 || owner == ::getpid()) continue;
        // No such process: its writer is gone, and the file can never be renamed into place.
        if (::kill(owner, 0) == 0 || errno != ESRCH) continue;
        // Ours are plain files: a folder or a symbolic link of that name is someone else's.
        std::error_code rm;
        if (fs::is_regular_file(it->symlink_status(rm)) && fs::remove(it->path(), rm)) ++removed;
    }
    return removed;
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
    remove_stale_temp_files(dir.string());
    std::random_device rd;
    std::string temp;
    int fd = -1;
    for (int attempt = 0; attempt < 16 && fd < 0; ++attempt) {
        temp = (dir / temp_name(target.filename().string(), rd() & 0xffffff)).string();
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
