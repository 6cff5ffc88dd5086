// A PostgreSQL server as a connection dialog meets it (postgres_source.hpp):
// the URI of an address, and the tables a user may read there.
#include <algorithm>
#include <cctype>
#include <string>
#include <string_view>
#include <vector>

#include "moderato/reading/postgres_source.hpp"
#include "reading/postgres_connection.hpp"
#include "reading/postgres_uri.hpp"

namespace moderato {

namespace {

// A part of a table's name as `table` takes it: in double quotes (inner
// quotes doubled) when it holds a dot or a double quote.
std::string name_part(const std::string& part) {
    if (part.find_first_of(".\"") == std::string::npos) return part;
    std::string out = "\"";
    for (const char ch : part) out += ch == '"' ? std::string("\"\"") : std::string(1, ch);
    return out + "\"";
}

}  // namespace

std::string postgres_address(const PostgresAddress& address) {
    std::string query;
    const auto add = [&](const char* key, const std::string& value) {
        if (value.empty()) return;
        // '/', ':' and '@' may stand in a URI's query as they are (a socket folder stays readable).
        query += (query.empty() ? "?" : "&") + std::string(key) + "=" + detail::percent_encoded(value, "/:@");
    };
    add("host", address.host);
    add("port", address.port);
    add("user", address.user);
    return "postgresql:///" + detail::percent_encoded(address.database) + query;
}

std::vector<std::string> postgres_tables(const std::string& location, const std::string& password) {
    const SourceSpec server{SourceKind::PostgreSQL, location, {}, {}, {}};
    detail::PgConnection c(server, password);
    c.begin_read_only();
    // r table, v view, m materialized view, p partitioned table, f foreign table.
    const detail::PgResult r = c.exec(
        "SELECT n.nspname, c.relname FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace "
        "WHERE c.relkind IN ('r', 'v', 'm', 'p', 'f') AND NOT c.relispartition "
        "AND n.nspname NOT IN ('pg_catalog', 'information_schema') AND n.nspname NOT LIKE 'pg\\_toast%' "
        "AND has_table_privilege(c.oid, 'SELECT') ORDER BY n.nspname <> 'public', n.nspname, c.relname",
        "listing the tables");
    std::vector<std::string> out;
    for (int i = 0; i < r.rows(); ++i) {
        const std::string schema = r.text(i, 0), name = r.text(i, 1);
        out.push_back(schema == "public" ? name_part(name) : name_part(schema) + "." + name_part(name));
    }
    c.exec("COMMIT", "ending the read-only transaction");
    return out;
}

}  // namespace moderato
