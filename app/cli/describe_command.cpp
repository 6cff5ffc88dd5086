#include <algorithm>
#include <cmath>
#include <iostream>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/support/error.hpp"

namespace moderato::cli {

// Reads a data file and summarises each column: kind, n, missing, and mean,
// SD, min, max (numeric) or the number of levels (categorical).
int run_describe(const std::vector<std::string>& args) {
    auto valued = import_valued();
    valued.insert("format");
    const Arguments a(args, import_flags(), valued, repeatable_options());
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'");
    const std::string format = output_format(a);
    const Table t = load_table(a);
    JsonWriter w;
    w.begin_object();
    w.field("data", a.required("data"));
    w.field("rows", t.rows());
    w.key("columns").begin_array();
    std::string text =
        a.required("data") + ": " + std::to_string(t.rows()) + " rows, " + std::to_string(t.cols()) + " columns\n";
    for (const auto& c : t.columns) {
        const std::size_t missing = c.missing_count();
        w.begin_object();
        w.field("name", c.name);
        w.field("kind", c.kind == ColumnKind::Numeric ? "numeric" : "categorical");
        w.field("n", t.rows() - missing);
        w.field("missing", missing);
        char line[256];
        if (c.kind == ColumnKind::Numeric) {
            long double sum = 0, ss = 0;
            double lo = INFINITY, hi = -INFINITY;
            std::size_t n = 0;
            for (double v : c.numbers)
                if (!std::isnan(v)) {
                    sum += v;
                    lo = std::min(lo, v);
                    hi = std::max(hi, v);
                    ++n;
                }
            const double mean = n ? static_cast<double>(sum / n) : NAN;
            for (double v : c.numbers)
                if (!std::isnan(v)) ss += (v - mean) * (v - mean);
            const double sd = n > 1 ? std::sqrt(static_cast<double>(ss / (n - 1))) : NAN;
            w.field("mean", mean).field("sd", sd).field("min", lo).field("max", hi);
            std::snprintf(line, sizeof line,
                          "  %-24s numeric      n %zu, missing %zu, mean %.6g, SD %.6g, range %.6g to %.6g\n",
                          c.name.c_str(), n, missing, mean, sd, lo, hi);
        } else {
            w.field("levels", c.levels.size());
            std::snprintf(line, sizeof line, "  %-24s categorical  n %zu, missing %zu, %zu levels\n", c.name.c_str(),
                          t.rows() - missing, missing, c.levels.size());
        }
        text += line;
        w.end_object();
    }
    w.end_array();
    w.end_object();
    std::cout << (format == "json" ? w.str() : text);
    return 0;
}

}  // namespace moderato::cli
