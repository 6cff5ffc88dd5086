// Where a table lives (data_source.hpp): `--data` and its options into a
// SourceSpec, its name in messages, and reading it by its kind.
#include "moderato/reading/data_source.hpp"
#include "moderato/reading/postgres_source.hpp"

#include <algorithm>
#include <cctype>
#include <cstring>
#include <fstream>

#include "moderato/reading/sqlite_source.hpp"
#include "moderato/reading/workbook.hpp"
#include "moderato/support/error.hpp"
#include "reading/postgres_uri.hpp"

namespace moderato {

namespace {

bool starts_with(const std::string& s, std::string_view head) { return s.compare(0, head.size(), head) == 0; }

std::string lower_extension(const std::string& path) {
    const auto slash = path.find_last_of('/');
    const auto dot = path.find_last_of('.');
    if (dot == std::string::npos || (slash != std::string::npos && dot < slash)) return {};
    std::string ext = path.substr(dot);
    for (char& c : ext) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return ext;
}

[[noreturn]] void option_error(const std::string& message) { throw InputError(message); }

void check_options(const SourceSpec& s, const std::string& data) {
    const bool database = s.kind == SourceKind::SQLite || s.kind == SourceKind::PostgreSQL;
    if (!s.sheet.empty() && s.kind != SourceKind::Workbook)
        option_error("--sheet: '" + data + "' is not a workbook; --sheet chooses a sheet of an .xlsx file");
    if (!database && (!s.table.empty() || !s.query.empty()))
        option_error(std::string(s.table.empty() ? "--query" : "--table") + ": '" + data +
                     "' is a file, not a database; --table and --query read from sqlite:PATH or a "
                     "postgresql:// address");
    if (!s.table.empty() && !s.query.empty()) option_error("--table and --query: give one of them, not both");
    if (database && s.table.empty() && s.query.empty())
        option_error("--data '" + data +
                     "' is a database: add --table NAME (a table or view) or --query SQL (one "
                     "read-only SELECT)");
}

// A text file whose first bytes say it is something else.
void check_text_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    char head[16] = {};
    in.read(head, 16);
    const auto got = in.gcount();
    if (got >= 4 && std::memcmp(head, "PK\x03\x04", 4) == 0)
        throw InputError(path +
                         ": is a zip archive, not delimited text; if it is a workbook, give it the "
                         "extension .xlsx");
    if (got == 16 && is_sqlite_file(path))
        throw InputError(path + ": is an SQLite database, not delimited text; read it as --data sqlite:" + path +
                         " with --table NAME or --query SQL");
}

}  // namespace

SourceSpec parse_source(const std::string& data, const std::string& sheet, const std::string& table,
                        const std::string& query) {
    if (data.empty())
        option_error("--data: give a file (.csv, .tsv, .txt, .xlsx), sqlite:PATH or a postgresql:// address");
    SourceSpec s;
    s.sheet = sheet;
    s.table = table;
    s.query = query;
    if (starts_with(data, "sqlite:")) {
        s.kind = SourceKind::SQLite;
        s.location = data.substr(7);
        if (s.location.empty()) option_error("--data sqlite:PATH: the database file's path is missing after 'sqlite:'");
    } else if (starts_with(data, "postgresql://") || starts_with(data, "postgres://")) {
        s.kind = SourceKind::PostgreSQL;
        if (detail::uri_has_password(data))
            option_error(
                "--data: the postgresql:// address holds a password; leave it out of the address (it "
                "would be seen in the process list and the shell's history) and keep it in the password "
                "file (~/.pgpass) or type it when asked");
        s.location = data;
    } else {
        const std::string ext = lower_extension(data);
        s.kind = ext == ".xlsx" || ext == ".xlsm" || ext == ".xls" || ext == ".xlsb" ? SourceKind::Workbook
                                                                                     : SourceKind::TextFile;
        s.location = data;
    }
    check_options(s, data);
    return s;
}

std::string describe_source(const SourceSpec& source) {
    switch (source.kind) {
        case SourceKind::TextFile:
            return source.location;
        case SourceKind::Workbook:
            return source.sheet.empty() ? source.location : "sheet '" + source.sheet + "' of " + source.location;
        case SourceKind::SQLite:
        case SourceKind::PostgreSQL:
            return (source.query.empty() ? "table '" + source.table + "' in " : std::string("query in ")) +
                   source.location;
    }
    return source.location;
}

Table read_source(const SourceSpec& source, const CsvOptions& options, const CsvProgress& progress) {
    switch (source.kind) {
        case SourceKind::TextFile:
            check_text_file(source.location);
            return read_csv(source.location, options, progress);
        case SourceKind::Workbook:
            return read_workbook(source.location, source.sheet, options, progress);
        case SourceKind::SQLite:
            return read_sqlite(source.location, source.table, source.query, options, progress);
        case SourceKind::PostgreSQL:
            return read_postgres(source, options, progress);
    }
    throw InputError(describe_source(source) + ": unknown kind of source");
}

}  // namespace moderato
