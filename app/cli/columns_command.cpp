// `moderato-cli columns --data FILE`: what the import makes of each column.
#include <algorithm>
#include <cmath>
#include <iostream>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/error.hpp"

namespace moderato::cli {

namespace {

struct NumericSummary {
    std::size_t present = 0;
    double mean = NAN, sd = NAN, lo = INFINITY, hi = -INFINITY;
};

NumericSummary summarise(const Column& c) {
    NumericSummary s;
    long double sum = 0, ss = 0;
    for (double v : c.numbers)
        if (!std::isnan(v)) {
            sum += v;
            s.lo = std::min(s.lo, v);
            s.hi = std::max(s.hi, v);
            ++s.present;
        }
    if (s.present) s.mean = static_cast<double>(sum / s.present);
    for (double v : c.numbers)
        if (!std::isnan(v)) ss += (v - s.mean) * (v - s.mean);
    if (s.present > 1) s.sd = std::sqrt(static_cast<double>(ss / (s.present - 1)));
    return s;
}

// One column: its JSON object, and its line of the text output.
std::string write_column(JsonWriter& w, const Table& t, const Column& c) {
    const std::size_t missing = c.missing_count();
    w.begin_object();
    w.field("name", c.name);
    w.field("kind", c.kind == ColumnKind::Numeric ? "numeric" : "categorical");
    w.field("values", t.rows() - missing);
    w.field("missing", missing);
    char line[256];
    if (c.kind == ColumnKind::Numeric) {
        const NumericSummary s = summarise(c);
        w.field("mean", s.mean).field("sd", s.sd).field("min", s.lo).field("max", s.hi);
        std::snprintf(line, sizeof line,
                      "  %-24s numeric      n %zu, missing %zu, mean %.6g, SD %.6g, range %.6g to %.6g\n",
                      c.name.c_str(), s.present, missing, s.mean, s.sd, s.lo, s.hi);
    } else {
        w.field("levels", c.levels.size());
        std::snprintf(line, sizeof line, "  %-24s categorical  n %zu, missing %zu, %zu levels\n", c.name.c_str(),
                      t.rows() - missing, missing, c.levels.size());
    }
    w.end_object();
    return line;
}

}  // namespace

// Reads a data file and summarises each column: kind, values present,
// missing, and mean, SD, min, max (numeric) or the number of levels
// (categorical).
int run_columns(const std::vector<std::string>& args) {
    auto valued = import_valued();
    valued.insert("format");
    const Arguments a(args, import_flags(), valued, repeatable_options());
    if (!a.positional.empty()) throw InputError("unexpected argument '" + a.positional.front() + "'");
    const std::string format = output_format(a);
    const Table t = load_table(a);
    JsonWriter w = begin_document();
    w.field("data", a.required("data"));
    w.field("rows", t.rows());
    w.key("columns").begin_array();
    std::string text =
        a.required("data") + ": " + std::to_string(t.rows()) + " rows, " + std::to_string(t.cols()) + " columns\n";
    for (const auto& c : t.columns) text += write_column(w, t, c);
    w.end_array();
    w.end_object();
    std::cout << (format == "json" ? w.str() : text);
    return 0;
}

}  // namespace moderato::cli
