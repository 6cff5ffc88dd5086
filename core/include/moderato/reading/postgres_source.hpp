// Reading a PostgreSQL table or query (libpq) into a Table, and the
// fingerprint a project records of what was read.
//
// The source is a SourceSpec of kind PostgreSQL: `location` a libpq URI
// without a password ("postgresql:///shop?host=/run/pg&user=me"), and either
// `table` ("name" or "schema.name", taken exactly as written: no case folding;
// a part in double quotes may hold a dot) or `query` (one SELECT). A password,
// when the caller has one (a prompt), is passed in and handed to libpq only:
// it is never stored, logged or put into a message; without one, libpq reads
// its password file (~/.pgpass or PGPASSFILE) as usual.
//
// Everything runs in one REPEATABLE READ, READ ONLY transaction, so a query
// cannot write and the rows and their fingerprint come from one snapshot.
// Rows are streamed (COPY (...) TO STDOUT, one row at a time); the progress
// callback gets rows read and the table's estimated row count (pg_class's
// reltuples; 0 when unknown, as for a query), and returning false cancels
// the running COPY on the server (PQcancel) and throws Cancelled.
//
// Types (by the result's type OIDs, domains by their base type):
// - smallint, integer, bigint, real, double precision, numeric: numeric
//   (NaN is missing; an infinite value is refused naming the column and row);
// - boolean: numeric 0 (false) / 1 (true);
// - text, varchar, char (trailing blanks dropped), name and enums: categorical;
// - date, timestamp, timestamptz: categorical, their ISO 8601 text (a date
//   as a number needs a choice of origin and unit; make it in a --query,
//   e.g. "SELECT extract(epoch FROM t) / 86400 AS day, ...");
// - anything else: refused, naming the column and its type.
// NULL is missing. CsvOptions apply as read_csv applies them: a value whose
// text (blanks and tabs trimmed) is a missing token is missing (in a number
// column, a token that reads as a number is compared as a number, so "-99"
// also matches a numeric(5,2) value printed "-99.00"); column_kinds
// force a kind (numbers as categories take their PostgreSQL text; text as
// numbers must read as numbers in full, as in a CSV file); text_as_missing
// reads a text column as numbers with its non-numeric cells missing.
// Categories are coded in order of first appearance; Table::row_lines stays
// empty, so rows are named "row N" (in the order the server returned them).
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/data_source.hpp"
#include "moderato/reading/table.hpp"
#include "moderato/support/error.hpp"

namespace moderato {

// The server asks for a password and none was given (none in the call, the
// password file or PGPASSWORD): the caller may ask the user and try again.
// Its message names the server and says where a password can come from;
// `location` is the address asked for (without a password).
class PasswordNeeded : public InputError {
public:
    PasswordNeeded(const std::string& message, std::string location)
        : InputError(message), location_(std::move(location)) {}
    const std::string& location() const { return location_; }

private:
    std::string location_;
};

// Where a server is, as a connection dialog asks for it. `host` is a host
// name or address, or a folder holding the server's Unix socket (it begins
// with '/'); empty parts are left to libpq's defaults.
struct PostgresAddress {
    std::string host;
    std::string port;
    std::string database;
    std::string user;
};

// The libpq URI of an address: "postgresql:///shop?host=/run/pg&port=5432&user=me"
// (every part a query parameter, so a socket folder and a host name are
// written the same way; percent-encoded but for '/', ':' and '@', which a
// query may hold). Never holds a password.
std::string postgres_address(const PostgresAddress& address);

// "table sales in postgresql:///shop?host=/run/pg" or "query in ...": the
// source in messages, with any password removed from the address.
std::string describe_postgres(const SourceSpec& source);

// The address with any password removed (a "user:secret@" part or a
// "password=" parameter), for messages and for what a project records.
std::string postgres_location_without_password(const std::string& uri);

// The tables, views, materialized views, partitioned and foreign tables the
// user may read at `location` (outside the system schemas), sorted: "name"
// in the schema "public", "schema.name" elsewhere (a part holding a dot or a
// double quote is written in double quotes, as `table` takes it). Throws
// PasswordNeeded or InputError as read_postgres does.
std::vector<std::string> postgres_tables(const std::string& location, const std::string& password = {});

// Reads the source. `fingerprint`, when not null, receives
// postgres_fingerprint's text of the same snapshot. `max_rows` (0: all)
// reads only the first rows the server returns, as for a preview. Throws InputError naming
// the source, and the table or query, column and row where one is at fault;
// a connection failure gives libpq's message without any password, and
// PasswordNeeded when the server asks for a password that was not given.
Table read_postgres(const SourceSpec& source, const CsvOptions& options = {}, const CsvProgress& progress = {},
                    const std::string& password = {}, std::string* fingerprint = nullptr, std::size_t max_rows = 0);

// Rows read for the plots and checks of a fit computed in the database.
inline constexpr std::size_t kPlotSampleRows = 200'000;

// A reproducible random sample of at most `rows` rows of the source: every
// row when there are no more, else the `rows` rows whose MD5 of their text
// (`row::text`, as the fingerprint) comes first, so the same data give the
// same sample with no seed to keep. `total` (not null) receives the
// source's row count, counted in the same snapshot. Otherwise as read_postgres.
Table read_postgres_sample(const SourceSpec& source, std::size_t rows, std::size_t* total,
                           const CsvOptions& options = {}, const CsvProgress& progress = {},
                           const std::string& password = {}, std::string* fingerprint = nullptr);

// What identifies the rows a source yields, computed in the server in one
// scan: "pg-md5-sum:<rows>:<checksum>". The checksum is the sum, modulo 2^64,
// of the first 64 bits (as a signed integer, read big-endian) of the MD5 of
// each row's text (the row as a record, `row::text`, with the session's
// float and date output fixed), so it does not depend on the order of the
// rows, and a changed, added or removed row changes it (unless two changes
// cancel modulo 2^64, about one chance in 1.8e19). Not a security measure.
std::string postgres_fingerprint(const SourceSpec& source, const std::string& password = {});

}  // namespace moderato
