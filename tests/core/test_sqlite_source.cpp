// SQLite databases built here through SQLite's C API: storage classes into
// column kinds (as read_csv reads the same values as text), read-only
// queries only, hostile names inert, errors that name the database, the
// table or query, the column and the row.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include <string>

#include "common/file_bytes.hpp"
#include "common/input_error.hpp"
#include "common/temp_dir.hpp"
#include "moderato/reading/sqlite_source.hpp"

namespace moderato {
namespace {

using test::input_error_of;
using test::TempDir;

// Runs `sql` on a new database file.
std::string make_db(const TempDir& dir, const std::string& name, const std::string& sql) {
    const std::string path = (dir / name).string();
    sqlite3* db = nullptr;
    EXPECT_EQ(sqlite3_open(path.c_str(), &db), SQLITE_OK);
    char* err = nullptr;
    EXPECT_EQ(sqlite3_exec(db, sql.c_str(), nullptr, nullptr, &err), SQLITE_OK) << (err ? err : "");
    sqlite3_free(err);
    sqlite3_close(db);
    return path;
}

const char* kShop =
    "CREATE TABLE sales(id INTEGER, price REAL, region TEXT, note TEXT, code TEXT);"
    "INSERT INTO sales VALUES (1, 2.5, 'north', NULL, '7');"
    "INSERT INTO sales VALUES (2, NULL, 'south', 'NA', '8');"
    "INSERT INTO sales VALUES (3, 4.0, 'north', 'late', '9');"
    "CREATE VIEW north AS SELECT id, price FROM sales WHERE region = 'north';"
    "CREATE TABLE other(a INTEGER); INSERT INTO other VALUES (5);";

TEST(SqliteSource, StorageClassesBecomeKinds) {
    TempDir dir("sqlite");
    const std::string db = make_db(dir, "shop.db", kShop);
    const Table t = read_sqlite(db, "sales", "");
    ASSERT_EQ(t.rows(), 3u);
    EXPECT_EQ(t.at("id").kind, ColumnKind::Numeric);
    EXPECT_EQ(t.at("id").numbers, (std::vector<double>{1, 2, 3}));  // the INSERTs above
    EXPECT_TRUE(t.at("price").is_missing(1));                       // NULL is missing
    EXPECT_EQ(t.at("region").kind, ColumnKind::Categorical);
    EXPECT_EQ(t.at("region").levels, (std::vector<std::string>{"north", "south"}));
    // TEXT is read as read_csv reads a cell: "NA" is a missing token, "late" a level ...
    EXPECT_EQ(t.at("note").levels, (std::vector<std::string>{"late"}));
    EXPECT_EQ(t.at("note").missing_count(), 2u);
    // ... and numbers written as text are numbers
    EXPECT_EQ(t.at("code").kind, ColumnKind::Numeric);
    EXPECT_EQ(t.at("code").numbers, (std::vector<double>{7, 8, 9}));
    EXPECT_EQ(t.row_location(2), "row 3");
    EXPECT_EQ(t.source, "table 'sales' in " + db);
}

TEST(SqliteSource, ViewsQueriesAndOptions) {
    TempDir dir("sqlite");
    const std::string db = make_db(dir, "shop.db", kShop);
    EXPECT_EQ(read_sqlite(db, "north", "").at("id").numbers, (std::vector<double>{1, 3}));
    const Table q = read_sqlite(db, "", "SELECT price * 2 AS twice FROM sales ORDER BY id DESC; -- trailing note");
    EXPECT_EQ(q.at("twice").numbers[0], 8.0);  // 4.0 * 2
    EXPECT_EQ(read_sqlite(db, "main.other", "").at("a").numbers, (std::vector<double>{5}));
    CsvOptions o;
    o.column_kinds = {{"code", ColumnKind::Categorical}};
    o.text_as_missing = {"note"};
    const Table t = read_sqlite(db, "sales", "", o);
    EXPECT_EQ(t.at("code").levels, (std::vector<std::string>{"7", "8", "9"}));
    EXPECT_EQ(t.at("note").text_as_missing, 1u);
    EXPECT_EQ(sqlite_tables(db), (std::vector<std::string>{"north", "other", "sales"}));
}

TEST(SqliteSource, OnlyOneReadOnlyStatement) {
    TempDir dir("sqlite");
    const std::string db = make_db(dir, "shop.db", kShop);
    const std::string before = test::read_file(db);
    const std::string two = input_error_of([&] { read_sqlite(db, "", "SELECT 1; DELETE FROM sales"); });
    EXPECT_NE(two.find("more than one statement"), std::string::npos) << two;
    const std::string write = input_error_of([&] { read_sqlite(db, "", "DELETE FROM sales"); });
    EXPECT_NE(write.find("would change the database"), std::string::npos) << write;
    const std::string syntax = input_error_of([&] { read_sqlite(db, "", "SELEC 1"); });
    EXPECT_EQ(syntax.rfind(db + ": the query cannot be run", 0), 0u) << syntax;
    EXPECT_EQ(test::read_file(db), before);  // the database is as it was
    const std::string unknown = input_error_of([&] { read_sqlite(db, "sale", ""); });
    EXPECT_NE(unknown.find("has no table or view 'sale'; its tables and views are 'north', 'other', 'sales'"),
              std::string::npos)
        << unknown;
}

TEST(SqliteSource, HostileNamesAreInert) {
    TempDir dir("sqlite");
    const std::string evil = "x\"; DROP TABLE keep; --";
    const std::string db = make_db(dir, "evil.db",
                                   "CREATE TABLE keep(a INTEGER); INSERT INTO keep VALUES (1);"
                                   "CREATE TABLE \"x\"\"; DROP TABLE keep; --\"(\"v\"\"); DELETE FROM keep; --\" "
                                   "REAL); INSERT INTO \"x\"\"; DROP TABLE keep; --\" VALUES (3.5);");
    const Table t = read_sqlite(db, evil, "");
    ASSERT_EQ(t.cols(), 1u);
    EXPECT_EQ(t.columns[0].name, "v\"); DELETE FROM keep; --");  // the column's name, as created above
    EXPECT_EQ(t.columns[0].numbers, (std::vector<double>{3.5}));
    EXPECT_EQ(read_sqlite(db, "keep", "").at("a").numbers, (std::vector<double>{1}));  // still there
}

TEST(SqliteSource, BadValuesNameColumnAndRow) {
    TempDir dir("sqlite");
    const std::string db = make_db(dir, "blob.db",
                                   "CREATE TABLE t(a INTEGER, b BLOB); INSERT INTO t VALUES (1, NULL);"
                                   "INSERT INTO t VALUES (2, x'00ff');");
    const std::string blob = input_error_of([&] { read_sqlite(db, "t", ""); });
    EXPECT_EQ(blob, db + ": table 't', row 2, column 2 ('b') holds binary data (a BLOB), which is not a number or "
                         "text; leave the column out with a query, or convert it there");
    const std::string not_db = dir.write("notes.db", "just text, not a database\n").string();
    EXPECT_NE(input_error_of([&] { read_sqlite(not_db, "t", ""); }).find("is not an SQLite database"),
              std::string::npos);
    EXPECT_NE(input_error_of([&] { read_sqlite((dir / "none.db").string(), "t", ""); }).find("file not found"),
              std::string::npos);
}

TEST(SqliteSource, ProgressCountsRowsAndCancels) {
    TempDir dir("sqlite");
    std::string sql =
        "CREATE TABLE big(v INTEGER); WITH RECURSIVE n(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM n "
        "WHERE i < 10000) INSERT INTO big SELECT i FROM n;";
    const std::string db = make_db(dir, "big.db", sql);
    std::size_t last_done = 0, last_total = 0;
    CsvProgress p;
    p.callback = [&](std::size_t done, std::size_t total) {
        last_done = done;
        last_total = total;
        return true;
    };
    EXPECT_EQ(read_sqlite(db, "big", "", {}, p).rows(), 10000u);
    EXPECT_EQ(last_total, 10000u);  // the table's count, from the recursive INSERT above
    EXPECT_GT(last_done, 0u);
    EXPECT_EQ(read_sqlite(db, "big", "", {}, {}, 200).rows(), 200u);  // a preview's first rows
    p.callback = [](std::size_t, std::size_t) { return false; };
    EXPECT_THROW(read_sqlite(db, "big", "", {}, p), Cancelled);
    EXPECT_THROW(read_sqlite(db, "", "SELECT a.v FROM big a, big b ORDER BY a.v * b.v", {}, p), Cancelled);
}

}  // namespace
}  // namespace moderato
