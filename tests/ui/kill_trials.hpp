// Killing a saving process at random moments (test_kill_during_save.cpp):
// starting a child with pipes, the names of our temporary files, snapshots of
// the files a save writes, and the trial loop that checks each target is the
// old complete file or the new complete file after a SIGKILL.
#pragma once

#include <fcntl.h>
#include <poll.h>
#include <signal.h>
#include <spawn.h>
#include <sys/inotify.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <map>
#include <optional>
#include <random>
#include <set>
#include <string>
#include <thread>
#include <utility>
#include <vector>

#include "common/file_bytes.hpp"

extern char** environ;

namespace moderato::test {

namespace fs = std::filesystem;

// The writer's pid when `name` has the shape of an atomic write's temporary
// file (".<target>.tmp-<pid>-<number>", core support/file_util.cpp), else 0.
inline pid_t temp_file_pid(const std::string& name) {
    const auto mark = name.rfind(".tmp-");
    if (name.size() < 2 || name[0] != '.' || mark == std::string::npos || mark < 2) return 0;
    const auto dash = name.find('-', mark + 5);
    if (dash == std::string::npos || dash == mark + 5 || dash + 1 == name.size()) return 0;
    for (std::size_t i = mark + 5; i < name.size(); ++i)
        if (i != dash && (name[i] < '0' || name[i] > '9')) return 0;
    return static_cast<pid_t>(std::stol(name.substr(mark + 5, dash - mark - 5)));
}

// Every temporary file under `dir` (any depth), by path, with its writer's pid.
inline std::map<fs::path, pid_t> temp_files(const fs::path& dir) {
    std::map<fs::path, pid_t> out;
    for (const auto& e : fs::recursive_directory_iterator(dir))
        if (const pid_t pid = temp_file_pid(e.path().filename().string())) out[e.path()] = pid;
    return out;
}

// Relative path -> bytes of every file under `dir` that is not a temporary file.
using Files = std::map<std::string, std::string>;
inline Files target_files(const fs::path& dir) {
    Files out;
    for (const auto& e : fs::recursive_directory_iterator(dir))
        if (e.is_regular_file() && !temp_file_pid(e.path().filename().string()))
            out[fs::relative(e.path(), dir).string()] = read_file(e.path());
    return out;
}

// A child process with its standard input and output on pipes and its
// standard error in a file.
class Child {
public:
    // `pipeOut` false: standard output goes to `errLog` too (a program that is not read from).
    Child(const std::vector<std::string>& argv, const std::vector<std::string>& extraEnv, const fs::path& errLog,
          bool pipeOut) {
        int in[2], out[2];
        if (::pipe2(in, O_CLOEXEC) != 0 || ::pipe2(out, O_CLOEXEC) != 0) return;
        posix_spawn_file_actions_t fa;
        posix_spawn_file_actions_init(&fa);
        posix_spawn_file_actions_adddup2(&fa, in[0], 0);
        posix_spawn_file_actions_addopen(&fa, 2, errLog.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
        if (pipeOut) posix_spawn_file_actions_adddup2(&fa, out[1], 1);
        else posix_spawn_file_actions_adddup2(&fa, 2, 1);
        std::vector<char*> args, env;
        for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
        args.push_back(nullptr);
        for (char** e = environ; *e; ++e) env.push_back(*e);
        for (const auto& e : extraEnv) env.push_back(const_cast<char*>(e.c_str()));
        env.push_back(nullptr);
        if (::posix_spawn(&pid_, args[0], &fa, nullptr, args.data(), env.data()) != 0) pid_ = -1;
        posix_spawn_file_actions_destroy(&fa);
        ::close(in[0]);
        ::close(out[1]);
        in_ = in[1];
        out_ = out[0];
    }
    ~Child() {
        if (pid_ > 0 && !reaped_) {
            ::kill(pid_, SIGKILL);
            ::waitpid(pid_, nullptr, 0);
        }
        if (in_ >= 0) ::close(in_);
        if (out_ >= 0) ::close(out_);
    }
    Child(const Child&) = delete;
    Child& operator=(const Child&) = delete;

    pid_t pid() const { return pid_; }
    // The next line the child prints; "" when it ends or `ms` pass first.
    std::string readLine(int ms) {
        std::string line;
        const auto end = std::chrono::steady_clock::now() + std::chrono::milliseconds(ms);
        char c;
        while (std::chrono::steady_clock::now() < end) {
            pollfd p{out_, POLLIN, 0};
            const auto left =
                std::chrono::duration_cast<std::chrono::milliseconds>(end - std::chrono::steady_clock::now());
            if (::poll(&p, 1, static_cast<int>(std::max<long long>(1, left.count()))) <= 0) continue;
            if (::read(out_, &c, 1) != 1) return "";
            if (c == '\n') return line;
            line += c;
        }
        return "";
    }
    void send(const std::string& line) {
        const std::string l = line + "\n";
        [[maybe_unused]] const ssize_t n = ::write(in_, l.data(), l.size());
    }
    void kill() { ::kill(pid_, SIGKILL); }
    // Waits for the child to end; its wait status.
    int wait() {
        int status = 0;
        ::waitpid(pid_, &status, 0);
        reaped_ = true;
        return status;
    }

private:
    pid_t pid_ = -1;
    int in_ = -1, out_ = -1;
    bool reaped_ = false;
};

// One kind of save to kill: the command of the saving run, whether it is the
// save driver (which prints "ready" and saves when told) or a program that
// saves as soon as it starts, and the folder its files are written in.
struct SaveRun {
    std::vector<std::string> argv;
    bool handshake = true;
    fs::path folder;
    std::vector<std::string> env;
    fs::path errLog;
};

// What one run did: whether it ended by itself with status 0 (and "done"), and
// how long its save took (from "go", or from the start without a handshake).
struct RunResult {
    bool ok = false;
    double seconds = 0;
    std::string why;
    bool finishedFirst = false;  // a killed run had already ended by itself (status 0)
};

// Runs `run` to its end, or kills it `killAfter` seconds after its save began
// (a negative value: never). `atReady` is called when a driver is ready, before it is told to save.
// When temporary files exist during a run (Linux inotify on a folder and
// the folders in it): each [created, renamed or removed] interval in seconds
// from a start time, the moments at which a kill lands in the middle of a write.
class WriteWindows {
public:
    explicit WriteWindows(const fs::path& folder) : fd_(::inotify_init1(IN_NONBLOCK | IN_CLOEXEC)) {
        if (fd_ < 0) return;
        ::inotify_add_watch(fd_, folder.c_str(), kMask);
        for (const auto& e : fs::recursive_directory_iterator(folder))
            if (e.is_directory()) ::inotify_add_watch(fd_, e.path().c_str(), kMask);
        thread_ = std::thread([this] { watch(); });
    }
    ~WriteWindows() { stop(); }
    WriteWindows(const WriteWindows&) = delete;
    WriteWindows& operator=(const WriteWindows&) = delete;

