// Reading a PostgreSQL source row by row (COPY ... TO STDOUT in text format)
// into a Table, with the type mapping and CsvOptions of postgres_source.hpp.
#include <libpq-fe.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <unordered_map>

#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "reading/postgres_connection.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

using detail::PgColumn;
using detail::PgValue;

// One field of a COPY text row, its backslash escapes decoded.
std::string decode_field(const char* b, const char* e) {
    std::string out;
    out.reserve(static_cast<std::size_t>(e - b));
    for (const char* p = b; p < e; ++p) {
        if (*p != '\\' || p + 1 == e) {
            out += *p;
            continue;
        }
        const char c = *++p;
        switch (c) {
            case 'b':
                out += '\b';
                break;
            case 'f':
                out += '\f';
                break;
            case 'n':
                out += '\n';
                break;
            case 'r':
                out += '\r';
                break;
            case 't':
                out += '\t';
                break;
            case 'v':
                out += '\v';
                break;
            case 'x': {
                int v = 0, k = 0;
                for (; k < 2 && p + 1 < e && std::isxdigit(static_cast<unsigned char>(p[1])); ++k, ++p)
                    v = v * 16 +
                        (std::isdigit(static_cast<unsigned char>(*(p + 1))) ? p[1] - '0' : (p[1] | 0x20) - 'a' + 10);
                out += static_cast<char>(v);
                break;
            }
            default:
                if (c >= '0' && c <= '7') {
                    int v = c - '0';
                    for (int k = 0; k < 2 && p + 1 < e && p[1] >= '0' && p[1] <= '7'; ++k) v = v * 8 + (*++p - '0');
                    out += static_cast<char>(v);
                } else {
                    out += c;
                }
        }
    }
    return out;
}

std::string trim_blanks(const std::string& s) {
    std::size_t b = 0, e = s.size();
    while (b < e && (s[b] == ' ' || s[b] == '\t')) ++b;
    while (e > b && (s[e - 1] == ' ' || s[e - 1] == '\t')) --e;
    return s.substr(b, e - b);
}

// A number in full (one leading '+' allowed), finite; nullopt otherwise.
bool parse_number(const std::string& t, double& v) {
    const char* b = t.data();
    const char* e = b + t.size();
    if (b < e && *b == '+') ++b;
    const auto r = std::from_chars(b, e, v);
    return b < e && r.ec == std::errc() && r.ptr == e && std::isfinite(v);
}

class ColumnBuilder {
public:
    ColumnBuilder(const PgColumn& pg, const CsvOptions& options, const std::string& source)
        : pg_(pg), options_(options), source_(source) {
        col_.name = pg.name;
        col_.kind = detail::target_kind(pg, options);
        text_missing_ = options.text_as_missing.count(pg.name) > 0;
        col_.kind_forced = text_missing_ || options.column_kinds.count(pg.name) > 0;
    }
    void add(const char* b, const char* e, std::size_t row) {
        const bool null = e - b == 2 && b[0] == '\\' && b[1] == 'N';
        std::string text = null ? std::string() : decode_field(b, e);
        if (pg_.value == PgValue::PaddedText)
            while (!text.empty() && text.back() == ' ') text.pop_back();
        bool missing = null;
        if (!missing) {
            const std::string t = trim_blanks(text);
            double v = 0, tv = 0;
            const bool by_number = pg_.value == PgValue::Number && parse_number(t, v);
            for (const auto& token : options_.missing_tokens)
                if (by_number ? parse_number(token, tv) && tv == v : t == token) missing = true;
        }
        if (col_.kind == ColumnKind::Numeric) col_.numbers.push_back(missing ? missing_value() : number(text, row));
        else col_.codes.push_back(missing ? kMissingCode : code(text));
    }
    Column take() { return std::move(col_); }

private:
    double number(const std::string& text, std::size_t row) {
        if (pg_.value == PgValue::Boolean) return text == "t" ? 1.0 : 0.0;
        if (pg_.value == PgValue::Number) {
            if (text == "NaN") return missing_value();
            double v = 0;
            if (!parse_number(text, v))
                throw InputError(source_ + ", column " + detail::quoted(pg_.name) + ", row " + std::to_string(row) +
                                 ": the value " + text +
                                 " is not a finite number; filter it out or replace it in a query");
            return v;
        }
        double v = 0;
        const std::string t = trim_blanks(text);
        if (parse_number(t, v)) return v;
        if (text_missing_) {
            if (col_.text_examples.size() < kTextExamples) col_.text_examples.push_back({row, t});
            ++col_.text_as_missing;
            return missing_value();
        }
        throw InputError(source_ + ", column " + detail::quoted(pg_.name) + ", row " + std::to_string(row) + ": '" + t +
                         "' is not a number, but the column is set to numeric; correct the value, add '" + t +
                         "' to the missing tokens, or read the column's text as missing");
    }
    std::int32_t code(const std::string& text) {
        const auto [it, fresh] = codes_.emplace(text, static_cast<std::int32_t>(col_.levels.size()));
        if (fresh) col_.levels.push_back(text);
        return it->second;
    }

    const PgColumn& pg_;
    const CsvOptions& options_;
    const std::string& source_;
    Column col_;
    bool text_missing_ = false;
    std::unordered_map<std::string, std::int32_t> codes_;
};

// The estimated row count of a table (0 when unknown, as for a query).
std::size_t estimated_rows(const detail::PgConnection& c) {
    if (c.source().table.empty()) return 0;
    const auto r = c.exec("SELECT reltuples FROM pg_class WHERE oid = " + c.literal(c.from_clause()) + "::regclass",
                          "estimating the table's size");
    const double v = r.rows() ? r.number(0, 0) : 0;
    return v > 0 ? static_cast<std::size_t>(v) : 0;
}

