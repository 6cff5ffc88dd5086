// A libpq connection for the PostgreSQL reader and the in-database fit
// (private to core): connecting with an optional password (never stored,
// never put into a message), quoting, the session's fixed text settings, the
// READ ONLY snapshot, and the type of each column a source yields.
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/data_source.hpp"
#include "moderato/reading/table.hpp"

struct pg_conn;
struct pg_result;

namespace moderato::detail {

// How a PostgreSQL column becomes a table column (by its type, after domains):
// smallint, integer, bigint, real, double precision and numeric are numbers;
// boolean is 0/1; text, varchar, char (trailing blanks dropped), name and
// enums are categories; date, timestamp and timestamptz are categories
// holding their ISO 8601 text (convert them in a query to fit them as numbers);
// anything else is refused naming the column and its type.
enum class PgValue { Number, Boolean, Text, PaddedText, DateTime };

struct PgColumn {
    std::string name;
    unsigned oid = 0;       // the result's type
    std::string type_name;  // for messages
    PgValue value = PgValue::Number;
    ColumnKind kind() const {
        return value == PgValue::Number || value == PgValue::Boolean ? ColumnKind::Numeric : ColumnKind::Categorical;
    }
};

class PgResult {
public:
    explicit PgResult(pg_result* r = nullptr) : r_(r) {}
    PgResult(PgResult&& o) noexcept : r_(o.r_) { o.r_ = nullptr; }
    PgResult& operator=(PgResult&& o) noexcept;
    ~PgResult();
    pg_result* get() const { return r_; }
    int rows() const;
    int cols() const;
    bool null(int row, int col) const;
    std::string text(int row, int col) const;
    double number(int row, int col) const;  // NaN for NULL

private:
    pg_result* r_;
};

class PgConnection {
public:
    // `source` names the server in messages (describe_postgres). The password,
    // when not empty, is handed to libpq and forgotten; otherwise libpq uses
    // its password file. Throws InputError with libpq's words, any password removed.
    PgConnection(const SourceSpec& source, const std::string& password);
    ~PgConnection();
    PgConnection(const PgConnection&) = delete;
    PgConnection& operator=(const PgConnection&) = delete;

    pg_conn* get() const { return c_; }
    // Runs one statement; InputError naming `what` with the server's message.
    PgResult exec(const std::string& sql, const std::string& what) const;
    // BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY: every later query sees one snapshot.
    void begin_read_only() const;
    std::string identifier(const std::string& name) const;  // PQescapeIdentifier
    std::string literal(const std::string& text) const;     // PQescapeLiteral
    // What follows FROM: the quoted table ("schema"."name") or "(query) AS q".
    std::string from_clause() const;
    // The columns the source yields, by preparing (not running) SELECT * / the query.
    std::vector<PgColumn> describe_columns() const;
    // The source's words for messages: "table sales in postgresql:///shop?...".
    const std::string& name() const { return name_; }
    const SourceSpec& source() const { return source_; }
    // libpq's last message with any password removed.
    std::string last_error() const;

private:
    pg_conn* c_ = nullptr;
    SourceSpec source_;
    std::string name_;
    std::string secret_;  // only to scrub messages; cleared with the object
};

// The kind a source column is read as under CsvOptions (column_kinds,
// text_as_missing), as read_csv decides; InputError for an override naming
// no column of the source, or one set both ways.
ColumnKind target_kind(const PgColumn& column, const CsvOptions& options);
void check_overrides(const std::vector<PgColumn>& columns, const CsvOptions& options, const std::string& source);

// The query text of a source, stripped of trailing blanks and semicolons.
std::string trimmed_query(const std::string& query);
// The parts of "schema.name" (quoted parts "..." may hold dots; "" doubles a quote).
std::vector<std::string> table_name_parts(const std::string& table);

}  // namespace moderato::detail
