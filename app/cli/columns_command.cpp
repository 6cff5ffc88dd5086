// `moderato-cli columns --data SOURCE`: what the import makes of each column.
#include <algorithm>
#include <cmath>
#include <iostream>

#include "commands.hpp"
#include "model_options.hpp"
#include "moderato/reporting/json_writer.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"

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

std::string count(std::size_t n) { return format_count(static_cast<long long>(n)); }

// One column: its JSON object, and its line of the text output.
std::string write_column(JsonWriter& w, const Table& t, const Column& c) {
    const std::size_t missing = c.missing_count();
    w.begin_object();
    w.field("name", c.name);
    w.field("kind", c.kind == ColumnKind::Numeric ? "numeric" : "categorical");
    w.field("values", t.rows() - missing);
    w.field("missing", missing);
    // The text line: the one number formatter (support/report_text).
    std::string name = c.name;
    if (name.size() < 24) name.append(24 - name.size(), ' ');
    std::string line;
    if (c.kind == ColumnKind::Numeric) {
        const NumericSummary s = summarise(c);
        w.field("mean", s.mean).field("sd", s.sd).field("min", s.lo).field("max", s.hi);
        line = "  " + name + " numeric      n " + count(s.present) + ", missing " + count(missing) + ", mean " +
               format_sig(s.mean) + ", SD " + format_sig(s.sd) + ", range " + format_range(s.lo, s.hi) + "\n";
    } else {
        w.field("levels", c.levels.size());
        line = "  " + name + " categorical  n " + count(t.rows() - missing) + ", missing " + count(missing) + ", " +
               count(c.levels.size()) + " levels\n";
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
    std::string text = describe_source(source_spec(a)) + ": " + std::to_string(t.rows()) + " rows, " +
                       std::to_string(t.cols()) + " columns\n";
    for (const auto& c : t.columns) text += write_column(w, t, c);
    w.end_array();
    w.end_object();
    std::cout << (format == "json" ? w.str() : text);
    return 0;
}

}  // namespace moderato::cli
