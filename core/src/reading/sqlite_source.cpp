// An SQLite table, view or read-only query into a table (sqlite_source.hpp).
#include "moderato/reading/sqlite_source.hpp"

#include <cstring>
#include <filesystem>
#include <fstream>
#include <memory>

#include <sqlite3.h>

#include "moderato/support/error.hpp"
#include "reading/cell_table.hpp"
#include "reading/csv_internal.hpp"

namespace moderato {

namespace {

using cell_detail::CellType;

constexpr char kHeader[16] = {'S', 'Q', 'L', 'i', 't', 'e', ' ', 'f', 'o', 'r', 'm', 'a', 't', ' ', '3', '\0'};
constexpr int kProgressSteps = 100000;  // virtual machine steps between progress calls
constexpr std::size_t kRowsPerReport = 4096;

using Db = std::unique_ptr<sqlite3, int (*)(sqlite3*)>;
using Stmt = std::unique_ptr<sqlite3_stmt, int (*)(sqlite3_stmt*)>;

[[noreturn]] void fail(const std::string& path, const std::string& rest) { throw InputError(path + ": " + rest); }

// '"' + name with '"' doubled + '"': an identifier, whatever it holds.
std::string quote_identifier(const std::string& name) {
    std::string s = "\"";
    for (const char c : name) s += c == '"' ? std::string("\"\"") : std::string(1, c);
    return s + "\"";
}

Db open_database(const std::string& path) {
    namespace fs = std::filesystem;
    std::error_code ec;
    const auto st = fs::status(path, ec);
    if (st.type() == fs::file_type::not_found) fail(path, "file not found; check the path and the file name");
    if (st.type() == fs::file_type::directory) fail(path, "is a folder, not a file; choose an SQLite database");
    if (!is_sqlite_file(path))
        fail(path,
             "is not an SQLite database (it does not begin with SQLite's header \"SQLite format 3\"); "
             "check the path, or read the file as CSV or a workbook");
    sqlite3* raw = nullptr;
    const int rc = sqlite3_open_v2(path.c_str(), &raw, SQLITE_OPEN_READONLY | SQLITE_OPEN_NOMUTEX, nullptr);
    Db db(raw, sqlite3_close);
    if (rc != SQLITE_OK)
        fail(path, std::string("cannot be opened as an SQLite database (") +
                       (raw ? sqlite3_errmsg(raw) : sqlite3_errstr(rc)) + ")");
    sqlite3_busy_timeout(db.get(), 2000);
    sqlite3_exec(db.get(), "PRAGMA query_only = 1", nullptr, nullptr, nullptr);
    return db;
}

Stmt prepare(sqlite3* db, const std::string& path, const std::string& sql, const std::string& what) {
    sqlite3_stmt* raw = nullptr;
    const char* tail = nullptr;
    const int rc = sqlite3_prepare_v2(db, sql.c_str(), static_cast<int>(sql.size()), &raw, &tail);
    Stmt st(raw, sqlite3_finalize);
    if (rc != SQLITE_OK) fail(path, what + " cannot be run: " + sqlite3_errmsg(db));
    if (!raw) fail(path, what + " is empty; write one SELECT statement");
    // Anything after the first statement must be blanks or comments.
    while (tail && *tail) {
        sqlite3_stmt* next = nullptr;
        const char* rest = nullptr;
        const int rc2 = sqlite3_prepare_v2(db, tail, -1, &next, &rest);
        sqlite3_finalize(next);
        if (rc2 != SQLITE_OK || next)
            fail(path, what + " holds more than one statement; give exactly one read-only statement (a SELECT)");
        tail = rest;
    }
    if (!sqlite3_stmt_readonly(st.get()))
        fail(path, what + " would change the database; only read-only statements (a SELECT) are run");
    if (sqlite3_column_count(st.get()) == 0) fail(path, what + " returns no columns; give a SELECT statement");
    return st;
}

std::vector<std::string> list_tables(sqlite3* db, const std::string& path) {
    const Stmt st = prepare(db, path,
                            "SELECT name FROM sqlite_master WHERE type IN ('table','view') AND name NOT LIKE "
                            "'sqlite\\_%' ESCAPE '\\' ORDER BY name",
                            "the list of tables");
    std::vector<std::string> names;
    int rc = 0;
    while ((rc = sqlite3_step(st.get())) == SQLITE_ROW)
        names.emplace_back(reinterpret_cast<const char*>(sqlite3_column_text(st.get(), 0)));
    if (rc != SQLITE_DONE && rc != SQLITE_ROW)
        fail(path, std::string("its tables cannot be listed (") + sqlite3_errmsg(db) + ")");
    return names;
}

bool table_exists(sqlite3* db, const std::string& schema, const std::string& name) {
    const std::string sql =
        "SELECT 1 FROM " + quote_identifier(schema) + ".sqlite_master WHERE type IN ('table','view') AND name = ?1";
    sqlite3_stmt* raw = nullptr;
    if (sqlite3_prepare_v2(db, sql.c_str(), -1, &raw, nullptr) != SQLITE_OK) {
        sqlite3_finalize(raw);
        return false;  // no such schema
    }
    const Stmt st(raw, sqlite3_finalize);
    sqlite3_bind_text(st.get(), 1, name.c_str(), static_cast<int>(name.size()), SQLITE_TRANSIENT);
    return sqlite3_step(st.get()) == SQLITE_ROW;
}

// SELECT * FROM the table, its name quoted.
std::string table_sql(sqlite3* db, const std::string& path, const std::string& table) {
    if (table_exists(db, "main", table)) return "SELECT * FROM main." + quote_identifier(table);
    const auto dot = table.find('.');
    if (dot != std::string::npos && table_exists(db, table.substr(0, dot), table.substr(dot + 1)))
        return "SELECT * FROM " + quote_identifier(table.substr(0, dot)) + "." +
               quote_identifier(table.substr(dot + 1));
    std::string names;
    for (const std::string& n : list_tables(db, path)) names += (names.empty() ? "'" : ", '") + n + "'";
    fail(path, "has no table or view '" + table + "'; " +
                   (names.empty() ? std::string("it holds none") : "its tables and views are " + names));
}

struct Progress {
    const CsvProgress* progress = nullptr;
    std::size_t done = 0, total = 0;
    bool cancelled = false;
};

int on_progress(void* data) {
    auto* p = static_cast<Progress*>(data);
    if (p->progress->callback && !p->progress->callback(p->done, p->total)) p->cancelled = true;
    return p->cancelled ? 1 : 0;
}

std::size_t count_rows(sqlite3* db, const std::string& path, const std::string& select) {
    const Stmt st = prepare(db, path, "SELECT count(*) FROM (" + select + ")", "counting the rows");
    return sqlite3_step(st.get()) == SQLITE_ROW ? static_cast<std::size_t>(sqlite3_column_int64(st.get(), 0)) : 0;
}

void take_cell(sqlite3_stmt* st, int j, cell_detail::CellTableBuilder& b, const std::string& path,
               const cell_detail::CellTableBuilder::Place& where, std::size_t row) {
    const auto col = static_cast<std::size_t>(j);
    switch (sqlite3_column_type(st, j)) {
        case SQLITE_INTEGER:
        case SQLITE_FLOAT:
            return b.value(col, CellType::Number, sqlite3_column_double(st, j));
        case SQLITE_NULL:
            return b.missing(col);
        case SQLITE_BLOB:
            fail(path, where(row, col) +
                           " holds binary data (a BLOB), which is not a number or text; leave the column out "
                           "with a query, or convert it there");
        default:
            break;
    }
    const char* text = reinterpret_cast<const char*>(sqlite3_column_text(st, j));
    const auto n = static_cast<std::size_t>(sqlite3_column_bytes(st, j));
    if (!text) return b.missing(col);
    if (std::memchr(text, '\0', n) || csv_detail::find_invalid_utf8(text, text + n))
        fail(path, where(row, col) + " holds text that is not valid UTF-8; convert it in the database or the query");
    if (n == 0) return b.missing(col);
    b.text(col, std::string_view(text, n));
}

}  // namespace

bool is_sqlite_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    char head[16] = {};
    in.read(head, 16);
    return in.gcount() == 16 && std::memcmp(head, kHeader, 16) == 0;
}

