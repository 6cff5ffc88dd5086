#include "moderato/reporting/fit_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

#include "support/text_util.hpp"

namespace moderato {

namespace {

std::string num(double v, int digits = 4) {
    if (std::isnan(v)) return "—";
    if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
    char buf[48];
    const double a = std::abs(v);
    if (a != 0 && (a >= 1e6 || a < 1e-3)) std::snprintf(buf, sizeof buf, "%.*e", digits - 1, v);
    else std::snprintf(buf, sizeof buf, "%.*f", digits, v);
    return buf;
}

std::string df_text(double df) { return std::isinf(df) ? "inf" : detail::fmt_num(df); }

// Display width of a UTF-8 string (code points).
std::size_t width(const std::string& s) {
    std::size_t w = 0;
    for (unsigned char c : s)
        if ((c & 0xC0) != 0x80) ++w;
    return w;
}

std::string pad_left(const std::string& s, std::size_t w) {
    const std::size_t have = width(s);
    return have >= w ? s : std::string(w - have, ' ') + s;
}
std::string pad_right(const std::string& s, std::size_t w) {
    const std::size_t have = width(s);
    return have >= w ? s : s + std::string(w - have, ' ');
}

const char* se_title(SeKind s) {
    switch (s) {
        case SeKind::Classical:
            return "classical";
        case SeKind::HC0:
            return "HC0 (heteroskedasticity-consistent)";
        case SeKind::HC1:
            return "HC1 (heteroskedasticity-consistent)";
        case SeKind::HC2:
            return "HC2 (heteroskedasticity-consistent)";
        case SeKind::HC3:
            return "HC3 (heteroskedasticity-consistent)";
        case SeKind::HC4:
            return "HC4 (heteroskedasticity-consistent)";
        case SeKind::Cluster:
            return "cluster-robust (CR1)";
    }
    return "";
}

void write_wald(JsonWriter& w, const WaldTest& t) {
    w.begin_object();
    w.key("terms").begin_array();
    for (const auto& s : t.terms) w.value(s);
    w.end_array();
    w.field("covariance", to_string(t.covariance));
    w.field("statistic", t.statistic);
    w.field("df1", t.df1);
    w.field("df2", t.df2);
    w.field("chi_square", t.chi_square);
    w.field("p_value", t.p_value);
    w.end_object();
}

}  // namespace

std::string format_p(double p) {
    if (std::isnan(p)) return "—";
    if (p < 0.0001) return "< 0.0001";
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4f", p);
    return buf;
}

void write_fit_fields(JsonWriter& w, const FitResult& f) {
    const bool linear = f.family == Family::Linear;
    auto lin = [&](double v) { return linear ? v : std::numeric_limits<double>::quiet_NaN(); };
    w.field("n", f.n);
    w.field("n_excluded", f.n_excluded);
    w.key("exclusions").begin_array();
    for (const auto& e : f.exclusions) {
        w.begin_object();
        w.field("column", e.column);
        w.field("rows_missing", e.rows);
        w.end_object();
    }
    w.end_array();
    w.field("family", to_string(f.family));
    w.field("se_type", to_string(f.se));
    w.field("level", f.level);
    w.key("coefficients").begin_array();
    for (const auto& c : f.coefficients) {
        w.begin_object();
        w.field("term", c.term);
        w.field("estimate", c.estimate);
        w.field("std_error", c.std_error);
        w.field("statistic", c.statistic);
        w.field("p_value", c.p_value);
        w.field("ci_lower", c.ci_lower);
        w.field("ci_upper", c.ci_upper);
        w.field("vif", c.vif);
        w.end_object();
    }
    w.end_array();
    w.key("covariance").begin_array();
    for (Eigen::Index i = 0; i < f.covariance.rows(); ++i) {
        w.begin_array();
        for (Eigen::Index j = 0; j < f.covariance.cols(); ++j) w.value(f.covariance(i, j));
        w.end_array();
    }
    w.end_array();
    w.key("aliased").begin_array();
    for (const auto& a : f.aliased) w.value(a);
    w.end_array();
    w.field("rank", f.rank);
    w.field("df_residual", f.df_residual);
    w.field("df_inference", f.df_inference);
    w.field("critical_value", f.critical_value);
    if (f.se == SeKind::Cluster) w.field("n_clusters", f.n_clusters);
    w.field("r_squared", lin(f.r_squared));
    w.field("adj_r_squared", lin(f.adj_r_squared));
    w.field("residual_sd", lin(f.residual_sd));
    w.field("f_statistic", lin(f.f_statistic));
    w.field("f_df1", lin(f.f_df1));
    w.field("f_df2", lin(f.f_df2));
    w.field("f_p_value", lin(f.f_p_value));
    w.field("log_likelihood", f.log_likelihood);
    w.field("aic", f.aic);
    w.field("bic", f.bic);
    if (!linear) {
        w.field("deviance", f.deviance);
        w.field("null_deviance", f.null_deviance);
        w.field("mcfadden_r2", f.mcfadden_r2);
        w.field("lr_statistic", f.lr_statistic);
        w.field("lr_df", f.lr_df);
        w.field("lr_p_value", f.lr_p_value);
        w.field("iterations", f.iterations);
        w.field("converged", f.converged);
    }
    if (f.comparison) {
        const auto& c = *f.comparison;
        w.key("comparison").begin_object();
        w.key("dropped_terms").begin_array();
        for (const auto& t : c.dropped_terms) w.value(t);
        w.end_array();
        if (linear) {
            w.field("r_squared_reduced", c.r_squared_reduced);
            w.field("r_squared_change", c.r_squared_change);
            w.field("f_statistic", c.f_statistic);
            w.field("df1", c.df1);
            w.field("df2", c.df2);
            w.field("p_value", c.p_value);
        } else {
            w.field("lr_statistic", c.lr_statistic);
            w.field("df", c.df1);
            w.field("lr_p_value", c.lr_p_value);
        }
        w.key("wald");
        write_wald(w, c.wald);
        w.end_object();
    }
    w.key("wald_tests").begin_array();
    for (const auto& t : f.wald_tests) write_wald(w, t);
    w.end_array();
    w.key("notes").begin_array();
    for (const auto& s : f.notes) w.value(s);
    w.end_array();
    w.key("warnings").begin_array();
    for (const auto& s : f.warnings) w.value(s);
    w.end_array();
}

std::string fit_to_json(const FitResult& fit) {
    JsonWriter w;
    w.begin_object();
    write_fit_fields(w, fit);
    w.end_object();
    return w.str();
}

std::string fit_to_text(const FitResult& f, const std::string& outcome) {
    std::ostringstream o;
    const bool linear = f.family == Family::Linear;
    o << (linear ? "Linear model" : "Logistic model") << " of " << outcome
      << (linear ? "" : " (probability that " + outcome + " = 1, log-odds scale)") << "\n";
    o << "n = " << f.n << " rows used";
    if (f.n_excluded > 0) {
        o << ", " << f.n_excluded << " excluded (";
        for (std::size_t i = 0; i < f.exclusions.size(); ++i)
            o << (i ? ", " : "") << f.exclusions[i].column << ": " << f.exclusions[i].rows << " missing";
        o << ")";
    }
    o << "\n";
    char lvl[16];
    std::snprintf(lvl, sizeof lvl, "%g%%", f.level * 100);
    o << "Standard errors: " << se_title(f.se);
    if (f.se == SeKind::Cluster) o << ", " << f.n_clusters << " clusters";
    o << " · " << lvl << " intervals · "
      << (std::isinf(f.df_inference) ? std::string("z (normal)") : "t with " + df_text(f.df_inference) + " df")
      << "\n\n";

    const std::vector<std::string> head{
        "term", "estimate", "std. error", linear ? "t" : "z", "p-value", std::string(lvl) + " CI low", "high", "VIF"};
    std::vector<std::vector<std::string>> rows;
    for (const auto& c : f.coefficients) {
        if (c.aliased) {
            rows.push_back({c.term, "aliased", "", "", "", "", "", ""});
            continue;
        }
        rows.push_back({c.term, num(c.estimate), num(c.std_error), num(c.statistic, 2), format_p(c.p_value),
                        num(c.ci_lower), num(c.ci_upper), std::isnan(c.vif) ? "" : num(c.vif, 2)});
    }
    std::vector<std::size_t> wid(head.size());
    for (std::size_t k = 0; k < head.size(); ++k) {
        wid[k] = width(head[k]);
        for (const auto& r : rows) wid[k] = std::max(wid[k], width(r[k]));
    }
    auto line = [&](const std::vector<std::string>& r) {
        o << pad_right(r[0], wid[0]);
        for (std::size_t k = 1; k < r.size(); ++k) o << "  " << pad_left(r[k], wid[k]);
        o << "\n";
    };
    line(head);
    for (const auto& r : rows) line(r);
    o << "\n";
    if (linear) {
        o << "R² " << num(f.r_squared) << " · adjusted R² " << num(f.adj_r_squared) << " · residual SD "
          << num(f.residual_sd) << "\n";
        if (f.f_df1 > 0)
            o << "All terms: F(" << df_text(f.f_df1) << ", " << df_text(f.f_df2) << ") = " << num(f.f_statistic, 2)
              << ", p " << (f.f_p_value < 0.0001 ? "" : "= ") << format_p(f.f_p_value) << "\n";
    } else {
        o << "deviance " << num(f.deviance) << " · null deviance " << num(f.null_deviance) << " · McFadden R² "
          << num(f.mcfadden_r2) << "\n";
        o << "All terms: likelihood-ratio χ²(" << df_text(f.lr_df) << ") = " << num(f.lr_statistic, 2) << ", p "
          << (f.lr_p_value < 0.0001 ? "" : "= ") << format_p(f.lr_p_value) << " · " << f.iterations << " iterations"
          << (f.converged ? "" : " (not converged)") << "\n";
    }
    o << "log-likelihood " << num(f.log_likelihood) << " · AIC " << num(f.aic) << " · BIC " << num(f.bic) << "\n";
    if (f.comparison) {
        const auto& c = *f.comparison;
        o << "\nWithout the product terms (" << detail::join(c.dropped_terms, ", ") << "):\n";
        if (linear)
            o << "  R² " << num(c.r_squared_reduced) << ", change " << num(c.r_squared_change) << "; F("
              << df_text(c.df1) << ", " << df_text(c.df2) << ") = " << num(c.f_statistic, 2) << ", p "
              << (c.p_value < 0.0001 ? "" : "= ") << format_p(c.p_value) << "\n";
        else
            o << "  likelihood-ratio χ²(" << df_text(c.df1) << ") = " << num(c.lr_statistic, 2) << ", p "
              << (c.lr_p_value < 0.0001 ? "" : "= ") << format_p(c.lr_p_value) << "\n";
        o << "  Wald test with " << to_string(c.wald.covariance) << " covariance: "
          << (std::isinf(c.wald.df2)
                  ? "χ²(" + df_text(c.wald.df1) + ") = " + num(c.wald.chi_square, 2)
                  : "F(" + df_text(c.wald.df1) + ", " + df_text(c.wald.df2) + ") = " + num(c.wald.statistic, 2))
          << ", p " << (c.wald.p_value < 0.0001 ? "" : "= ") << format_p(c.wald.p_value) << "\n";
    }
    for (const auto& t : f.wald_tests)
        o << "\nWald test of " << detail::join(t.terms, ", ") << " (" << to_string(t.covariance) << "): "
          << (std::isinf(t.df2) ? "χ²(" + df_text(t.df1) + ") = " + num(t.chi_square, 2)
                                : "F(" + df_text(t.df1) + ", " + df_text(t.df2) + ") = " + num(t.statistic, 2))
          << ", p " << (t.p_value < 0.0001 ? "" : "= ") << format_p(t.p_value) << "\n";
    if (!f.notes.empty()) {
        o << "\nNotes:\n";
        for (const auto& s : f.notes) o << "  - " << s << "\n";
    }
    if (!f.warnings.empty()) {
        o << "\nWarnings:\n";
        for (const auto& s : f.warnings) o << "  ! " << s << "\n";
    }
    o << "\nCaution: regression estimates from observational data are associations, not causal effects.\n";
    if (!linear)
        o << "Caution: a product coefficient on the log-odds scale is not the interaction on the probability scale.\n";
    return o.str();
}

}  // namespace moderato
