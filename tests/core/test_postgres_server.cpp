// Meeting a PostgreSQL server as the connection dialog and the project
// loader do (postgres_source.hpp, project_loader.hpp): the address of the
// dialog's fields, the tables a user may read, the first rows for a
// preview, and a server that asks for a password (PasswordNeeded, then the
// password given for the session). Expected values are what the test makes.
#include <gtest/gtest.h>

#include "common/file_bytes.hpp"
#include "common/pg_cluster.hpp"
#include "common/temp_dir.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/postgres_source.hpp"

namespace moderato {
namespace {

using test::shared_cluster;

constexpr const char* kSecret = "quiet-otter-lantern";

// A role that must give a password (scram-sha-256 on the socket; the rest
// of the shared cluster stays on trust), with a table it may read. libpq's
// password file and PGPASSWORD are kept out of the way.
class PostgresServer : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        test::require_password("warden", kSecret);
        db_ = test::fresh_database("servertest");
        shared_cluster().exec(
            "CREATE SCHEMA shop; CREATE TABLE visits (y double precision, x double precision);"
            "INSERT INTO visits SELECT g, g * 2 FROM generate_series(1, 50) g;"
            "CREATE TABLE shop.\"Odd.Name\" (z integer); INSERT INTO shop.\"Odd.Name\" VALUES (4); CREATE VIEW recent "
            "AS SELECT * FROM visits WHERE y > 40;"
            "CREATE TABLE hidden (secret text);"
            "GRANT USAGE ON SCHEMA shop TO warden; GRANT SELECT ON visits, recent, shop.\"Odd.Name\" TO warden;",
            db_);
    }
    static std::string warden() { return shared_cluster().uri(db_, "warden"); }
    static std::string db_;
};
std::string PostgresServer::db_;

TEST(PostgresAddress, EveryPartIsAQueryParameter) {
    // From memory (libpq's URI form, RFC 3986): a socket folder as host=,
    // values percent-encoded but for the '/', ':' and '@' a query may hold.
    EXPECT_EQ(postgres_address({"/run/pg sock", "5433", "shop", "me"}),
              "postgresql:///shop?host=/run/pg%20sock&port=5433&user=me");
    EXPECT_EQ(postgres_address({"db.example", "", "sales&co/2", "a=b"}),
              "postgresql:///sales%26co%2F2?host=db.example&user=a%3Db");
    EXPECT_EQ(postgres_address({"", "", "shop", ""}), "postgresql:///shop");
}

TEST_F(PostgresServer, ListsTheTablesTheUserMayRead) {
    // Made above: two tables and a view granted to warden, one table not.
    const std::vector<std::string> tables = postgres_tables(warden(), kSecret);
    EXPECT_EQ(tables, (std::vector<std::string>{"recent", "visits", "shop.\"Odd.Name\""}));
    // The listed name reads back as the table it names.
    const Table odd = read_postgres({SourceKind::PostgreSQL, shared_cluster().uri(db_), "", tables[2], ""});
    EXPECT_EQ(odd.cols(), 1u);
    EXPECT_EQ(odd.columns[0].numbers, std::vector<double>{4});
    EXPECT_EQ(odd.columns[0].name, "z");
}

TEST_F(PostgresServer, AServerThatAsksForAPasswordSaysSo) {
    const SourceSpec s{SourceKind::PostgreSQL, warden(), "", "visits", ""};
    try {
        read_postgres(s);
        FAIL() << "read without a password";
    } catch (const PasswordNeeded& e) {
        EXPECT_EQ(e.location(), warden());
        EXPECT_NE(std::string(e.what()).find("asks for a password"), std::string::npos) << e.what();
    }
    EXPECT_THROW(postgres_tables(warden()), PasswordNeeded);
    // A wrong password is refused as such, not asked for again.
    try {
        read_postgres(s, {}, {}, "not-the-one");
        FAIL() << "read with a wrong password";
    } catch (const PasswordNeeded&) {
        FAIL() << "a wrong password is not a missing one";
    } catch (const InputError& e) {
        EXPECT_NE(std::string(e.what()).find("password authentication failed"), std::string::npos) << e.what();
    }
    EXPECT_EQ(read_postgres(s, {}, {}, kSecret).rows(), 50u);  // the 50 rows inserted above
}

TEST_F(PostgresServer, APreviewReadsOnlyTheFirstRows) {
    const SourceSpec table{SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "visits", ""};
    EXPECT_EQ(read_postgres(table, {}, {}, {}, nullptr, 7).rows(), 7u);
    const SourceSpec query{SourceKind::PostgreSQL, shared_cluster().uri(db_), "", "",
                           "SELECT * FROM visits ORDER BY y DESC;"};
    const Table first = read_postgres(query, {}, {}, {}, nullptr, 3);
    EXPECT_EQ(first.at("y").numbers, (std::vector<double>{50, 49, 48}));
}

TEST_F(PostgresServer, AProjectOpensWithThePasswordGivenForItsServer) {
    DataSource d;
    d.id = "visits";
    d.kind = SourceKind::PostgreSQL;
    d.path = warden();
    d.table = "visits";
    Project p;
    p.datasets = {d};
    test::TempDir dir("pg-server-project");
    const std::string path = (dir / "p.moderato").string();
    write_project_file(p, path);
    EXPECT_THROW(load_project(path), PasswordNeeded);
    const LoadedProject loaded = load_project(path, {}, {}, {{warden(), kSecret}});
    EXPECT_EQ(loaded.tables.at("visits")->rows(), 50u);
    // The password is nowhere in the project file.
    EXPECT_EQ(test::read_file(path).find(kSecret), std::string::npos);
}

}  // namespace
}  // namespace moderato
