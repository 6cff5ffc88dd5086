// Throwaway PostgreSQL 15 clusters for the tests: initdb in a fresh temporary
// folder, Unix socket only (listen_addresses = '', the socket in that folder),
// fsync off, pg_ctl start -w; pg_ctl stop -m fast when the object goes, when
// the process exits (atexit) and when it terminates on an uncaught exception
// (std::terminate) or on SIGINT/SIGTERM/SIGABRT.
//
// initdb and pg_ctl refuse to run as root, so when the tests run as root the
// folder is given to `nobody` and every server program runs as that user
// (setpriv); otherwise they run as the current user. The cluster's superuser
// is "moderato" with trust authentication on the socket, so a test connects
// with uri("db") and needs no password (a password test sets one itself).
//
// The server programs come from /usr/lib/postgresql/15/bin (or
// MODERATO_PG_BINDIR). deps.sh installs them; a missing server is a failure,
// never a skip.
#pragma once

#include <libpq-fe.h>
#include <pwd.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <fcntl.h>

#include <csignal>
#include <cstdlib>
#include <exception>
#include <filesystem>
#include <fstream>
#include <memory>
#include <mutex>
#include <set>
#include <stdexcept>
#include <string>
#include <vector>

#include "common/temp_dir.hpp"

extern char** environ;