    void setStart(std::chrono::steady_clock::time_point t) { start_ = t.time_since_epoch().count(); }
    // Stops watching; the intervals seen (each from the start time).
    std::vector<std::pair<double, double>> stop() {
        if (thread_.joinable()) {
            done_ = true;
            thread_.join();
        }
        if (fd_ >= 0) ::close(fd_);
        fd_ = -1;
        return windows_;
    }

private:
    static constexpr std::uint32_t kMask = IN_CREATE | IN_MOVED_FROM | IN_DELETE;
    void watch() {
        alignas(inotify_event) char buf[65536];
        std::map<std::string, double> open;  // temporary file -> when it was created
        while (!done_) {
            pollfd p{fd_, POLLIN, 0};
            if (::poll(&p, 1, 5) <= 0) continue;
            const ssize_t n = ::read(fd_, buf, sizeof buf);
            const std::chrono::steady_clock::time_point start{std::chrono::steady_clock::duration(start_.load())};
            const double now = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
            for (ssize_t i = 0; i < n;) {
                const auto* ev = reinterpret_cast<const inotify_event*>(buf + i);
                i += static_cast<ssize_t>(sizeof(inotify_event) + ev->len);
                const std::string name = ev->len ? ev->name : "";
                if (!temp_file_pid(name)) continue;
                const std::string key = std::to_string(ev->wd) + "/" + name;
                if (ev->mask & IN_CREATE) open[key] = now;
                else if (open.count(key)) {
                    windows_.emplace_back(open[key], now);
                    open.erase(key);
                }
            }
        }
    }
    int fd_;
    std::thread thread_;
    std::atomic<bool> done_{false};
    std::atomic<std::chrono::steady_clock::rep> start_{std::chrono::steady_clock::now().time_since_epoch().count()};
    std::vector<std::pair<double, double>> windows_;
};

// The last `bytes` of a run's error log, for failure messages (the log is
// in the test's temporary folder, which is gone when the test ends).
inline std::string log_tail(const fs::path& log, std::size_t bytes = 1500) {
    std::ifstream in(log, std::ios::binary);
    const std::string all((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    if (all.empty()) return "(the log is empty)";
    return all.size() > bytes ? "..." + all.substr(all.size() - bytes) : all;
}

template <class AtReady>
RunResult run_save(const SaveRun& run, double killAfter, AtReady&& atReady, pid_t* pidOut = nullptr,
                   std::vector<std::pair<double, double>>* windows = nullptr) {
    RunResult r;
    std::optional<WriteWindows> watcher;
    if (windows) watcher.emplace(run.folder);
    Child child(run.argv, run.env, run.errLog, run.handshake);
    if (pidOut) *pidOut = child.pid();
    if (child.pid() <= 0) return {false, 0, "cannot start " + run.argv[0], false};
    constexpr int kTimeoutMs = 600000;
    if (run.handshake) {
        if (child.readLine(kTimeoutMs) != "ready")
            return {false, 0, "the driver did not get ready (see " + run.errLog.string() + ")", false};
        atReady();
    }
    const auto start = std::chrono::steady_clock::now();
    if (watcher) watcher->setStart(start);
    if (run.handshake) child.send("go");
    if (killAfter >= 0) {
        std::this_thread::sleep_until(start + std::chrono::duration<double>(killAfter));
        child.kill();
        const int status = child.wait();
        // Killed by our SIGKILL, or ended well just before it: anything else (a crash) is a failure.
        r.finishedFirst = WIFEXITED(status) && WEXITSTATUS(status) == 0;
        r.ok = r.finishedFirst || (WIFSIGNALED(status) && WTERMSIG(status) == SIGKILL);
        r.seconds = killAfter;
        if (!r.ok)
            r.why = "the run ended by itself with status " + std::to_string(status) + "; the end of " +
                    run.errLog.string() + ":\n" + log_tail(run.errLog);
        return r;
    }
    const std::string done = run.handshake ? child.readLine(kTimeoutMs) : std::string("done");
    const int status = child.wait();
    r.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    r.ok = done == "done" && WIFEXITED(status) && WEXITSTATUS(status) == 0;
    if (watcher) *windows = watcher->stop();
    if (!r.ok)
        r.why = "the save did not finish (status " + std::to_string(status) + "); the end of " + run.errLog.string() +
                ":\n" + log_tail(run.errLog);
    return r;
}

}  // namespace moderato::test