std::vector<std::string> sqlite_tables(const std::string& path) {
    const Db db = open_database(path);
    return list_tables(db.get(), path);
}

Table read_sqlite(const std::string& path, const std::string& table, const std::string& query,
                  const CsvOptions& options, const CsvProgress& progress, std::size_t max_rows) {
    if (table.empty() == query.empty())
        fail(path, "give exactly one of a table (--table) and a query (--query) to read from the database");
    const Db db = open_database(path);
    const std::string what = table.empty() ? "the query" : "table '" + table + "'";
    const std::string sql = table.empty() ? query : table_sql(db.get(), path, table);
    const bool counted = !table.empty() && max_rows == 0;
    Progress prog{&progress, 0, counted ? count_rows(db.get(), path, sql) : 0, false};
    const Stmt st = prepare(db.get(), path, sql, what);
    const int ncols = sqlite3_column_count(st.get());
    std::vector<std::string> names;
    for (int j = 0; j < ncols; ++j) {
        const char* n = sqlite3_column_name(st.get(), j);
        names.emplace_back(n ? n : "");
    }
    const std::string prefix = table.empty() ? "the query, " : "table '" + table + "', ";
    const cell_detail::CellTableBuilder::Place place = [prefix, names](std::size_t row, std::size_t col) {
        const std::string column = "column " + std::to_string(col + 1) + " ('" + names[col] + "')";
        return row == 0 ? prefix + column : prefix + "row " + std::to_string(row) + ", " + column;
    };
    CsvOptions opt = options;
    opt.header = true;  // the names row below
    const std::string source = (table.empty() ? "the query in " : "table '" + table + "' in ") + path;
    cell_detail::CellTableBuilder b(path, source, opt, place);
    b.start_row(0);
    for (int j = 0; j < ncols; ++j) b.text(static_cast<std::size_t>(j), names[static_cast<std::size_t>(j)]);
    sqlite3_progress_handler(db.get(), kProgressSteps, on_progress, &prog);
    int rc = 0;
    while ((max_rows == 0 || prog.done < max_rows) && (rc = sqlite3_step(st.get())) == SQLITE_ROW) {
        ++prog.done;
        b.start_row(prog.done);
        for (int j = 0; j < ncols; ++j) take_cell(st.get(), j, b, path, place, prog.done);
        if (prog.done % kRowsPerReport == 0 && on_progress(&prog)) throw Cancelled{};
    }
    if (prog.cancelled || rc == SQLITE_INTERRUPT) throw Cancelled{};
    if (rc != SQLITE_DONE && rc != SQLITE_ROW) fail(path, what + " stopped with an error: " + sqlite3_errmsg(db.get()));
    if (prog.done == 0) fail(path, what + " returned no rows; there is nothing to read");
    Table t = b.finish(true);
    t.sheet_rows = true;
    return t;
}

}  // namespace moderato
