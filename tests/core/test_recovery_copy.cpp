// Recovery copies of unsaved edits (project/recovery_copy): the JSON round
// trip, unreadable copies refused with a message naming the file, and whether
// the process that wrote a copy still runs.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <string>

#include "common/input_error.hpp"
#include "moderato/project/recovery_copy.hpp"

using namespace moderato;
using moderato::test::input_error_of;

namespace {

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

RecoveryCopy example() {
    RecoveryCopy c;
    c.pid = 4242;
    c.process_start = 987654321;
    c.written = "2026-12-04T05:06:07Z";
    c.project_path = "/home/someone/study/study.moderato";
    c.project_sha256 = std::string(64, 'a');
    DataSource d;
    d.id = "survey";
    d.path = "data/survey.csv";
    c.project.datasets.push_back(d);
    c.data_paths["survey"] = "/home/someone/study/data/survey.csv";
    Analysis a;
    a.id = "main";
    a.name = "x × z, renamed";
    a.dataset = "survey";
    c.project.analyses.push_back(a);
    return c;
}

}  // namespace

TEST(RecoveryCopy, RoundTripKeepsEveryField) {
    const RecoveryCopy c = example();
    const RecoveryCopy back = recovery_from_json(recovery_to_json(c), "copy.json");
    EXPECT_EQ(back.pid, c.pid);
    EXPECT_EQ(back.process_start, c.process_start);
    EXPECT_EQ(back.written, c.written);
    EXPECT_EQ(back.project_path, c.project_path);
    EXPECT_EQ(back.project_sha256, c.project_sha256);
    EXPECT_EQ(back.data_paths, c.data_paths);
    EXPECT_TRUE(back.project == c.project);
}

TEST(RecoveryCopy, UnreadableCopiesNameTheFileAndTheProblem) {
    const std::string good = recovery_to_json(example());
    // Cut anywhere: never a crash, always an InputError naming the file (by construction of the format).
    for (std::size_t n = 0; n < good.size(); n += 7) {
        const std::string message = input_error_of([&] { recovery_from_json(good.substr(0, n), "cut.json"); });
        EXPECT_TRUE(contains(message, "cut.json")) << n << ": " << message;
    }
    EXPECT_TRUE(contains(input_error_of([] { recovery_from_json("[1, 2]", "a.json"); }), "expected a JSON object"));
    EXPECT_TRUE(contains(input_error_of([] { recovery_from_json(R"({"moderato_recovery": "1"})", "b.json"); }),
                         "\"moderato_recovery\""));
    EXPECT_TRUE(contains(input_error_of([] { recovery_from_json(R"({"moderato_recovery": 99})", "c.json"); }),
                         "another version"));
    std::string number = good;
    number.replace(number.find("4242"), 4, "99999999999999999999999999");
    EXPECT_TRUE(contains(input_error_of([&] { recovery_from_json(number, "d.json"); }), "d.json"));
    std::string project = good;
    project.replace(project.find("schema_version"), 14, "schema_versio_");
    EXPECT_TRUE(contains(input_error_of([&] { recovery_from_json(project, "e.json"); }), "e.json (project)"));
}

TEST(RecoveryCopy, ProcessAliveTellsARunningProcessFromAnEndedOne) {
    const long long self = ::getpid();
    const long long start = process_start_time(self);
    EXPECT_GT(start, 0);  // Linux proc(5): field 22 of /proc/<pid>/stat, clock ticks since boot
    EXPECT_TRUE(process_alive(self, start));
    EXPECT_TRUE(process_alive(self, 0));           // start unknown: the pid decides
    EXPECT_FALSE(process_alive(self, start + 1));  // the same pid, started at another time: a reused pid
    const pid_t child = ::fork();
    if (child == 0) ::_exit(0);
    // Exited but not yet reaped: a zombie (Linux proc(5) state Z), which kill(pid, 0) still finds.
    siginfo_t info{};
    ASSERT_EQ(::waitid(P_PID, static_cast<id_t>(child), &info, WEXITED | WNOWAIT), 0);
    EXPECT_FALSE(process_alive(child, 0));
    int status = 0;
    ::waitpid(child, &status, 0);  // POSIX wait(2): a reaped child's pid names no process
    EXPECT_FALSE(process_alive(child, 0));
    EXPECT_FALSE(process_alive(0, 0));
    EXPECT_FALSE(process_alive(-5, 0));
}
