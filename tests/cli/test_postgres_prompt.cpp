// moderato-cli asks for a PostgreSQL password at the terminal when the
// server wants one that libpq's password file does not give: typed without
// echo, used once, never printed; and without a terminal it says so.
// The CLI runs on a pseudo-terminal (forkpty) as a user at a shell would.
#include <gtest/gtest.h>
#include <poll.h>
#include <pty.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <string>
#include <vector>

#include "cli/cli_runner.hpp"
#include "common/pg_cluster.hpp"

namespace {

using moderato::test::shared_cluster;

constexpr const char* kSecret = "amber-kettle-north";

// What the terminal showed, and how the program ended.
struct Session {
    std::string screen;
    int exit_code = -1;
};

// Reads what the program writes to the terminal until `until` appears (or
// the program ends, or 60 s pass), into `screen`.
bool read_until(int fd, std::string& screen, const std::string& until) {
    const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
    while (until.empty() || screen.find(until) == std::string::npos) {
        if (std::chrono::steady_clock::now() > deadline) return false;
        pollfd p{fd, POLLIN, 0};
        if (::poll(&p, 1, 200) <= 0) continue;
        char buf[4096];
        const ssize_t n = ::read(fd, buf, sizeof buf);
        if (n <= 0) return until.empty();  // the program ended (EIO on the master)
        screen.append(buf, static_cast<std::size_t>(n));
    }
    return true;
}

// Runs the CLI on a terminal and types `answer` and Enter once it asks for a password.
Session at_terminal(const std::vector<std::string>& args, const std::string& answer) {
    std::vector<std::string> all{MODERATO_CLI};
    all.insert(all.end(), args.begin(), args.end());
    std::vector<char*> argv;
    for (auto& a : all) argv.push_back(a.data());
    argv.push_back(nullptr);
    int master = -1;
    const pid_t pid = ::forkpty(&master, nullptr, nullptr, nullptr);
    if (pid == 0) {
        ::execv(MODERATO_CLI, argv.data());
        ::_exit(127);
    }
    Session s;
    if (pid < 0) return s;
    if (read_until(master, s.screen, "Password for ")) {
        const std::string line = answer + "\n";
        [[maybe_unused]] const auto n = ::write(master, line.data(), line.size());
        read_until(master, s.screen, "");
    }
    ::close(master);
    int status = 0;
    while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {
    }
    s.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return s;
}

class PostgresPrompt : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        moderato::test::require_password("porter", kSecret);
        db_ = moderato::test::fresh_database("prompttest");
        shared_cluster().exec(
            "CREATE TABLE trips (km double precision, stops integer); GRANT SELECT ON trips TO porter;"
            "INSERT INTO trips VALUES (1.5, 2), (3.25, 4), (8, 1);",
            db_);
    }
    static std::vector<std::string> columns() {
        return {"columns", "--data", shared_cluster().uri(db_, "porter"), "--table", "trips"};
    }
    static std::string db_;
};
std::string PostgresPrompt::db_;

TEST_F(PostgresPrompt, AsksAtTheTerminalWithoutEcho) {
    const Session s = at_terminal(columns(), kSecret);
    EXPECT_EQ(s.exit_code, 0) << s.screen;
    EXPECT_NE(s.screen.find("Password for " + shared_cluster().uri(db_, "porter") + ": "), std::string::npos)
        << s.screen;
    EXPECT_NE(s.screen.find("stops"), std::string::npos) << s.screen;  // the columns were read (made above)
    EXPECT_EQ(s.screen.find(kSecret), std::string::npos) << "echoed: " << s.screen;
}

TEST_F(PostgresPrompt, AWrongPasswordIsRefusedAndNotAskedAgain) {
    const Session s = at_terminal(columns(), "not-it");
    EXPECT_EQ(s.exit_code, 2) << s.screen;
    EXPECT_NE(s.screen.find("password authentication failed"), std::string::npos) << s.screen;
    EXPECT_EQ(s.screen.find("not-it"), std::string::npos) << s.screen;
}

TEST_F(PostgresPrompt, WithoutATerminalItSaysWhereAPasswordCanComeFrom) {
    moderato::test::RunOptions o;
    o.detached = true;
    const auto r = moderato::test::run_cli(columns(), o);
    EXPECT_EQ(r.exit_code, 2) << r.describe();
    EXPECT_NE(r.err.find("asks for a password"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("~/.pgpass"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("no terminal"), std::string::npos) << r.err;
}

}  // namespace
