// `--data postgresql://...` (or postgres://) with `--table NAME` or `--query
// SQL`: the PostgreSQL source of a command, and `fit --in-database`.
// The password comes from libpq's password file or its PGPASSWORD variable,
// or is typed at the terminal when the server asks (password_prompt.hpp);
// never from the command line (a password inside the URI is refused).
#pragma once

#include <optional>

#include "arguments.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/reading/data_source.hpp"

namespace moderato::cli {

// The PostgreSQL source of --data, or nothing when --data is another kind
// of source (source_spec: usage errors name the option).
std::optional<SourceSpec> postgres_data(const Arguments& args);

// `fit --in-database`: the fit computed by aggregate queries in the server.
// Refuses a source that is not PostgreSQL, the column transforms (--centre,
// --standardise, --log, --log1p) and --stream, naming the option.
FitResult fit_in_database_option(const Arguments& args, ModelSpec& spec);

}  // namespace moderato::cli