namespace moderato::test {

// The folder of initdb, pg_ctl and postgres: MODERATO_PG_BINDIR when set,
// else PostgreSQL 15's (Debian's postgresql-15, which deps.sh installs).
inline std::string pg_bindir() {
    const char* env = std::getenv("MODERATO_PG_BINDIR");
    const std::string dir = env && *env ? env : "/usr/lib/postgresql/15/bin";
    if (std::filesystem::exists(dir + "/initdb")) return dir;
    throw std::runtime_error("PostgreSQL's server programs are not installed (no initdb in " + dir +
                             "); run ./deps.sh test, or set MODERATO_PG_BINDIR");
}

// Runs argv (argv[0] a path) and waits; as `nobody` when we are root.
// Returns the exit status (-1 when it could not start).
inline int run_server_program(std::vector<std::string> argv, const std::string& log_file = {}) {
    if (::geteuid() == 0)
        argv.insert(argv.begin(), {"/usr/bin/setpriv", "--reuid=nobody", "--regid=nogroup", "--clear-groups", "--"});
    std::vector<char*> args;
    for (auto& a : argv) args.push_back(a.data());
    args.push_back(nullptr);
    posix_spawn_file_actions_t actions;
    ::posix_spawn_file_actions_init(&actions);
    const std::string sink = log_file.empty() ? std::string("/dev/null") : log_file;
    ::posix_spawn_file_actions_addopen(&actions, 1, sink.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0644);
    ::posix_spawn_file_actions_adddup2(&actions, 1, 2);
    pid_t pid = 0;
    const int rc = ::posix_spawn(&pid, args[0], &actions, nullptr, args.data(), environ);
    ::posix_spawn_file_actions_destroy(&actions);
    if (rc != 0) return -1;
    int status = 0;
    while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {
    }
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

class PgCluster;

namespace detail {
// The clusters still running, stopped by the exit paths.
inline std::mutex& live_mutex() {
    static std::mutex m;
    return m;
}
inline std::set<PgCluster*>& live_clusters() {
    static std::set<PgCluster*> s;
    return s;
}
void stop_all_clusters();
}  // namespace detail

class PgCluster {
public:
    // `settings`: extra postgresql.conf lines (e.g. "log_statement = all").
    explicit PgCluster(const std::string& tag = "pg", const std::vector<std::string>& settings = {})
        : dir_(std::make_unique<TempDir>(tag)) {
        install_exit_paths();
        const std::filesystem::path data = dir_->path() / "data";
        if (::geteuid() == 0) give_to_nobody(dir_->path());
        const std::string bin = pg_bindir();
        const std::string setup = (dir_->path() / "setup.log").string();  // ours (root's, when root)
        const std::string log = (dir_->path() / "server.log").string();   // the server's, written by pg_ctl
        if (run_server_program({bin + "/initdb", "-D", data.string(), "-U", "moderato", "--auth=trust", "-E", "UTF8",
                                "--locale=C", "--no-sync"},
                               setup) != 0)
            throw std::runtime_error("initdb failed; see " + setup);
        std::ofstream conf(data / "postgresql.conf", std::ios::app);
        conf << "listen_addresses = ''\nunix_socket_directories = '" << dir_->path().string()
             << "'\nfsync = off\nsynchronous_commit = off\nfull_page_writes = off\nmax_connections = 30\n"
             << "shared_buffers = 32MB\nlog_min_messages = warning\n";
        for (const auto& s : settings) conf << s << "\n";
        conf.close();
        if (run_server_program({bin + "/pg_ctl", "-D", data.string(), "-l", log, "-w", "-t", "60", "start"}, setup) !=
            0)
            throw std::runtime_error("pg_ctl start failed; see " + log + " and " + setup);
        running_ = true;
        std::lock_guard lock(detail::live_mutex());
        detail::live_clusters().insert(this);
    }
    ~PgCluster() {
        {
            std::lock_guard lock(detail::live_mutex());
            detail::live_clusters().erase(this);
        }
        stop();
    }
    PgCluster(const PgCluster&) = delete;
    PgCluster& operator=(const PgCluster&) = delete;

    void stop() noexcept {
        if (!running_) return;
        running_ = false;
        try {
            run_server_program(
                {pg_bindir() + "/pg_ctl", "-D", (dir_->path() / "data").string(), "-m", "fast", "-w", "stop"});
        } catch (...) {
        }
    }

    const std::filesystem::path& folder() const { return dir_->path(); }
    std::filesystem::path data_dir() const { return dir_->path() / "data"; }
    // Tells the running server to read its configuration files again.
    void reload() const { exec("SELECT pg_reload_conf()"); }
    std::string socket_dir() const { return dir_->path().string(); }
    std::filesystem::path log_file() const { return dir_->path() / "server.log"; }
    // A libpq URI of database `db` on this cluster as its superuser.
    std::string uri(const std::string& db = "postgres", const std::string& user = "moderato") const {
        return "postgresql:///" + db + "?host=" + socket_dir() + "&user=" + user;
    }

    // Runs SQL (several statements allowed) on `db`; throws with the server's
    // message on failure. Returns the first row's first value of the last result, if any.
    std::string exec(const std::string& sql, const std::string& db = "postgres") const {
        PGconn* c = PQconnectdb(uri(db).c_str());
        if (PQstatus(c) != CONNECTION_OK) {
            const std::string msg = PQerrorMessage(c);
            PQfinish(c);
            throw std::runtime_error("connecting to the test cluster: " + msg);
        }
        PGresult* r = PQexec(c, sql.c_str());
        const auto st = PQresultStatus(r);
        std::string value;
        if (st == PGRES_TUPLES_OK && PQntuples(r) > 0 && PQnfields(r) > 0) value = PQgetvalue(r, 0, 0);
        const std::string msg = PQresultErrorMessage(r);
        PQclear(r);
        PQfinish(c);
        if (st != PGRES_TUPLES_OK && st != PGRES_COMMAND_OK) throw std::runtime_error("SQL failed: " + msg);
        return value;
    }
    // Loads rows with COPY FROM STDIN (text format: tab-separated, \N for NULL).
    void copy_in(const std::string& table, const std::string& text, const std::string& db = "postgres") const {
        PGconn* c = PQconnectdb(uri(db).c_str());
        PGresult* r = PQexec(c, ("COPY " + table + " FROM STDIN").c_str());
        bool ok = PQresultStatus(r) == PGRES_COPY_IN;
        PQclear(r);
        if (ok) ok = PQputCopyData(c, text.data(), static_cast<int>(text.size())) == 1 && PQputCopyEnd(c, nullptr) == 1;
        r = PQgetResult(c);
        ok = ok && PQresultStatus(r) == PGRES_COMMAND_OK;
        const std::string msg = PQerrorMessage(c);
        PQclear(r);
        while ((r = PQgetResult(c))) PQclear(r);
        PQfinish(c);
        if (!ok) throw std::runtime_error("COPY into " + table + " failed: " + msg);
    }

private:
    static void give_to_nobody(const std::filesystem::path& p) {
        const passwd* pw = ::getpwnam("nobody");
        if (!pw || ::chown(p.c_str(), pw->pw_uid, pw->pw_gid) != 0)
            throw std::runtime_error("cannot give " + p.string() + " to the user nobody");
    }
    static void install_exit_paths() {
        static std::once_flag once;
        std::call_once(once, [] {
            std::atexit(detail::stop_all_clusters);
            static std::terminate_handler previous = std::set_terminate([] {
                detail::stop_all_clusters();
                if (previous) previous();
                std::abort();
            });
            for (int sig : {SIGINT, SIGTERM, SIGABRT})
                std::signal(sig, [](int s) {
                    detail::stop_all_clusters();
                    std::signal(s, SIG_DFL);
                    std::raise(s);
                });
        });
    }

    std::unique_ptr<TempDir> dir_;
    bool running_ = false;
};

inline void detail::stop_all_clusters() {
    std::set<PgCluster*> clusters;
    {
        std::unique_lock lock(live_mutex(), std::try_to_lock);
        if (!lock.owns_lock()) return;
        clusters = live_clusters();
    }
    for (PgCluster* c : clusters) c->stop();
}

// One cluster for the whole test binary, started on first use and stopped at
// exit (tests share it; each uses its own database or tables).
inline PgCluster& shared_cluster() {
    static PgCluster cluster("pg-shared");
    return cluster;
}

// A login role on the shared cluster that must give `password` on the socket
// (scram-sha-256; every other role stays on trust). Idempotent. libpq's
// password file and PGPASSWORD are set aside for this process and the
// programs it starts, so the password comes only from where a test gives it.
inline void require_password(const std::string& role, const std::string& password) {
    ::unsetenv("PGPASSWORD");
    ::setenv("PGPASSFILE", "/nonexistent/moderato-test-pgpass", 1);
    PgCluster& c = shared_cluster();
    if (c.exec("SELECT count(*) FROM pg_roles WHERE rolname = '" + role + "'") == "0")
        c.exec("CREATE ROLE " + role + " LOGIN PASSWORD '" + password + "'");
    const std::filesystem::path hba = c.data_dir() / "pg_hba.conf";
    std::ifstream in(hba);
    const std::string old((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    const std::string line = "local all " + role + " scram-sha-256\n";
    if (old.find(line) != std::string::npos) return;
    std::ofstream(hba, std::ios::trunc) << line << old;
    c.reload();
}

// A fresh database on the shared cluster, named for the test.
inline std::string fresh_database(const std::string& name) {
    shared_cluster().exec("DROP DATABASE IF EXISTS " + name);
    shared_cluster().exec("CREATE DATABASE " + name);
    return name;
}

}  // namespace moderato::test
