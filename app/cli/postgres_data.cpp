#include "postgres_data.hpp"

#include "model_options.hpp"
#include "moderato/estimation/in_database_fit.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "password_prompt.hpp"

namespace moderato::cli {

std::optional<SourceSpec> postgres_data(const Arguments& args) {
    SourceSpec source = source_spec(args);  // refuses a password in the address, and misfitting options
    if (source.kind != SourceKind::PostgreSQL) return std::nullopt;
    return source;
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
    return fit_in_database(*source, spec, csv_options(args), typed_password(source->location));
}

}  // namespace moderato::cli
