#include "moderato/reporting/cells_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "moderato/reporting/fit_report.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

template <class T>
void write_inference(JsonWriter& w, const T& e, bool logistic) {
    w.field("estimate", e.estimate);
    w.field("std_error", e.std_error);
    w.field("statistic", e.statistic);
    w.field("p_value", e.p_value);
    w.field("ci_lower", e.ci_lower);
    w.field("ci_upper", e.ci_upper);
    if (logistic) {
        w.field("odds_ratio", e.odds_ratio);
        w.field("odds_ratio_lower", e.odds_ratio_lower);
        w.field("odds_ratio_upper", e.odds_ratio_upper);
    }
    w.field("estimable", e.estimable);
}

std::string num(double v) { return std::isnan(v) ? "—" : detail::fmt_short(v); }

}  // namespace

void write_cell_table(JsonWriter& w, const CellTable& t) {
    const bool logistic = t.family == Family::Logistic;
    w.begin_object();
    w.field("row_factor", t.row_factor);
    w.field("column_factor", t.column_factor);
    w.key("row_levels").begin_array();
    for (const auto& l : t.row_levels) w.value(l);
    w.end_array();
    w.key("column_levels").begin_array();
    for (const auto& l : t.column_levels) w.value(l);
    w.end_array();
    w.field("scale", to_string(t.scale));
    w.field("se_type", to_string(t.covariance));
    w.field("level", t.level);
    w.field("df", t.df);
    w.field("critical_value", t.critical_value);
    w.key("cells").begin_array();
    for (const auto& c : t.cells) {
        w.begin_object();
        w.field("row_level", c.row_level);
        w.field("column_level", c.column_level);
        w.field("n", c.n);
        w.field("observed_mean", c.observed_mean);
        w.field("estimate", c.estimate);
        w.field("std_error", c.std_error);
        w.field("ci_lower", c.ci_lower);
        w.field("ci_upper", c.ci_upper);
        if (logistic) {
            w.field("probability", c.probability);
            w.field("probability_std_error", c.probability_std_error);
            w.field("probability_lower", c.probability_lower);
            w.field("probability_upper", c.probability_upper);
        }
        w.field("estimable", c.estimable);
        w.end_object();
    }
    w.end_array();
    for (const auto* list : {&t.row_effects, &t.column_effects}) {
        w.key(list == &t.row_effects ? "simple_effects_of_row_factor" : "simple_effects_of_column_factor")
            .begin_array();
        for (const auto& e : *list) {
            w.begin_object();
            w.field("label", e.label);
            w.field("level", e.level);
            w.field("reference", e.reference);
            w.field("at_level", e.at_level);
            write_inference(w, e, logistic);
            w.end_object();
        }
        w.end_array();
    }
    w.key("interaction_contrasts").begin_array();
    for (const auto& c : t.interactions) {
        w.begin_object();
        w.field("label", c.label);
        w.field("row_level", c.row_level);
        w.field("column_level", c.column_level);
        write_inference(w, c, logistic);
        w.end_object();
    }
    w.end_array();
    w.key("interaction_test");
    if (t.interaction_test) {
        const auto& x = *t.interaction_test;
        w.begin_object();
        w.field("statistic", x.statistic);
        w.field("df1", x.df1);
        w.field("df2", x.df2);
        w.field("chi_square", x.chi_square);
        w.field("p_value", x.p_value);
        w.field("covariance", to_string(x.covariance));
        w.end_object();
    } else {
        w.null();
    }
    w.key("notes").begin_array();
    for (const auto& s : t.notes) w.value(s);
    w.end_array();
    w.end_object();
}

std::string cell_table_to_text(const CellTable& t) {
    std::ostringstream o;
    o << "Cell table: " << t.row_factor << " × " << t.column_factor << " (" << to_string(t.scale) << ", "
      << to_string(t.covariance) << " standard errors)\n\n";
    char line[256];
    std::snprintf(line, sizeof line, "  %-18s %-18s %6s %11s %11s %23s\n", t.row_factor.c_str(),
                  t.column_factor.c_str(), "n", "predicted", "std. error", "interval");
    o << line;
    for (const auto& c : t.cells) {
        const std::string ci = num(c.ci_lower) + " to " + num(c.ci_upper);
        std::snprintf(line, sizeof line, "  %-18s %-18s %6zu %11s %11s %23s\n", c.row_level.c_str(),
                      c.column_level.c_str(), c.n, num(c.estimate).c_str(), num(c.std_error).c_str(), ci.c_str());
        o << line;
    }
    o << "\nSimple effects:\n";
    for (const auto* list : {&t.row_effects, &t.column_effects})
        for (const auto& e : *list)
            o << "  " << e.label << ": " << num(e.estimate) << " (SE " << num(e.std_error) << ", p "
              << format_p(e.p_value) << ")\n";
    o << "\nInteraction (difference in differences):\n";
    for (const auto& c : t.interactions)
        o << "  " << c.label << ": " << num(c.estimate) << " (SE " << num(c.std_error) << ", p " << format_p(c.p_value)
          << ")\n";
    if (t.interaction_test)
        o << "  joint test of all interaction terms: " << (std::isinf(t.interaction_test->df2) ? "χ²" : "F") << "("
          << num(t.interaction_test->df1)
          << (std::isinf(t.interaction_test->df2) ? "" : ", " + num(t.interaction_test->df2)) << ") = "
          << num(std::isinf(t.interaction_test->df2) ? t.interaction_test->chi_square : t.interaction_test->statistic)
          << ", p " << format_p(t.interaction_test->p_value) << "\n";
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
    w.key("x_values").begin_array();
    for (double v : g.x_values) w.value(v);
    w.end_array();
    w.key("z_values").begin_array();
    for (double v : g.z_values) w.value(v);
    w.end_array();
    for (const auto* m : {&g.predicted, &g.std_error}) {
        w.key(m == &g.predicted ? "predicted" : "std_error").begin_array();
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
