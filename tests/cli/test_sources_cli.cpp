// `--data` beyond text files, as a real moderato-cli process: an SQLite
// table and query and a workbook sheet holding the exact data
// y = 1 + 2x + 3z − 0.5·x·z (closed form: OLS reproduces the coefficients),
// built here (SQLite's C API; a workbook written part by part with libzip),
// and the option checks of --sheet, --table, --query and --stream.
#include <gtest/gtest.h>
#include <sqlite3.h>
#include <zip.h>

#include <map>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli_json.hpp"
#include "cli_runner.hpp"
#include "common/temp_dir.hpp"

namespace {

using moderato::test::json_output;
using moderato::test::run_cli;
using moderato::test::TempDir;

constexpr double kExact = 1e-9;  // closed form on exact data

struct Row {
    double x, z;
    double y() const { return 1 + 2 * x + 3 * z - 0.5 * x * z; }
};

const std::vector<Row> kRows = {{0, 1}, {1, 0}, {2, 3}, {3, 1}, {-1, 2}, {4, -2}, {5, 5}, {-2, -1}, {1, 4}};

std::string make_db(const TempDir& dir) {
    const std::string path = (dir / "shop.db").string();
    sqlite3* db = nullptr;
    EXPECT_EQ(sqlite3_open(path.c_str(), &db), SQLITE_OK);
    std::string sql = "CREATE TABLE t(x REAL, z REAL, y REAL);";
    for (const Row& r : kRows)
        sql += "INSERT INTO t VALUES (" + std::to_string(r.x) + "," + std::to_string(r.z) + "," +
               std::to_string(r.y()) + ");";
    sql += "INSERT INTO t VALUES (100, 100, 0);";  // an outlier the query below leaves out
    EXPECT_EQ(sqlite3_exec(db, sql.c_str(), nullptr, nullptr, nullptr), SQLITE_OK);
    sqlite3_close(db);
    return path;
}

// A workbook with sheets "Notes" (text only) and "Fit data" (x, z, y), inline strings for the header.
std::string make_workbook(const TempDir& dir) {
    const std::string ns = "http://schemas.openxmlformats.org/spreadsheetml/2006/main";
    const std::string rel = "http://schemas.openxmlformats.org/officeDocument/2006/relationships";
    const std::string rels_ns = "http://schemas.openxmlformats.org/package/2006/relationships";
    std::string data =
        "<row r=\"1\"><c r=\"A1\" t=\"inlineStr\"><is><t>x</t></is></c><c r=\"B1\" "
        "t=\"inlineStr\"><is><t>z</t></is></c><c r=\"C1\" t=\"inlineStr\"><is><t>y</t></is></c></row>";
    for (std::size_t i = 0; i < kRows.size(); ++i) {
        const std::string n = std::to_string(i + 2);
        data += "<row r=\"" + n + "\"><c r=\"A" + n + "\"><v>" + std::to_string(kRows[i].x) + "</v></c><c r=\"B" + n +
                "\"><v>" + std::to_string(kRows[i].z) + "</v></c><c r=\"C" + n + "\"><v>" +
                std::to_string(kRows[i].y()) + "</v></c></row>";
    }
    const std::map<std::string, std::string> parts = {
        {"_rels/.rels", "<Relationships xmlns=\"" + rels_ns + "\"><Relationship Id=\"r1\" Type=\"" + rel +
                            "/officeDocument\" Target=\"xl/workbook.xml\"/></Relationships>"},
        {"xl/workbook.xml", "<workbook xmlns=\"" + ns + "\" xmlns:r=\"" + rel +
                                "\"><sheets><sheet name=\"Notes\" sheetId=\"1\" r:id=\"a\"/><sheet name=\"Fit "
                                "data\" sheetId=\"2\" r:id=\"b\"/></sheets></workbook>"},
        {"xl/_rels/workbook.xml.rels", "<Relationships xmlns=\"" + rels_ns + "\"><Relationship Id=\"a\" Type=\"" + rel +
                                           "/worksheet\" Target=\"notes.xml\"/><Relationship Id=\"b\" Type=\"" + rel +
                                           "/worksheet\" Target=\"fit.xml\"/></Relationships>"},
        {"xl/notes.xml", "<worksheet xmlns=\"" + ns +
                             "\"><sheetData><row r=\"1\"><c r=\"A1\" t=\"inlineStr\"><is><t>note</t></is></c></row>"
                             "<row r=\"2\"><c r=\"A2\" t=\"inlineStr\"><is><t>hello</t></is></c></row>"
                             "</sheetData></worksheet>"},
        {"xl/fit.xml", "<worksheet xmlns=\"" + ns + "\"><sheetData>" + data + "</sheetData></worksheet>"},
    };
    const std::string path = (dir / "book.xlsx").string();
    int err = 0;
    zip_t* z = zip_open(path.c_str(), ZIP_CREATE | ZIP_TRUNCATE, &err);
    for (const auto& [name, bytes] : parts)
        zip_file_add(z, name.c_str(), zip_source_buffer(z, bytes.data(), bytes.size(), 0), ZIP_FL_OVERWRITE);
    EXPECT_EQ(zip_close(z), 0);
    return path;
}

// The coefficients of y = 1 + 2x + 3z − 0.5·x·z, by term name.
void expect_exact(const nlohmann::json& j) {
    const std::map<std::string, double> want = {{"intercept", 1}, {"x", 2}, {"z", 3}, {"x×z", -0.5}};
    ASSERT_EQ(j["terms"].size(), want.size()) << j.dump();
    for (const auto& t : j["terms"]) EXPECT_NEAR(t["value"].get<double>(), want.at(t["name"]), kExact) << t.dump();
    EXPECT_EQ(j["rows_used"].get<int>(), static_cast<int>(kRows.size()));
}

std::vector<std::string> fit_args(const std::vector<std::string>& data) {
    std::vector<std::string> a = {"fit"};
    a.insert(a.end(), data.begin(), data.end());
    for (const char* s : {"--outcome", "y", "--predictors", "x,z", "--interaction", "x,z", "--format", "json"})
        a.push_back(s);
    return a;
}

TEST(SourcesCli, SqliteTableAndQuery) {
    TempDir dir("cli-src");
    const std::string db = make_db(dir);
    expect_exact(json_output(run_cli(fit_args({"--data", "sqlite:" + db, "--query", "SELECT * FROM t WHERE x < 50"}))));
    const auto all = run_cli(fit_args({"--data", "sqlite:" + db, "--table", "t"}));
    EXPECT_EQ(json_output(all)["rows_used"].get<int>(), static_cast<int>(kRows.size()) + 1);  // with the outlier
    const auto cols = run_cli({"columns", "--data", "sqlite:" + db, "--table", "t"});
    EXPECT_EQ(cols.exit_code, 0) << cols.describe();
    EXPECT_EQ(cols.out.rfind("table 't' in " + db + ": 10 rows, 3 columns", 0), 0u) << cols.out;
}

TEST(SourcesCli, WorkbookSheet) {
    TempDir dir("cli-src");
    const std::string book = make_workbook(dir);
    expect_exact(json_output(run_cli(fit_args({"--data", book, "--sheet", "Fit data"}))));
    const auto first = json_output(run_cli({"columns", "--data", book, "--format", "json"}));
    EXPECT_EQ(first["columns"][0]["name"], "note");  // no --sheet: the first worksheet
    const auto missing = run_cli({"columns", "--data", book, "--sheet", "Nope"});
    EXPECT_EQ(missing.exit_code, 2);
    EXPECT_NE(missing.err.find("has no sheet 'Nope'; its sheets are 'Notes', 'Fit data'"), std::string::npos)
        << missing.err;
}

TEST(SourcesCli, OptionsThatDoNotFitExitTwo) {
    TempDir dir("cli-src");
    const std::string db = make_db(dir);
    const std::string csv = dir.write("a.csv", "x,y\n1,2\n2,3\n").string();
    const std::vector<std::pair<std::vector<std::string>, std::string>> cases = {
        {{"columns", "--data", csv, "--sheet", "S"}, "--sheet"},
        {{"columns", "--data", csv, "--table", "t"}, "--table"},
        {{"columns", "--data", "sqlite:" + db}, "add --table NAME"},
        {{"columns", "--data", "sqlite:" + db, "--query", "DELETE FROM t"}, "would change the database"},
        {{"columns", "--data", "postgresql://me:pw@localhost/db", "--table", "t"}, "password file"},
        // no server at that socket: libpq's own words, after the source's description
        {{"columns", "--data", "postgresql:///db?host=/nonexistent", "--table", "t"}, "cannot connect"},
        {fit_args({"--data", "sqlite:" + db, "--table", "t", "--stream"}), "--stream: table 't' in"},
    };
    for (const auto& [args, words] : cases) {
        const auto r = run_cli(args);
        EXPECT_EQ(r.exit_code, 2) << r.describe();
        EXPECT_NE(r.err.find(words), std::string::npos) << r.describe();
        EXPECT_EQ(r.err.find("pw@"), std::string::npos);  // the password is not echoed
    }
}

}  // namespace
