// Self-checks of the process helper in cli_runner.hpp, so that the CLI tests'
// assertions on exit codes, signals, stderr and untouched files can fail when
// they should. Expected behaviour: POSIX sh and waitpid semantics (common
// practice).
#include <gtest/gtest.h>

#include <sys/stat.h>

#include <chrono>
#include <csignal>
#include <filesystem>
#include <fstream>
#include <string>

#include "cli_runner.hpp"

namespace {

using moderato::test::FileSnapshot;
using moderato::test::run_process;
using moderato::test::RunOptions;

TEST(CliRunner, CapturesExitCodeAndSeparatesStdoutFromStderr) {
    const auto r = run_process("/bin/sh", {"-c", "printf out; printf err >&2; exit 3"});
    EXPECT_TRUE(r.exited);
    EXPECT_EQ(r.exit_code, 3);
    EXPECT_EQ(r.signal, 0);
    EXPECT_EQ(r.out, "out");
    EXPECT_EQ(r.err, "err");
}

TEST(CliRunner, ReportsDeathBySignal) {
    const auto r = run_process("/bin/sh", {"-c", "kill -SEGV $$"});
    EXPECT_FALSE(r.exited);
    EXPECT_EQ(r.signal, SIGSEGV);
}

TEST(CliRunner, RunsInTheRequestedDirectory) {
    RunOptions o;
    o.cwd = std::filesystem::temp_directory_path().string();
    const auto r = run_process("/bin/sh", {"-c", "pwd -P"}, o);
    EXPECT_EQ(r.out, std::filesystem::canonical(o.cwd).string() + "\n");
}

TEST(CliRunner, KillsAChildThatOutlivesTheTimeout) {
    RunOptions o;
    o.timeout = std::chrono::milliseconds(200);
    const auto r = run_process("/bin/sh", {"-c", "exec sleep 30"}, o);
    EXPECT_TRUE(r.timed_out);
    EXPECT_FALSE(r.exited);
}

TEST(CliRunner, MissingProgramExits127) {
    const auto r = run_process("/nonexistent/moderato-cli", {});
    EXPECT_TRUE(r.exited);
    EXPECT_EQ(r.exit_code, 127);
}

TEST(CliRunner, SnapshotSeesChangedBytesAndChangedTime) {
    const auto dir =
        std::filesystem::temp_directory_path() / ("moderato-cli-runner-test-" + std::to_string(::getpid()));
    std::filesystem::create_directories(dir);
    const std::string path = (dir / "f.csv").string();
    { std::ofstream(path, std::ios::binary) << "a,b\n1,2\n"; }
    const FileSnapshot before = FileSnapshot::take(path);
    EXPECT_TRUE(before.exists);
    EXPECT_TRUE(FileSnapshot::take(path) == before);

    // Same bytes, other modification time.
    struct timespec times[2] = {{0, UTIME_OMIT}, {12345, 678}};
    ASSERT_EQ(::utimensat(AT_FDCWD, path.c_str(), times, 0), 0);
    EXPECT_FALSE(FileSnapshot::take(path) == before);

    // Other bytes, the old modification time restored.
    { std::ofstream(path, std::ios::binary) << "a,b\n1,3\n"; }
    times[1] = {before.mtime_sec, before.mtime_nsec};
    ASSERT_EQ(::utimensat(AT_FDCWD, path.c_str(), times, 0), 0);
    EXPECT_FALSE(FileSnapshot::take(path) == before);

    // A new file beside it shows in the directory listing.
    const auto listing = FileSnapshot::take(dir.string()).entries;
    { std::ofstream((dir / "f.csv.tmp").string()) << ""; }
    EXPECT_NE(FileSnapshot::take(dir.string()).entries, listing);
    std::filesystem::remove_all(dir);
}

}  // namespace
