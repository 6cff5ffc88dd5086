#include "moderato/reporting/multilevel_report.hpp"

#include <cmath>
#include <sstream>

#include "moderato/reporting/output_json.hpp"
#include "moderato/support/report_text.hpp"

namespace moderato {

namespace {

void write_matrix(JsonWriter& w, const char* key, const Eigen::MatrixXd& m) {
    w.key(key).begin_array();
    for (Eigen::Index i = 0; i < m.rows(); ++i) {
        w.begin_array();
        for (Eigen::Index j = 0; j < m.cols(); ++j) w.value(m(i, j));
        w.end_array();
    }
    w.end_array();
}

void write_slope_tests(JsonWriter& w, const MultilevelResult& m) {
    w.key("random_slope_tests").begin_array();
    for (const auto& t : m.slope_tests) {
        w.begin_object();
        w.field("term", t.term);
        w.field("statistic", t.statistic);
        w.key("mixture_df").begin_array().value(t.df_low).value(t.df_high).end_array();
        w.field("p", t.p_value);
        w.end_object();
    }
    w.end_array();
}

void write_group_effects(JsonWriter& w, const MultilevelResult& m) {
    if (!m.report_group_effects) return;
    w.key("group_effects").begin_array();
    for (const auto& e : m.group_effects) {
        w.begin_object();
        w.field("group", e.group);
        w.field("rows", e.rows);
        w.key("modes").begin_array();
        for (Eigen::Index k = 0; k < e.mode.size(); ++k) w.value(e.mode[k]);
        w.end_array();
        w.key("variances").begin_array();
        for (Eigen::Index k = 0; k < e.mode.size(); ++k) w.value(e.covariance(k, k));
        w.end_array();
        w.end_object();
    }
    w.end_array();
}

std::string group_sizes_text(const MultilevelResult& m) {
    return format_count(static_cast<long long>(m.groups_count)) + " groups of " + m.groups + " (rows per group " +
           format_count(static_cast<long long>(m.size_min)) + " to " +
           format_count(static_cast<long long>(m.size_max)) + ", median " + format_sig(m.size_median) + ")";
}

// One line per random effect: variance, SD, correlations with the earlier ones.
void variance_lines(std::ostringstream& o, const MultilevelResult& m) {
    const Eigen::MatrixXd& T = m.covariance;
    for (Eigen::Index i = 0; i < T.rows(); ++i) {
        o << "  " << m.terms[static_cast<std::size_t>(i)] << ": variance " << format_sig(T(i, i)) << ", SD "
          << format_sig(std::sqrt(T(i, i)));
        for (Eigen::Index j = 0; j < i; ++j)
            if (m.structure == RandomCovariance::Full)
                o << ", correlation with " << m.terms[static_cast<std::size_t>(j)] << " "
                  << format_sig(T(i, j) / std::sqrt(T(i, i) * T(j, j)));
        o << "\n";
    }
    o << "  residual: variance " << format_sig(m.residual_variance) << ", SD "
      << format_sig(std::sqrt(m.residual_variance)) << "\n";
}

}  // namespace

void write_multilevel_fields(JsonWriter& w, const FitResult& f) {
    if (!f.multilevel) return;
    const MultilevelResult& m = *f.multilevel;
    w.field("estimation", to_string(m.estimation));
    w.field("df_method", to_string(m.df_used()));
    w.key("random_effects").begin_object();
    w.field("groups", m.groups);
    w.field("groups_count", m.groups_count);
    w.key("group_sizes").begin_object();
    w.field("min", m.size_min);
    w.field("median", m.size_median);
    w.field("max", m.size_max);
    w.end_object();
    w.field("covariance_structure", to_string(m.structure));
    write_texts(w, "terms", m.terms);
    write_matrix(w, "covariance", m.covariance);
    w.field("residual_variance", m.residual_variance);
    w.field("icc", m.icc);
    w.field("singular", m.singular);
    w.field("converged", m.converged);
    write_slope_tests(w, m);
    write_group_effects(w, m);
    w.end_object();
}

std::string multilevel_text(const FitResult& f) {
    if (!f.multilevel) return {};
    const MultilevelResult& m = *f.multilevel;
    std::ostringstream o;
    o << "\nRandom part (" << (m.estimation == MixedEstimation::Reml ? "REML" : "ML") << ", "
      << (m.structure == RandomCovariance::Full ? "full" : "diagonal") << " covariance), " << group_sizes_text(m)
      << ":\n";
    variance_lines(o, m);
    if (!std::isnan(m.icc)) o << "  intraclass correlation " << format_sig(m.icc) << "\n";
    if (m.singular) o << "  singular fit: a variance at zero or a correlation at ±1\n";
    for (const auto& t : m.slope_tests)
        o << "  random slope of " << t.term << ": likelihood ratio " << format_sig(t.statistic) << ", "
          << p_clause(t.p_value) << " (50:50 mixture of χ²(" << t.df_low << ") and χ²(" << t.df_high << "))\n";
    if (m.report_group_effects) {
        o << "\nGroup effects (conditional modes ± conditional SD):\n";
        for (const auto& e : m.group_effects) {
            o << "  " << e.group << " (" << e.rows << " rows):";
            for (Eigen::Index k = 0; k < e.mode.size(); ++k)
                o << " " << m.terms[static_cast<std::size_t>(k)] << " " << format_sig(e.mode[k]) << " ± "
                  << format_sig(std::sqrt(e.covariance(k, k)));
            o << "\n";
        }
    }
    return o.str();
}

}  // namespace moderato
