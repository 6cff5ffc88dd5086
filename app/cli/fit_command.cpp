#include <iostream>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/reporting/fit_report.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/support/error.hpp"

namespace moderato::cli {

int run_fit(const std::vector<std::string>& args) {
    const Arguments a(args, model_flags(), model_valued(), repeatable_options());
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'");
    const std::string format = output_format(a);
    LoadedModel m = load_model(a);
    FitResult fit = fit_model(m.table, m.spec);
    fit.notes.insert(fit.notes.begin(), m.notes.begin(), m.notes.end());
    if (format == "json") {
        JsonWriter w = begin_output(a, m.spec);
        write_fit_fields(w, fit);
        w.end_object();
        std::cout << w.str();
    } else {
        std::cout << fit_to_text(fit, m.spec.outcome);
    }
    return 0;
}

}  // namespace moderato::cli
