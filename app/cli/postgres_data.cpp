#include "postgres_data.hpp"

#include "model_options.hpp"
#include "moderato/estimation/in_database_fit.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
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

FitResult probe_in_database_option(const Arguments& args, LoadedModel& m, Design& design, std::string& note) {
    FitResult fit = fit_in_database_option(args, m.spec);
    const SourceSpec source = *postgres_data(args);
    std::size_t total = 0;
    m.table =
        read_postgres_sample(source, kPlotSampleRows, &total, csv_options(args), {}, typed_password(source.location));
    design = build_design(m.table, m.spec);
    for (std::size_t j = 0; j < fit.coefficients.size(); ++j)
        if (j >= design.columns.size() || design.columns[j].label != fit.coefficients[j].term)
            throw InputError("the model's term '" + fit.coefficients[j].term +
                             "' is in the database's rows but not in the sample of " +
                             format_count(static_cast<long long>(kPlotSampleRows)) +
                             " rows that gives the moderator values (a rare level?); merge rare levels in --query");
    if (m.table.rows() < total)
        note =
            "fitted in the database over every row; the moderator values probed and the data summaries come "
            "from a random sample of " +
            format_count(static_cast<long long>(m.table.rows())) + " of its " +
            format_count(static_cast<long long>(total)) + " rows";
    return fit;
}

}  // namespace moderato::cli
