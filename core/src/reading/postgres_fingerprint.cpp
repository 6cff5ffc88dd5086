// The fingerprint of a PostgreSQL source (postgres_source.hpp), computed in
// the server in one scan.
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "reading/postgres_connection.hpp"

namespace moderato {

namespace detail {

// In the connection's current transaction (the reader's snapshot).
std::string fingerprint_in(const PgConnection& c) {
    const std::string select =
        c.source().query.empty() ? "SELECT * FROM " + c.from_clause() : trimmed_query(c.source().query);
    // md5's first 16 hex digits as a signed 64-bit integer; the sum in numeric
    // (exact), reduced modulo 2^64 to 0 .. 2^64 - 1.
    const PgResult r = c.exec(
        "SELECT count(*), ((coalesce(sum(('x' || substr(md5(ROW(moderato_row_.*)::text), 1, 16))::bit(64)::bigint::"
        "numeric), 0) % 18446744073709551616) + 18446744073709551616) % 18446744073709551616 "
        "FROM (" +
            select + ") AS moderato_row_",
        "computing the fingerprint");
    return "pg-md5-sum:" + r.text(0, 0) + ":" + r.text(0, 1);
}

}  // namespace detail

std::string postgres_fingerprint(const SourceSpec& source, const std::string& password) {
    detail::PgConnection c(source, password);
    c.begin_read_only();
    std::string out = detail::fingerprint_in(c);
    c.exec("COMMIT", "ending the read-only transaction");
    return out;
}

}  // namespace moderato
