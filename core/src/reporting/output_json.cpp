#include "moderato/reporting/output_json.hpp"

#include <cmath>

namespace moderato {

JsonWriter begin_document() {
    JsonWriter w;
    w.begin_object();
    w.field("output_version", kOutputVersion);
    return w;
}

void write_inference(JsonWriter& w, const Inference& e, const char* value_key) {
    w.field(value_key, e.estimate);
    w.field("se", e.std_error);
    w.field("test_value", e.statistic);
    w.field("p", e.p_value);
    w.field("low", e.ci_lower);
    w.field("high", e.ci_upper);
}

void write_joint_test(JsonWriter& w, const WaldTest& t) {
    w.begin_object();
    write_texts(w, "terms", t.terms);
    w.field("value", t.statistic);
    w.field("df1", t.df1);
    w.field("df2", t.df2);
    w.field("chi_square", t.chi_square);
    w.field("p", t.p_value);
    w.end_object();
}

const char* standard_errors_name(SeKind se) {
    // Our JSON words where they differ from the CLI's option values (to_string).
    if (se == SeKind::Classical) return "model-based";
    if (se == SeKind::Cluster) return "cluster-robust";
    return to_string(se);
}

const char* test_name(double df) { return std::isinf(df) ? "z" : "t"; }

const char* scale_name(ProbeScale scale) { return scale == ProbeScale::Outcome ? "outcome" : "model"; }

const char* averaging_name(Averaging averaging) { return averaging == Averaging::AtValues ? "values" : "sample"; }

void write_intervals(JsonWriter& w, const char* key, const std::vector<Region>& regions) {
    w.key(key).begin_array();
    for (const auto& r : regions) {
        w.begin_array();
        w.value(r.lo);  // non-finite -> null (unbounded)
        w.value(r.hi);
        w.end_array();
    }
    w.end_array();
}

void write_pair(JsonWriter& w, const char* key, const std::pair<double, double>& pair) {
    w.key(key).begin_array().value(pair.first).value(pair.second).end_array();
}

void write_numbers(JsonWriter& w, const char* key, const std::vector<double>& values) {
    w.key(key).begin_array();
    for (double v : values) w.value(v);
    w.end_array();
}

void write_texts(JsonWriter& w, const char* key, const std::vector<std::string>& texts) {
    w.key(key).begin_array();
    for (const auto& s : texts) w.value(s);
    w.end_array();
}

}  // namespace moderato
