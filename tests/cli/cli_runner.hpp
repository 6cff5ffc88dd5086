// Runs a program (by default the real moderato-cli) as a child process and
// captures its exit status, stdout and stderr, for tests of the command line.
//
//   auto r = moderato::test::run_cli({"fit", "--data", "ok/a.csv", ...}, {.cwd = dir});
//   EXPECT_EQ(r.exit_code, 2) << r.describe();
//
// POSIX only (fork/exec). stdout and stderr go to temporary files (no pipe
// can fill up and dead-lock), stdin is /dev/null, and a child that runs past
// the timeout is killed and reported as timed out. Also here: FileSnapshot,
// to check that a run left a file's bytes and modification time alone.
#pragma once

#include <fcntl.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <chrono>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "common/file_bytes.hpp"

namespace moderato::test {

struct RunOptions {
    std::string cwd;                             // empty: the test's own working directory
    std::chrono::milliseconds timeout{120'000};  // generous: sanitizer builds are slow
    std::vector<std::string> environment;        // "NAME=value" set for the child (over the inherited ones)
    bool detached = false;                       // a session of its own: no controlling terminal (setsid)
};

struct RunResult {
    bool exited = false;     // ended by exit() (not by a signal, not timed out)
    int exit_code = -1;      // valid when exited
    int signal = 0;          // the signal that ended it, or 0
    bool timed_out = false;  // killed by us after RunOptions::timeout
    std::string out;         // everything written to stdout
    std::string err;         // everything written to stderr

    // One readable paragraph for failure messages.
    std::string describe() const {
        std::ostringstream s;
        if (timed_out) s << "timed out; ";
        if (exited) s << "exit code " << exit_code;
        else if (signal) s << "killed by signal " << signal << " (" << strsignal(signal) << ")";
        s << "\n--- stdout ---\n" << out << "\n--- stderr ---\n" << err << "\n---";
        return s.str();
    }
};

namespace detail {

// A new empty temporary file; returns its path.
inline std::string make_temp(const char* tag) {
    std::string templ =
        (std::filesystem::temp_directory_path() / (std::string("moderato-cli-") + tag + "-XXXXXX")).string();
    std::vector<char> buf(templ.begin(), templ.end());
    buf.push_back('\0');
    const int fd = ::mkstemp(buf.data());
    if (fd < 0) throw std::runtime_error("cannot create a temporary file in " + templ + ": " + std::strerror(errno));
    ::close(fd);
    return std::string(buf.data());
}

}  // namespace detail

// Runs `program` with `args` (argv[0] is the program path).
inline RunResult run_process(const std::string& program, const std::vector<std::string>& args,
                             const RunOptions& options = {}) {
    const std::string out_path = detail::make_temp("stdout");
    const std::string err_path = detail::make_temp("stderr");

    // Everything the child needs is prepared before fork(): after it, the
    // child only calls async-signal-safe functions.
    std::vector<std::string> storage;
    storage.reserve(args.size() + 1);
    storage.push_back(program);
    storage.insert(storage.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (auto& s : storage) argv.push_back(s.data());
    argv.push_back(nullptr);
    const char* cwd = options.cwd.empty() ? nullptr : options.cwd.c_str();
    // The child's environment: ours, with options.environment set over it.
    std::vector<std::string> env_storage;
    for (char** e = environ; *e; ++e) {
        const std::string entry(*e);
        const std::string name = entry.substr(0, entry.find('='));
        bool replaced = false;
        for (const auto& set : options.environment) replaced |= set.substr(0, set.find('=')) == name;
        if (!replaced) env_storage.push_back(entry);
    }
    env_storage.insert(env_storage.end(), options.environment.begin(), options.environment.end());
    std::vector<char*> envp;
    for (auto& s : env_storage) envp.push_back(s.data());
    envp.push_back(nullptr);

    const pid_t pid = ::fork();
    if (pid < 0) throw std::runtime_error(std::string("fork failed: ") + std::strerror(errno));
    if (pid == 0) {
        const int in = ::open("/dev/null", O_RDONLY);
        const int out = ::open(out_path.c_str(), O_WRONLY | O_TRUNC);
        const int err = ::open(err_path.c_str(), O_WRONLY | O_TRUNC);
        if (in < 0 || out < 0 || err < 0) ::_exit(126);
        if (::dup2(in, 0) < 0 || ::dup2(out, 1) < 0 || ::dup2(err, 2) < 0) ::_exit(126);
        if (cwd && ::chdir(cwd) != 0) ::_exit(126);
        if (options.detached && ::setsid() < 0) ::_exit(126);
        ::execve(program.c_str(), argv.data(), envp.data());
        ::_exit(127);
    }

    RunResult r;
    int status = 0;
    const auto deadline = std::chrono::steady_clock::now() + options.timeout;
    for (;;) {
        const pid_t w = ::waitpid(pid, &status, WNOHANG);
        if (w == pid) break;
        if (w < 0 && errno != EINTR) throw std::runtime_error(std::string("waitpid failed: ") + std::strerror(errno));
        if (std::chrono::steady_clock::now() > deadline) {
            ::kill(pid, SIGKILL);
            while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {
            }
            r.timed_out = true;
            break;
        }
        std::this_thread::sleep_for(std::chrono::milliseconds(2));
    }
    if (!r.timed_out && WIFEXITED(status)) {
        r.exited = true;
        r.exit_code = WEXITSTATUS(status);
    } else if (WIFSIGNALED(status)) {
        r.signal = WTERMSIG(status);
    }
    r.out = read_file(out_path);
    r.err = read_file(err_path);
    std::filesystem::remove(out_path);
    std::filesystem::remove(err_path);
    return r;
}

#ifdef MODERATO_CLI
// Runs the moderato-cli binary this test suite was built against.
inline RunResult run_cli(const std::vector<std::string>& args, RunOptions options = {}) {
#if defined(__SANITIZE_ADDRESS__)
    // Under AddressSanitizer, LeakSanitizer's exit-time scan now and then
    // faults inside its own code (ScanRangeForPointers reading an address
    // below 0x10000, "Tracer caught signal 11") in `render`, which loads Qt's
    // plugins (here 1 of 10, then 12 of 30, pairs run at once). Memory errors are
    // still caught there; leaks in the same drawing code are checked in the
    // workbench tests, which render in-process.
    if (!args.empty() && args.front() == "render") options.environment.push_back("LSAN_OPTIONS=detect_leaks=0");
#endif
    return run_process(MODERATO_CLI, args, options);
}
#endif

// The bytes and modification time of a path (or that it does not exist),
// to compare before and after a run.
struct FileSnapshot {
    bool exists = false;
    bool is_directory = false;
    std::string bytes;                 // regular files
    std::vector<std::string> entries;  // directories: sorted names
    long long mtime_sec = 0, mtime_nsec = 0;

    static FileSnapshot take(const std::string& path) {
        FileSnapshot s;
        struct stat st {};
        if (::stat(path.c_str(), &st) != 0) return s;
        s.exists = true;
        s.mtime_sec = static_cast<long long>(st.st_mtim.tv_sec);
        s.mtime_nsec = static_cast<long long>(st.st_mtim.tv_nsec);
        if (S_ISDIR(st.st_mode)) {
            s.is_directory = true;
            for (const auto& e : std::filesystem::directory_iterator(path))
                s.entries.push_back(e.path().filename().string());
            std::sort(s.entries.begin(), s.entries.end());
        } else {
            s.bytes = read_file(path);
        }
        return s;
    }

    bool operator==(const FileSnapshot&) const = default;
};

}  // namespace moderato::test
