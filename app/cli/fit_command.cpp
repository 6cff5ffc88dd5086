#include <iostream>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/streamed_fit.hpp"
#include "moderato/reading/csv_stream.hpp"
#include "moderato/reporting/fit_report.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/support/error.hpp"
#include "postgres_data.hpp"
#include "stream_choice.hpp"

namespace moderato::cli {

namespace {

// The fit of the whole table in memory, or streamed from the file.
FitResult fit_file(const Arguments& a, ModelSpec& spec) {
    if (a.has("in-database")) return fit_in_database_option(a, spec);
    spec = read_spec(a);     // the specification's errors come before the file is read
    if (postgres_data(a)) {  // a database: read whole (no file to stream)
        if (a.has("stream")) throw InputError("option --stream is for files; for a database use --in-database");
        LoadedModel m = load_model(a);
        spec = m.spec;
        FitResult fit = fit_model(m.table, m.spec);
        fit.notes.insert(fit.notes.begin(), m.notes.begin(), m.notes.end());
        return fit;
    }
    const StreamChoice choice = choose_streaming(a, spec);
    if (choice.stream) {
        CsvStream stream(a.required("data"), csv_options(a));
        FitResult fit = fit_streamed(stream, spec);
        if (!choice.note.empty()) fit.notes.insert(fit.notes.begin(), choice.note);
        return fit;
    }
    LoadedModel m = load_model(a, true);
    spec = m.spec;
    FitResult fit = fit_model(m.table, m.spec);
    fit.notes.insert(fit.notes.begin(), m.notes.begin(), m.notes.end());
    if (!choice.note.empty()) fit.notes.insert(fit.notes.begin(), choice.note);
    return fit;
}

// "streamed": how the file was read, null when it was read whole.
void write_streamed(JsonWriter& w, const FitResult& fit) {
    w.key("streamed");
    if (!fit.streamed) {
        w.null();
        return;
    }
    w.begin_object();
    w.field("passes", fit.streamed->passes);
    w.field("chunk_rows", fit.streamed->chunk_rows);
    w.end_object();
}

}  // namespace

int run_fit(const std::vector<std::string>& args) {
    auto flags = model_flags();
    flags.insert("stream");
    flags.insert("in-database");
    auto valued = model_valued();
    valued.insert("memory-budget");
    const Arguments a(args, flags, valued, repeatable_options());
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'");
    const std::string format = output_format(a);
    ModelSpec spec;
    const FitResult fit = fit_file(a, spec);
    if (format == "json") {
        JsonWriter w = begin_output(a, spec);
        write_fit_fields(w, fit);
        write_streamed(w, fit);
        w.end_object();
        std::cout << w.str();
    } else {
        std::cout << fit_to_text(fit, spec.outcome);
    }
    return 0;
}

}  // namespace moderato::cli
