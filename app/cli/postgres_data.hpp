// `--data postgresql://...` (or postgres://) with `--table NAME` or `--query
// SQL`: the PostgreSQL source of a command, and `fit --in-database`.
// The password comes from libpq's password file or its PGPASSWORD variable,
// or is typed at the terminal when the server asks (password_prompt.hpp);
// never from the command line (a password inside the URI is refused).
#pragma once

#include <optional>
#include <string>

#include "arguments.hpp"
#include "model_options.hpp"
#include "moderato/estimation/design.hpp"
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

// `probe --in-database`: the same fit, and in `m.table` a reproducible
// random sample of at most kPlotSampleRows rows (read_postgres_sample) for
// the design the probe takes its moderator values and summaries from, in
// `design`. `note` says which rows each part used when the sample is not
// every row; a term the sample lacks (a rare level) is refused by name.
FitResult probe_in_database_option(const Arguments& args, LoadedModel& m, Design& design, std::string& note);

}  // namespace moderato::cli