// Stops the running COPY on the server and reads what is left of it.
[[noreturn]] void cancel_copy(const detail::PgConnection& c) {
    if (PGcancel* k = PQgetCancel(c.get())) {
        char buf[256];
        PQcancel(k, buf, sizeof buf);
        PQfreeCancel(k);
    }
    char* line = nullptr;
    while (PQgetCopyData(c.get(), &line, 0) > 0) PQfreemem(line);
    while (PGresult* r = PQgetResult(c.get())) PQclear(r);
    throw Cancelled();
}

// Which rows to read: all (rows 0), the first `rows`, or a sample of `rows`.
struct RowChoice {
    std::size_t rows = 0;
    bool sample = false;
};

// The rows a source yields: SELECT * FROM the table, or the query.
std::string source_select(const detail::PgConnection& c) {
    return c.source().query.empty() ? "SELECT * FROM " + c.from_clause() : detail::trimmed_query(c.source().query);
}

// The SELECT that yields the chosen rows; `total` (the source's row count)
// is counted for a sample only. A sample of a source with more rows than
// asked for is the rows whose MD5 of their text comes first: the same rows
// for the same data, whatever order the server returns them in.
std::string chosen_select(const detail::PgConnection& c, RowChoice choice, std::size_t& total) {
    const std::string select = source_select(c);
    if (!choice.rows) return select;
    const std::string limit = " LIMIT " + std::to_string(choice.rows);
    if (!choice.sample) return "SELECT * FROM (" + select + ") AS moderato_first" + limit;
    const detail::PgResult n = c.exec("SELECT count(*) FROM (" + select + ") AS moderato_count", "counting the rows");
    total = static_cast<std::size_t>(n.number(0, 0));
    if (total <= choice.rows) return select;
    return "SELECT moderato_sample.* FROM (" + select + ") AS moderato_sample ORDER BY md5(moderato_sample::text)" +
           limit;
}

void stream_rows(const detail::PgConnection& c, std::vector<ColumnBuilder>& builders, const CsvProgress& progress,
                 const std::string& select, std::size_t expected) {
    const std::size_t total = expected ? expected : progress.callback ? estimated_rows(c) : 0;
    {
        const detail::PgResult started(PQexec(c.get(), ("COPY (" + select + ") TO STDOUT").c_str()));
        if (PQresultStatus(started.get()) != PGRES_COPY_OUT)
            throw InputError(c.name() + ": reading the rows failed: " + c.last_error());
    }
    const std::size_t limit_rows = CsvLimits::max_cells / builders.size();
    std::size_t row = 0;
    char* line = nullptr;
    int len = 0;
    while ((len = PQgetCopyData(c.get(), &line, 0)) > 0) {
        ++row;
        const char* p = line;
        const char* end = line + len - (len > 0 && line[len - 1] == '\n' ? 1 : 0);
        try {
            for (std::size_t j = 0; j < builders.size(); ++j) {
                const char* f = p;
                while (p < end && *p != '\t') ++p;
                builders[j].add(f, p, row);
                ++p;
            }
        } catch (...) {
            PQfreemem(line);
            throw;
        }
        PQfreemem(line);
        if (row > limit_rows)
            throw InputError(c.name() + ": more than " + std::to_string(CsvLimits::max_cells) +
                             " cells; Moderato reads at most that many (8 bytes a cell). Fit it in the database "
                             "(--in-database) or select fewer rows or columns");
        if (progress.callback && row % 4096 == 0 && !progress.callback(row, std::max(total, row))) cancel_copy(c);
    }
    if (len == -2) throw InputError(c.name() + ": reading the rows failed: " + c.last_error());
    detail::PgResult end(PQgetResult(c.get()));
    if (PQresultStatus(end.get()) != PGRES_COMMAND_OK)
        throw InputError(c.name() + ": reading the rows failed: " + c.last_error());
    if (progress.callback && !progress.callback(row, row)) throw Cancelled();
}

}  // namespace

namespace detail {
std::string fingerprint_in(const PgConnection& c);  // postgres_fingerprint.cpp
}

namespace {

Table read_rows(const SourceSpec& source, const CsvOptions& options, const CsvProgress& progress,
                const std::string& password, std::string* fingerprint, RowChoice choice, std::size_t* total) {
    detail::PgConnection c(source, password);
    c.begin_read_only();
    const std::vector<PgColumn> columns = c.describe_columns();
    detail::check_overrides(columns, options, c.name());
    std::vector<ColumnBuilder> builders;
    builders.reserve(columns.size());
    for (const auto& col : columns) builders.emplace_back(col, options, c.name());
    std::size_t count = 0;
    const std::string select = chosen_select(c, choice, count);
    if (total) *total = count;
    stream_rows(c, builders, progress, select, choice.rows ? std::min(choice.rows, count) : 0);
    Table t;
    t.source = c.name();
    for (auto& b : builders) t.columns.push_back(b.take());
    if (t.rows() == 0) throw InputError(c.name() + ": no rows");
    if (fingerprint) *fingerprint = detail::fingerprint_in(c);
    c.exec("COMMIT", "ending the read-only transaction");
    return t;
}

}  // namespace

Table read_postgres(const SourceSpec& source, const CsvOptions& options, const CsvProgress& progress,
                    const std::string& password, std::string* fingerprint, std::size_t max_rows) {
    return read_rows(source, options, progress, password, fingerprint, {max_rows, false}, nullptr);
}

Table read_postgres_sample(const SourceSpec& source, std::size_t rows, std::size_t* total, const CsvOptions& options,
                           const CsvProgress& progress, const std::string& password, std::string* fingerprint) {
    return read_rows(source, options, progress, password, fingerprint, {rows, true}, total);
}

}  // namespace moderato
