// A project whose dataset is a PostgreSQL table: the project file records the
// address without a password, opening it reads the rows through read_source,
// and a changed table is noticed by its fingerprint (row count and an
// order-free checksum) as a changed file is by its SHA-256.
#include <gtest/gtest.h>

#include <string>

#include "common/file_bytes.hpp"
#include "common/pg_cluster.hpp"
#include "common/temp_dir.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/postgres_source.hpp"

namespace moderato {
namespace {

using test::shared_cluster;
using test::TempDir;

TEST(PostgresProject, OpensTheTableAndNoticesAChange) {
    const std::string db = test::fresh_database("projecttest");
    shared_cluster().exec(
        "CREATE TABLE visits (y double precision, x double precision);"
        "INSERT INTO visits VALUES (1, 2), (3, 4), (5, 7);",
        db);
    DataSource d;
    d.id = "v";
    d.kind = SourceKind::PostgreSQL;
    d.path = shared_cluster().uri(db);
    d.table = "visits";
    const SourceSpec spec{SourceKind::PostgreSQL, d.path, "", "visits", ""};
    d.sha256 = postgres_fingerprint(spec);
    EXPECT_EQ(d.sha256.rfind("pg-md5-sum:3:", 0), 0u) << d.sha256;  // three rows (postgres_source.hpp)
    Project p;
    p.datasets = {d};
    TempDir dir("pg-project");
    const std::string path = (dir / "p.moderato").string();
    write_project_file(p, path);
    const LoadedProject loaded = load_project(path);
    EXPECT_TRUE(loaded.warnings.empty());
    EXPECT_EQ(loaded.sha256.at("v"), d.sha256);
    EXPECT_EQ(loaded.tables.at("v")->at("x").numbers, (std::vector<double>{2, 4, 7}));  // the rows inserted above
    // One value changed, the row count the same: the checksum tells.
    shared_cluster().exec("UPDATE visits SET x = 8 WHERE y = 5;", db);
    const LoadedProject again = load_project(path);
    ASSERT_EQ(again.warnings.size(), 1u);
    EXPECT_NE(again.warnings[0].find("The data changed since the project was saved: table"), std::string::npos)
        << again.warnings[0];
    EXPECT_NE(again.warnings[0].find("fingerprint pg-md5-sum:3:"), std::string::npos) << again.warnings[0];
    EXPECT_EQ(again.tables.at("v")->at("x").numbers, (std::vector<double>{2, 4, 8}));
}

}  // namespace
}  // namespace moderato
