// Where a table lives: a text file, a workbook sheet, an SQLite table or
// query, or a PostgreSQL table or query. One description for the command
// line, the project file and the workbench; reading dispatches on its kind.
//
// A SourceSpec never holds a secret: a PostgreSQL address keeps host, port,
// database, user and options, and the password comes from a prompt or the
// standard password file at connection time.
#pragma once

#include <string>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

enum class SourceKind {
    TextFile,    // .csv, .tsv, .txt (and any other name: read as delimited text)
    Workbook,    // .xlsx (Office Open XML)
    SQLite,      // "sqlite:PATH"
    PostgreSQL,  // "postgresql://..." or "postgres://..." (a libpq URI)
};

// The kind's word in project files: "text-file", "workbook", "sqlite",
// "postgresql"; and back (false for any other word).
const char* to_string(SourceKind kind);
bool source_kind_from_string(const std::string& word, SourceKind& kind);

struct SourceSpec {
    SourceKind kind = SourceKind::TextFile;
    // A file path (TextFile, Workbook, SQLite: the path after "sqlite:") or a
    // libpq URI without its password (PostgreSQL).
    std::string location;
    std::string sheet;  // Workbook: the sheet's name; empty: the first sheet
    // SQLite/PostgreSQL: exactly one of `table` (a table or view, optionally
    // "schema.name") and `query` (one read-only SELECT) is set.
    std::string table;
    std::string query;
    bool operator==(const SourceSpec&) const = default;
};

// The description of `--data TEXT` with `--sheet`, `--table`, `--query`
// (empty when not given). Throws InputError naming the option for options
// that do not fit the kind (a sheet for a database, a table for a file,
// both table and query, neither for a database, a password inside a URI).
SourceSpec parse_source(const std::string& data, const std::string& sheet, const std::string& table,
                        const std::string& query);

// How a source is named in messages and on screen: the file name,
// "sheet 'Sales' of book.xlsx", "table 'sales' in shop.db",
// "query in postgresql:///shop?host=/run/pg".
std::string describe_source(const SourceSpec& source);

// Reads the whole source into memory. CsvOptions' missing tokens and column
// kinds apply to every kind; the delimiter, header and decimal comma only to
// text files. Errors name the source and the sheet/cell, table/row or column.
Table read_source(const SourceSpec& source, const CsvOptions& options, const CsvProgress& progress = {});

}  // namespace moderato
