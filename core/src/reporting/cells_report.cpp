#include "moderato/reporting/cells_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "moderato/reporting/fit_report.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

// A simple effect or an interaction contrast: its inference, the odds-ratio
// form for a logistic fit, and whether it could be estimated.
template <class T>
void write_contrast_inference(JsonWriter& w, const T& e, bool logistic) {
    write_inference(w, e);
    if (logistic) {
        w.key("odds_ratio").begin_object();
        w.field("value", e.odds_ratio);
        w.field("low", e.odds_ratio_lower);
        w.field("high", e.odds_ratio_upper);
        w.end_object();
    }
    w.field("estimable", e.estimable);
}

std::string num(double v) { return std::isnan(v) ? "—" : format_sig(v); }

void write_levels(JsonWriter& w, const CellTable& t) {
    w.field("row_factor", t.row_factor);
    w.field("column_factor", t.column_factor);
    write_texts(w, "row_levels", t.row_levels);
    write_texts(w, "column_levels", t.column_levels);
    w.field("scale", "model");  // the linear predictor: the mean, or the log-odds
    w.field("level", t.level);
    w.field("df", t.df);
    w.field("critical_value", t.critical_value);
}

// Each cell's predicted value with its interval (and, for a logistic fit,
// the predicted probability), beside the observed mean.
void write_cells(JsonWriter& w, const CellTable& t) {
    const bool logistic = t.family == Family::Logistic;
    w.key("cells").begin_array();
    for (const auto& c : t.cells) {
        w.begin_object();
        w.field("row_level", c.row_level);
        w.field("column_level", c.column_level);
        w.field("rows", c.n);
        w.field("observed_mean", c.observed_mean);
        w.field("value", c.estimate);
        w.field("se", c.std_error);
        w.field("low", c.ci_lower);
        w.field("high", c.ci_upper);
        if (logistic) {
            w.key("probability").begin_object();
            w.field("value", c.probability);
            w.field("se", c.probability_std_error);
            w.field("low", c.probability_lower);
            w.field("high", c.probability_upper);
            w.end_object();
        }
        w.field("estimable", c.estimable);
        w.end_object();
    }
    w.end_array();
}

void write_simple_effects(JsonWriter& w, const char* key, const std::vector<SimpleEffect>& list, bool logistic) {
    w.key(key).begin_array();
    for (const auto& e : list) {
        w.begin_object();
        w.field("label", e.label);
        w.field("level", e.level);
        w.field("reference", e.reference);
        w.field("at_level", e.at_level);
        write_contrast_inference(w, e, logistic);
        w.end_object();
    }
    w.end_array();
}

void write_interactions(JsonWriter& w, const CellTable& t) {
    w.key("interaction_contrasts").begin_array();
    for (const auto& c : t.interactions) {
        w.begin_object();
        w.field("label", c.label);
        w.field("row_level", c.row_level);
        w.field("column_level", c.column_level);
        write_contrast_inference(w, c, t.family == Family::Logistic);
        w.end_object();
    }
    w.end_array();
    w.key("interaction_test");
    if (t.interaction_test) write_joint_test(w, *t.interaction_test);
    else w.null();
}

}  // namespace

void write_cell_table(JsonWriter& w, const CellTable& t) {
    const bool logistic = t.family == Family::Logistic;
    w.begin_object();
    write_levels(w, t);
    write_cells(w, t);
    write_simple_effects(w, "effects_of_row_factor", t.row_effects, logistic);
    write_simple_effects(w, "effects_of_column_factor", t.column_effects, logistic);
    write_interactions(w, t);
    write_texts(w, "notes", t.notes);
    w.end_object();
}

std::string cell_table_to_text(const CellTable& t) {
    std::ostringstream o;
    o << "Cell table: " << t.row_factor << " × " << t.column_factor << " (" << to_string(t.scale) << ", "
      << standard_errors_text(t.covariance) << " standard errors)\n\n";
    char line[256];
    std::snprintf(line, sizeof line, "  %-18s %-18s %6s %11s %23s %11s\n", t.row_factor.c_str(),
                  t.column_factor.c_str(), "rows", "predicted", "interval", "SE");
    o << line;
    for (const auto& c : t.cells) {
        const std::string ci = format_range(c.ci_lower, c.ci_upper);
        std::snprintf(line, sizeof line, "  %-18s %-18s %6zu %11s %23s %11s\n", c.row_level.c_str(),
                      c.column_level.c_str(), c.n, num(c.estimate).c_str(), ci.c_str(), num(c.std_error).c_str());
        o << line;
    }
    // value, interval, SE, p: the order of every estimate table of ours.
    const auto contrast = [&](const std::string& label, const Inference& e) {
        o << "  " << label << ": " << num(e.estimate) << " (interval " << format_range(e.ci_lower, e.ci_upper)
          << ", SE " << num(e.std_error) << ", p " << format_p_value(e.p_value) << ")\n";
    };
    o << "\nSimple effects:\n";
    for (const auto* list : {&t.row_effects, &t.column_effects})
        for (const auto& e : *list) contrast(e.label, e);
    o << "\nInteraction (difference in differences):\n";
    for (const auto& c : t.interactions) contrast(c.label, c);
    if (t.interaction_test) {
        const auto& x = *t.interaction_test;
        const bool chi = std::isinf(x.df2);
        o << "  joint test of all interaction terms: " << (chi ? "χ²" : "F") << "(" << num(x.df1)
          << (chi ? "" : ", " + num(x.df2)) << ") = " << num(chi ? x.chi_square : x.statistic) << ", p "
          << format_p_value(x.p_value) << "\n";
    }
    if (!t.notes.empty()) {
        o << "\nNotes:\n";
        for (const auto& s : t.notes) o << "  - " << s << "\n";
    }
    o << "\nCaution: these are associations in observational data, not causal effects, unless the factors were "
         "randomised.\n";
    return o.str();
}

void write_surface(JsonWriter& w, const SurfaceGrid& g) {
    w.begin_object();
    w.field("x", g.x);
    w.field("z", g.z);
    w.field("scale", "model");
    write_numbers(w, "x_values", g.x_values);
    write_numbers(w, "z_values", g.z_values);
    for (const auto* m : {&g.predicted, &g.std_error}) {
        w.key(m == &g.predicted ? "predicted" : "se").begin_array();
        for (Eigen::Index k = 0; k < m->rows(); ++k) {
            w.begin_array();
            for (Eigen::Index i = 0; i < m->cols(); ++i) w.value((*m)(k, i));
            w.end_array();
        }
        w.end_array();
    }
    w.end_object();
}

}  // namespace moderato
