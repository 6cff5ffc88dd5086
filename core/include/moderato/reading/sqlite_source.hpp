// SQLite databases: one table or view, or one read-only query, read into a
// table. The database is opened read-only (SQLITE_OPEN_READONLY, and
// PRAGMA query_only); a query must be a single statement that
// sqlite3_stmt_readonly() calls read-only. A table name is quoted as an
// identifier (never pasted into SQL as it is), so any name is inert.
//
// Values become cells the way read_csv reads text: INTEGER and REAL values
// are numbers; TEXT is read as a CSV cell (a missing token is missing, a
// number written as text is a number, any other text a level); NULL is
// missing; a BLOB is refused, naming the column and row. A column with any
// text that is not a number is categorical (unless CsvOptions says
// otherwise); column names come from the database (CsvOptions::header and
// the delimiter do not apply). Table::row_lines holds the 1-based row of the
// result (sheet_rows). Progress counts rows (of the table's count; 0 as the
// total for a query), and a false answer stops a running query too.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

// The file begins with SQLite's header "SQLite format 3\0".
bool is_sqlite_file(const std::string& path);

// The tables and views a user can read (not SQLite's own), by name.
std::vector<std::string> sqlite_tables(const std::string& path);

// Exactly one of `table` ("name", or "schema.name" when no table has the
// whole text as its name) and `query` is non-empty. `max_rows` > 0 stops
// after that many rows (a preview).
Table read_sqlite(const std::string& path, const std::string& table, const std::string& query,
                  const CsvOptions& options = {}, const CsvProgress& progress = {}, std::size_t max_rows = 0);

}  // namespace moderato
