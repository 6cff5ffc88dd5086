#include "reading/postgres_connection.hpp"

#include <libpq-fe.h>

#include <charconv>
#include <cmath>
#include <limits>
#include <map>
#include <optional>

#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "reading/postgres_uri.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

std::string scrub(std::string text, const std::string& secret) {
    if (!secret.empty())
        for (std::size_t at; (at = text.find(secret)) != std::string::npos;) text.replace(at, secret.size(), "***");
    while (!text.empty() && (text.back() == '\n' || text.back() == ' ')) text.pop_back();
    return text;
}

}  // namespace

std::string postgres_location_without_password(const std::string& uri) { return detail::uri_without_password(uri); }

std::string describe_postgres(const SourceSpec& source) {
    const std::string where = detail::uri_without_password(source.location);
    if (!source.query.empty()) return "query in " + where;
    if (source.table.empty()) return where;  // the server itself (listing its tables)
    return "table " + source.table + " in " + where;
}

namespace detail {

PgResult& PgResult::operator=(PgResult&& o) noexcept {
    if (this != &o) {
        if (r_) PQclear(r_);
        r_ = o.r_;
        o.r_ = nullptr;
    }
    return *this;
}
PgResult::~PgResult() {
    if (r_) PQclear(r_);
}
int PgResult::rows() const { return PQntuples(r_); }
int PgResult::cols() const { return PQnfields(r_); }
bool PgResult::null(int row, int col) const { return PQgetisnull(r_, row, col) != 0; }
std::string PgResult::text(int row, int col) const {
    return std::string(PQgetvalue(r_, row, col), static_cast<std::size_t>(PQgetlength(r_, row, col)));
}
double PgResult::number(int row, int col) const {
    if (null(row, col)) return std::numeric_limits<double>::quiet_NaN();
    const std::string t = text(row, col);
    if (t == "NaN") return std::numeric_limits<double>::quiet_NaN();
    if (t == "Infinity" || t == "-Infinity")
        return t[0] == '-' ? -std::numeric_limits<double>::infinity() : std::numeric_limits<double>::infinity();
    double v = 0;
    std::from_chars(t.data(), t.data() + t.size(), v);
    return v;
}

PgConnection::PgConnection(const SourceSpec& source, const std::string& password)
    : source_(source), name_(describe_postgres(source)), secret_(password) {
    if (!source.table.empty() && !source.query.empty())
        throw InputError(name_ + ": give exactly one of a table and a query");
    const std::string uri = source.location;
    std::vector<const char*> keys{"dbname", "fallback_application_name", "connect_timeout"};
    std::vector<const char*> values{uri.c_str(), "moderato", "30"};
    if (!password.empty()) {
        keys.push_back("password");
        values.push_back(password.c_str());
    }
    keys.push_back(nullptr);
    values.push_back(nullptr);
    c_ = PQconnectdbParams(keys.data(), values.data(), 1);
    if (!c_) throw InputError(name_ + ": cannot connect (out of memory)");
    if (PQstatus(c_) != CONNECTION_OK) {
        const std::string why = last_error();
        const bool asks = PQconnectionNeedsPassword(c_) != 0;
        PQfinish(c_);
        c_ = nullptr;
        if (asks)
            throw PasswordNeeded(name_ + ": the server asks for a password; give it when asked, or put it in " +
                                     "the password file (~/.pgpass, or the file PGPASSFILE names)",
                                 detail::uri_without_password(source.location));
        throw InputError(name_ + ": cannot connect: " + why);
    }
    exec(
        "SET extra_float_digits = 1; SET DateStyle = 'ISO, YMD'; SET TimeZone = 'UTC'; "
        "SET IntervalStyle = 'iso_8601'; SET client_encoding = 'UTF8'",
        "setting up the session");
}

PgConnection::~PgConnection() {
    if (c_) PQfinish(c_);
    secret_.assign(secret_.size(), '\0');
}

std::string PgConnection::last_error() const { return scrub(c_ ? PQerrorMessage(c_) : "", secret_); }

PgResult PgConnection::exec(const std::string& sql, const std::string& what) const {
    PgResult r(PQexec(c_, sql.c_str()));
    const auto st = r.get() ? PQresultStatus(r.get()) : PGRES_FATAL_ERROR;
    if (st != PGRES_TUPLES_OK && st != PGRES_COMMAND_OK)
        throw InputError(name_ + ": " + what +
                         " failed: " + scrub(r.get() ? PQresultErrorMessage(r.get()) : PQerrorMessage(c_), secret_));
    return r;
}

void PgConnection::begin_read_only() const {
    exec("BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY", "starting a read-only transaction");
}

std::string PgConnection::identifier(const std::string& name) const {
    char* q = PQescapeIdentifier(c_, name.data(), name.size());
    if (!q) throw InputError(name_ + ": the name " + detail::quoted(name) + " cannot be quoted: " + last_error());
    std::string out(q);
    PQfreemem(q);
    return out;
}

std::string PgConnection::literal(const std::string& text) const {
    char* q = PQescapeLiteral(c_, text.data(), text.size());
    if (!q) throw InputError(name_ + ": a text value cannot be quoted: " + last_error());
    std::string out(q);
    PQfreemem(q);
    return out;
}

std::string PgConnection::from_clause() const {
    if (source_.table.empty() && source_.query.empty()) throw InputError(name_ + ": give a table or a query to read");
    if (!source_.query.empty()) return "(" + trimmed_query(source_.query) + ") AS moderato_query";
    std::string out;
    for (const auto& part : table_name_parts(source_.table)) out += (out.empty() ? "" : ".") + identifier(part);
    return out;
}

namespace {

// How a column of this type is read; nothing for a type Moderato does not read.
std::optional<PgValue> value_of(unsigned oid, char typtype) {
    switch (oid) {
        case 20:
        case 21:
        case 23:
        case 700:
        case 701:
        case 1700:
            return PgValue::Number;
        case 16:
            return PgValue::Boolean;
        case 25:
        case 1043:
        case 19:
            return PgValue::Text;
        case 1042:
            return PgValue::PaddedText;
        case 1082:
        case 1114:
        case 1184:
            return PgValue::DateTime;
        default:
            if (typtype == 'e') return PgValue::Text;
            return std::nullopt;
    }
}

}  // namespace

std::vector<PgColumn> PgConnection::describe_columns() const {
    const std::string sql = source_.query.empty() ? "SELECT * FROM " + from_clause() : trimmed_query(source_.query);
    PgResult prep(PQprepare(c_, "", sql.c_str(), 0, nullptr));
    if (PQresultStatus(prep.get()) != PGRES_COMMAND_OK)
        throw InputError(name_ + ": " + (source_.query.empty() ? "the table" : "the query") +
                         " cannot be read: " + scrub(PQresultErrorMessage(prep.get()), secret_));
    PgResult desc(PQdescribePrepared(c_, ""));
    if (PQresultStatus(desc.get()) != PGRES_COMMAND_OK)
        throw InputError(name_ + ": cannot describe the columns: " + scrub(PQresultErrorMessage(desc.get()), secret_));
    std::vector<PgColumn> cols;
    std::string oids;
    for (int j = 0; j < PQnfields(desc.get()); ++j) {
        cols.push_back({PQfname(desc.get(), j), static_cast<unsigned>(PQftype(desc.get(), j)), {}, PgValue::Number});
        oids += (j ? "," : "") + std::to_string(cols.back().oid);
    }
    if (cols.empty()) throw InputError(name_ + ": the source has no columns");
    // Names, kinds and base types of the types used (domains by their base type).
    std::map<unsigned, std::pair<std::string, char>> types;
    const PgResult t = exec(
        "SELECT t.oid, format_type(t.oid, NULL), b.oid, b.typtype FROM pg_type t JOIN pg_type b "
        "ON b.oid = CASE WHEN t.typtype = 'd' THEN t.typbasetype ELSE t.oid END WHERE t.oid IN (" +
            oids + ")",
        "looking up the column types");
    std::map<unsigned, unsigned> base;
    for (int i = 0; i < t.rows(); ++i) {
        const auto oid = static_cast<unsigned>(std::stoul(t.text(i, 0)));
        types[oid] = {t.text(i, 1), t.text(i, 3).empty() ? 'b' : t.text(i, 3)[0]};
        base[oid] = static_cast<unsigned>(std::stoul(t.text(i, 2)));
    }
    for (auto& c : cols) {
        c.type_name = types[c.oid].first;
        const auto v = value_of(base.count(c.oid) ? base[c.oid] : c.oid, types[c.oid].second);
        if (!v)
            throw InputError(name_ + ": column " + detail::quoted(c.name) + " has type " + c.type_name +
                             ", which Moderato does not read (numbers, booleans, text, enums, dates and timestamps "
                             "are read); convert it in a query, e.g. CAST(" +
                             c.name + " AS text)");
        c.value = *v;
    }
    std::map<std::string, int> seen;
    for (const auto& c : cols)
        if (seen[c.name]++ == 1)
            throw InputError(name_ + ": two columns are named " + detail::quoted(c.name) +
                             "; give them distinct names (AS) in the query");
    return cols;
}

ColumnKind target_kind(const PgColumn& column, const CsvOptions& options) {
    if (options.text_as_missing.count(column.name)) return ColumnKind::Numeric;
    const auto forced = options.column_kinds.find(column.name);
    return forced != options.column_kinds.end() ? forced->second : column.kind();
}

void check_overrides(const std::vector<PgColumn>& columns, const CsvOptions& options, const std::string& source) {
    std::vector<std::string> names;
    for (const auto& c : columns) names.push_back(detail::quoted(c.name));
    const auto known = [&](const std::string& name) {
        for (const auto& c : columns)
            if (c.name == name) return true;
        return false;
    };
    for (const auto& [name, kind] : options.column_kinds) {
        if (!known(name))
            throw InputError(
                source + ": column " + detail::quoted(name) +
                " has a type override but is not a column of this source; columns are: " + detail::join(names, ", "));
        if (kind == ColumnKind::Categorical && options.text_as_missing.count(name))
            throw InputError(source + ": column " + detail::quoted(name) +
                             " is set to categorical and also to numbers with text as missing; choose one");
    }
    for (const auto& name : options.text_as_missing)
        if (!known(name))
            throw InputError(source + ": column " + detail::quoted(name) +
                             " is set to numbers with text as missing but is not a column of this source; columns "
                             "are: " +
                             detail::join(names, ", "));
}

std::string trimmed_query(const std::string& query) {
    std::string q = query;
    while (!q.empty() &&
           (q.back() == ';' || q.back() == ' ' || q.back() == '\n' || q.back() == '\t' || q.back() == '\r'))
        q.pop_back();
    return q;
}

std::vector<std::string> table_name_parts(const std::string& table) {
    std::vector<std::string> parts{""};
    bool in_quotes = false;
    for (std::size_t i = 0; i < table.size(); ++i) {
        const char ch = table[i];
        if (in_quotes) {
            if (ch == '"' && i + 1 < table.size() && table[i + 1] == '"') parts.back() += '"', ++i;
            else if (ch == '"') in_quotes = false;
            else parts.back() += ch;
        } else if (ch == '"' && parts.back().empty()) {
            in_quotes = true;
        } else if (ch == '.' && parts.size() == 1) {
            parts.emplace_back();
        } else {
            parts.back() += ch;
        }
    }
    if (in_quotes || parts.back().empty() || parts.front().empty())
        throw InputError("table name " + detail::quoted(table) +
                         ": write it as NAME or SCHEMA.NAME (a part in double quotes may hold a dot)");
    return parts;
}

}  // namespace detail

}  // namespace moderato
