// Datasets read from a workbook's sheet or an SQLite table or query: the
// project file records where (kind, sheet, table, query; never a password),
// projects of text files read and write exactly as before, and a project
// opens its data through read_source, with the file's SHA-256 as the
// fingerprint.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include <filesystem>
#include <string>

#include "common/file_bytes.hpp"
#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/support/sha256.hpp"

namespace moderato {
namespace {

using test::input_error_of;
using test::TempDir;

DataSource dataset(const std::string& id, const std::string& path, SourceKind kind, const std::string& sheet = "",
                   const std::string& table = "", const std::string& query = "") {
    DataSource d;
    d.id = id;
    d.path = path;
    d.kind = kind;
    d.sheet = sheet;
    d.table = table;
    d.query = query;
    return d;
}

TEST(ProjectSources, RoundTripOfEveryKind) {
    Project p;
    p.datasets = {dataset("t", "t.csv", SourceKind::TextFile), dataset("w", "b.xlsx", SourceKind::Workbook, "Q3"),
                  dataset("s", "shop.db", SourceKind::SQLite, "", "sales"),
                  dataset("q", "shop.db", SourceKind::SQLite, "", "", "SELECT a FROM b WHERE c = 'd\"e'"),
                  dataset("p", "postgresql:///shop?host=/run/pg", SourceKind::PostgreSQL, "", "public.sales")};
    const std::string text = project_to_json(p);
    const Project back = project_from_json(text, "p.moderato");
    EXPECT_EQ(back.datasets, p.datasets);
    EXPECT_EQ(project_to_json(back), text);  // the same bytes again
    EXPECT_NE(text.find(R"("source": {
        "kind": "workbook",
        "sheet": "Q3"
      })"),
              std::string::npos)
        << text;
}

TEST(ProjectSources, TextFileProjectsAreWrittenAsBefore) {
    // A schema 2 project as an earlier Moderato wrote it: no "source" field.
    const char* old = R"({"schema_version": 2, "datasets": [{"id": "d", "path": "d.csv", "import": {}}]})";
    const Project p = project_from_json(old, "old.moderato");
    EXPECT_EQ(p.datasets[0].kind, SourceKind::TextFile);
    EXPECT_TRUE(p.migration_notes.empty());
    EXPECT_EQ(project_to_json(p).find("\"source\""), std::string::npos);  // nothing new is written for it
}

TEST(ProjectSources, BadSourceEntriesNameTheField) {
    const auto err = [](const std::string& source) {
        return input_error_of([&] {
            project_from_json(
                R"({"schema_version": 2, "datasets": [{"id": "d", "path": "d.db", "source": )" + source + "}]}",
                "bad.moderato");
        });
    };
    EXPECT_NE(err(R"({"kind": "spreadsheet"})").find("datasets[0].source.kind: unknown source kind"),
              std::string::npos);
    EXPECT_NE(err(R"({"kind": "sqlite", "sheet": "S", "table": "t"})").find("datasets[0].source.sheet"),
              std::string::npos);
    EXPECT_NE(err(R"({"kind": "sqlite"})").find("exactly one of"), std::string::npos);
    EXPECT_NE(err(R"({"kind": "workbook", "table": "t"})").find("only a database"), std::string::npos);
}

TEST(ProjectSources, ProjectOpensWorkbookAndSqliteData) {
    TempDir dir("proj-src");
    std::filesystem::copy_file(std::string(MODERATO_TEST_DATA_DIR) + "/workbooks/mixed.xlsx", dir / "mixed.xlsx");
    const std::string db = (dir / "shop.db").string();
    sqlite3* h = nullptr;
    ASSERT_EQ(sqlite3_open(db.c_str(), &h), SQLITE_OK);
    ASSERT_EQ(sqlite3_exec(h, "CREATE TABLE t(v REAL); INSERT INTO t VALUES (1.5), (2.5);", nullptr, nullptr, nullptr),
              SQLITE_OK);
    Project p;
    p.datasets = {dataset("w", "mixed.xlsx", SourceKind::Workbook, "Other rows"),
                  dataset("s", "shop.db", SourceKind::SQLite, "", "", "SELECT v * 2 AS w FROM t")};
    p.datasets[0].sha256 = sha256_file((dir / "mixed.xlsx").string());
    p.datasets[1].sha256 = sha256_file(db);
    const std::string path = (dir / "p.moderato").string();
    write_project_file(p, path);
    const LoadedProject loaded = load_project(path);
    EXPECT_EQ(loaded.tables.at("w")->at("b").levels, (std::vector<std::string>{"one", "two"}));  // make_workbooks.py
    EXPECT_EQ(loaded.tables.at("s")->at("w").numbers, (std::vector<double>{3, 5}));              // 1.5*2, 2.5*2
    EXPECT_TRUE(loaded.warnings.empty());
    // A changed database is noticed as a changed file is.
    ASSERT_EQ(sqlite3_exec(h, "INSERT INTO t VALUES (9);", nullptr, nullptr, nullptr), SQLITE_OK);
    sqlite3_close(h);
    const LoadedProject again = load_project(path);
    ASSERT_EQ(again.warnings.size(), 1u);
    EXPECT_NE(again.warnings[0].find("The data changed since the project was saved"), std::string::npos);
    EXPECT_EQ(again.tables.at("s")->rows(), 3u);
}

}  // namespace
}  // namespace moderato
