#include "postgres_data.hpp"

#include "model_options.hpp"
#include "moderato/estimation/in_database_fit.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"

namespace moderato::cli {

std::set<std::string> database_valued() { return {"table", "query"}; }

std::optional<SourceSpec> postgres_data(const Arguments& args) {
    const std::string data = args.required("data");
    const auto table = args.get("table"), query = args.get("query");
    const bool uri = data.rfind("postgresql://", 0) == 0 || data.rfind("postgres://", 0) == 0;
    if (!uri) {
        if (table || query)
            throw InputError(std::string("option --") + (table ? "table" : "query") +
                             " is for a database given to --data (postgresql://...)");
        return std::nullopt;
    }
    if (postgres_location_without_password(data) != data)
        throw InputError(
            "option --data: leave the password out of the address; libpq reads it from ~/.pgpass "
            "(or PGPASSFILE) or PGPASSWORD");
    if (table.has_value() == query.has_value())
        throw InputError("option --data names a database: give --table NAME or --query SQL (one of them)");
    return SourceSpec{SourceKind::PostgreSQL, data, "", table.value_or(""), query.value_or("")};
}

FitResult fit_in_database_option(const Arguments& args, ModelSpec& spec) {
    const auto source = postgres_data(args);
    if (!source)
        throw InputError(
            "option --in-database needs a PostgreSQL source: --data postgresql://... with --table or "
            "--query");
    for (const char* o : {"centre", "standardise", "log", "log1p"})
        if (args.has(o))
            throw InputError(std::string("option --") + o +
                             " changes columns here, which a fit in the database cannot do; compute the column in "
                             "--query instead, or drop --in-database");
    if (args.has("stream")) throw InputError("options --stream and --in-database do not go together; choose one");
    spec = read_spec(args);
    return fit_in_database(*source, spec, csv_options(args));
}

}  // namespace moderato::cli
