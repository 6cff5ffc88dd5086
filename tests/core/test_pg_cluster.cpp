// The throwaway clusters of tests/common/pg_cluster.hpp: socket only, run by
// an unprivileged user, stopped when the object goes.
#include <gtest/gtest.h>
#include <libpq-fe.h>
#include <sys/stat.h>
#include <unistd.h>

#include "common/pg_cluster.hpp"

namespace {

using moderato::test::PgCluster;

TEST(PgCluster, ListensOnItsSocketOnlyAndStopsWhenDestroyed) {
    std::string uri;
    std::filesystem::path socket;
    {
        PgCluster cluster("pg-life");
        uri = cluster.uri();
        // listen_addresses = '' means no TCP socket (PostgreSQL documentation, "Connection Settings").
        EXPECT_EQ(cluster.exec("SHOW listen_addresses"), "");
        EXPECT_EQ(cluster.exec("SHOW fsync"), "off");
        socket = cluster.folder() / ".s.PGSQL.5432";
        EXPECT_TRUE(std::filesystem::exists(socket)) << socket;
        // The data folder belongs to the server's user: nobody when we are root, else us.
        struct stat st {};
        ASSERT_EQ(::stat(cluster.data_dir().c_str(), &st), 0);
        EXPECT_NE(st.st_uid, 0u);
        if (::geteuid() != 0) {
            EXPECT_EQ(st.st_uid, ::geteuid());
        }
    }
    EXPECT_FALSE(std::filesystem::exists(socket));
    PGconn* c = PQconnectdb(uri.c_str());
    EXPECT_NE(PQstatus(c), CONNECTION_OK);
    PQfinish(c);
}

TEST(PgCluster, StopsOnAnExceptionLeavingTheScope) {
    std::filesystem::path folder;
    try {
        PgCluster cluster("pg-throw");
        folder = cluster.folder();
        throw std::runtime_error("a failing test");
    } catch (const std::runtime_error&) {
    }
    EXPECT_FALSE(std::filesystem::exists(folder));  // stopped, and its folder removed
}

}  // namespace
