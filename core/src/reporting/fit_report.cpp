#include "moderato/reporting/fit_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

#include "moderato/reporting/multilevel_report.hpp"
#include "moderato/reporting/output_json.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

// ------------------------------------------------------------------ JSON

// A test statistic with its reference distribution ("F" or "chi-square");
// df2 is null for a chi-square reference.
void write_test(JsonWriter& w, const char* key, const char* distribution, double value, double df1, double df2,
                double p) {
    w.key(key).begin_object();
    w.field("distribution", distribution);
    w.field("value", value);
    w.field("df1", df1);
    w.field("df2", df2);
    w.field("p", p);
    w.end_object();
}

void write_rows(JsonWriter& w, const FitResult& f) {
    w.field("rows_used", f.n);
    w.field("rows_left_out", f.n_excluded);
    w.key("left_out_by_column").begin_array();
    for (const auto& e : f.exclusions) {
        w.begin_object();
        w.field("column", e.column);
        w.field("rows_missing", e.rows);
        w.end_object();
    }
    w.end_array();
}

void write_model(JsonWriter& w, const FitResult& f) {
    w.field("family", to_string(f.family));
    if (count_outcome(f.family)) {
        w.key("exposure");
        if (f.exposure.empty()) w.null();
        else w.value(f.exposure);
    }
    w.field("standard_errors", standard_errors_name(f.se));
    if (f.se == SeKind::Cluster) w.field("clusters", f.n_clusters);
    w.field("level", f.level);
    w.field("test", test_name(f.df_inference));
    w.field("residual_df", f.df_residual);
    w.field("test_df", f.df_inference);
    w.field("critical_value", f.critical_value);
    write_multilevel_fields(w, f);
}

void write_terms(JsonWriter& w, const FitResult& f) {
    w.key("terms").begin_array();
    for (const auto& c : f.coefficients) {
        w.begin_object();
        w.field("name", c.term);
        write_inference(w, c);
        w.field("vif", c.vif);
        if (f.multilevel) w.field("df", c.df);
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
    write_texts(w, "not_estimated", f.aliased);
}

// R² and the residual SD belong to linear models (null for logistic ones);
// the overall test is the F test (linear) or the likelihood-ratio test.
void write_fit_statistics(JsonWriter& w, const FitResult& f) {
    const bool linear = f.family == Family::Linear;
    const double none = std::numeric_limits<double>::quiet_NaN();
    w.field("r2", linear ? f.r_squared : none);
    w.field("r2_adjusted", linear ? f.adj_r_squared : none);
    w.field("residual_sd", linear ? f.residual_sd : none);
    if (linear) write_test(w, "overall_test", "F", f.f_statistic, f.f_df1, f.f_df2, f.f_p_value);
    else write_test(w, "overall_test", "chi-square", f.lr_statistic, f.lr_df, none, f.lr_p_value);
    w.field("log_likelihood", f.log_likelihood);
    w.field("aic", f.aic);
    w.field("bic", f.bic);
    if (linear) return;
    w.field("deviance", f.deviance);
    w.field("null_deviance", f.null_deviance);
    w.field("null_log_likelihood", f.null_log_likelihood);
    w.field("r2_mcfadden", f.mcfadden_r2);
    w.field("iterations", f.iterations);
    w.field("converged", f.converged);
    if (f.dispersion) {
        w.key("dispersion").begin_object();
        w.field("alpha", f.dispersion->alpha);
        w.field("se", f.dispersion->std_error);
        w.field("low", f.dispersion->ci_lower);
        w.field("high", f.dispersion->ci_upper);
        w.end_object();
    }
    if (f.overdispersion) {
        const Overdispersion& o = *f.overdispersion;
        w.key("overdispersion").begin_object();
        w.field("pearson_chi2", o.pearson_chi2);
        w.field("df", o.df);
        w.field("pearson_ratio", o.pearson_ratio);
        w.field("alpha_estimate", o.alpha_estimate);
        w.field("test_value", o.test_value);
        w.field("p", o.p_value);
        w.end_object();
    }
}

// The model without its product terms, on the same rows.
void write_comparison(JsonWriter& w, const FitResult& f) {
    if (!f.comparison) return;
    const auto& c = *f.comparison;
    w.key("without_products").begin_object();
    write_texts(w, "dropped_terms", c.dropped_terms);
    if (!f.multilevel && f.family == Family::Linear) {
        w.field("r2_without", c.r_squared_reduced);
        w.field("r2_change", c.r_squared_change);
        write_test(w, "test", "F", c.f_statistic, c.df1, c.df2, c.p_value);
    } else if (!f.multilevel) {
        write_test(w, "test", "chi-square", c.lr_statistic, c.df1, std::numeric_limits<double>::infinity(),
                   c.lr_p_value);
    }
    w.key("wald");
    write_joint_test(w, c.wald);
    w.end_object();
}

// ------------------------------------------------------------------ text

// The one number formatter (support/report_text): four significant digits
// with trailing zeros, U+2212 minus, "—" for NaN, ∞.
std::string num(double v) { return format_sig(v); }

std::string df_text(double df) { return format_df(df); }

std::size_t width(const std::string& s) { return detail::display_width(s); }

// F(df1, df2) = value, or χ²(df1) = value for a normal reference.
std::string wald_text(const WaldTest& t) {
    return (std::isinf(t.df2) ? "χ²(" + df_text(t.df1) + ") = " + num(t.chi_square)
                              : "F(" + df_text(t.df1) + ", " + df_text(t.df2) + ") = " + num(t.statistic)) +
           ", " + p_clause(t.p_value);
}

std::string pad_left(const std::string& s, std::size_t w) {
    const std::size_t have = width(s);
    return have >= w ? s : std::string(w - have, ' ') + s;
}
std::string pad_right(const std::string& s, std::size_t w) {
    const std::size_t have = width(s);
    return have >= w ? s : s + std::string(w - have, ' ');
}

std::string model_heading(const FitResult& f, const std::string& outcome) {
    if (f.multilevel) return "Multilevel linear model of " + outcome;
    const std::string scale = model_scale_text(f.family, !f.exposure.empty()) + " scale";
    switch (f.family) {
        case Family::Linear:
            break;
        case Family::Logistic:
            return "Logistic model of " + outcome + " (probability that " + outcome + " = 1, " + scale + ")";
        case Family::Probit:
            return "Probit model of " + outcome + " (probability that " + outcome + " = 1, " + scale + ")";
        case Family::Poisson:
        case Family::NegativeBinomial:
            return std::string(f.family == Family::Poisson ? "Poisson" : "Negative binomial (NB2)") + " model of " +
                   outcome + " (" + (f.exposure.empty() ? "counts" : "counts per unit of " + f.exposure) + ", " +
                   scale + ")";
    }
    return "Linear model of " + outcome;
}

void write_heading(std::ostringstream& o, const FitResult& f, const std::string& outcome) {
    o << model_heading(f, outcome) << "\n";
    const auto count = [](std::size_t k) { return format_count(static_cast<long long>(k)); };
    o << "n = " << count(f.n) << " rows used";
    if (f.n_excluded > 0) {
        o << ", " << count(f.n_excluded) << " left out (";
        for (std::size_t i = 0; i < f.exclusions.size(); ++i)
            o << (i ? ", " : "") << f.exclusions[i].column << ": " << count(f.exclusions[i].rows) << " missing";
        o << ")";
    }
    o << "\n";
    o << "Standard errors: " << standard_errors_text(f.se);
    if (f.se == SeKind::Cluster) o << ", " << f.n_clusters << " clusters";
    o << " · " << level_text(f.level) << " intervals · ";
    if (f.multilevel && f.multilevel->df != FixedEffectDf::Normal)
        o << "t with " << df_method_text(f.multilevel->df_used())
          << " df for each term (probing: " << df_text(f.df_inference) << ")";
    else o << (std::isinf(f.df_inference) ? std::string("z (normal)") : "t with " + df_text(f.df_inference) + " df");
    o << "\n\n";
}

// One line per term: value, interval, SE, test value, p (the order of every
// estimate table of ours), then the VIF.
void write_term_table(std::ostringstream& o, const FitResult& f) {
    const std::vector<std::string> head{"term",
                                        "value",
                                        level_text(f.level) + " low",
                                        "high",
                                        "SE",
                                        f.family == Family::Linear ? "t" : "z",
                                        "p",
                                        f.multilevel ? "df" : "VIF"};
    std::vector<std::vector<std::string>> rows;
    const bool own_df = f.multilevel.has_value();
    for (const auto& c : f.coefficients) {
        if (c.aliased) {
            rows.push_back({c.term, "not estimated", "", "", "", "", "", ""});
            continue;
        }
        rows.push_back({c.term, num(c.estimate), num(c.ci_lower), num(c.ci_upper), num(c.std_error), num(c.statistic),
                        format_p_value(c.p_value),
                        own_df              ? df_text(c.df)
                        : std::isnan(c.vif) ? ""
                                            : num(c.vif)});
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
}

void write_fit_statistics_text(std::ostringstream& o, const FitResult& f) {
    if (f.multilevel) {
        o << "residual SD " << num(f.residual_sd) << "\n";
        if (f.f_df1 > 0)
            o << "All terms: Wald F(" << df_text(f.f_df1) << ", " << df_text(f.f_df2) << ") = " << num(f.f_statistic)
              << ", " << p_clause(f.f_p_value) << "\n";
    } else if (f.family == Family::Linear) {
        o << "R² " << num(f.r_squared) << " · adjusted R² " << num(f.adj_r_squared) << " · residual SD "
          << num(f.residual_sd) << "\n";
        if (f.f_df1 > 0)
            o << "All terms: F(" << df_text(f.f_df1) << ", " << df_text(f.f_df2) << ") = " << num(f.f_statistic) << ", "
              << p_clause(f.f_p_value) << "\n";
    } else {
        o << "deviance " << num(f.deviance);
        if (!std::isnan(f.null_deviance)) o << " · null deviance " << num(f.null_deviance);
        o << " · McFadden R² " << num(f.mcfadden_r2) << "\n";
        if (f.dispersion)
            o << "dispersion α " << num(f.dispersion->alpha) << " (SE " << num(f.dispersion->std_error) << "; "
              << level_text(f.level) << " interval " << format_range(f.dispersion->ci_lower, f.dispersion->ci_upper)
              << "): variance = mean + α·mean²\n";
        if (f.overdispersion)
            o << "overdispersion: Pearson χ²/df " << num(f.overdispersion->pearson_ratio) << " · Cameron & Trivedi z "
              << num(f.overdispersion->test_value) << ", one-sided " << p_clause(f.overdispersion->p_value) << "\n";
        o << "All terms: likelihood-ratio χ²(" << df_text(f.lr_df) << ") = " << num(f.lr_statistic) << ", "
          << p_clause(f.lr_p_value) << " · " << f.iterations << " iterations" << (f.converged ? "" : " (not converged)")
          << "\n";
    }
    o << (f.multilevel && f.multilevel->estimation == MixedEstimation::Reml ? "REML criterion " : "log-likelihood ")
      << num(f.log_likelihood) << " · AIC " << num(f.aic) << " · BIC " << num(f.bic) << "\n";
}

void write_tests_text(std::ostringstream& o, const FitResult& f) {
    if (f.comparison) {
        const auto& c = *f.comparison;
        o << "\nWithout the product terms (" << detail::join(c.dropped_terms, ", ") << "):\n";
        if (!f.multilevel && f.family == Family::Linear)
            o << "  R² " << num(c.r_squared_reduced) << ", change " << num(c.r_squared_change) << "; F("
              << df_text(c.df1) << ", " << df_text(c.df2) << ") = " << num(c.f_statistic) << ", " << p_clause(c.p_value)
              << "\n";
        else if (!f.multilevel)
            o << "  likelihood-ratio χ²(" << df_text(c.df1) << ") = " << num(c.lr_statistic) << ", "
              << p_clause(c.lr_p_value) << "\n";
        o << "  Wald test with " << standard_errors_text(f.se) << " standard errors: " << wald_text(c.wald) << "\n";
    }
    for (const auto& t : f.wald_tests)
        o << "\nWald test of " << detail::join(t.terms, ", ") << " (" << standard_errors_text(f.se)
          << " standard errors): " << wald_text(t) << "\n";
}

void write_notes_text(std::ostringstream& o, const FitResult& f) {
    if (!f.notes.empty()) {
        o << "\nNotes:\n";
        for (const auto& s : f.notes) o << "  - " << s << "\n";
    }
    if (!f.warnings.empty()) {
        o << "\nWarnings:\n";
        for (const auto& s : f.warnings) o << "  ! " << s << "\n";
    }
    o << "\nCaution: regression estimates from observational data are associations, not causal effects.\n";
    if (f.family != Family::Linear)
        o << "Caution: a product coefficient on the " << model_scale_text(f.family, !f.exposure.empty())
          << " scale is not the interaction on the " << outcome_scale_text(f.family, f.exposure) << " scale.\n";
}

}  // namespace

std::string joint_test_text(const WaldTest& t) { return wald_text(t); }

const char* standard_errors_text(SeKind se) {
    switch (se) {
        case SeKind::Classical:
            return "model-based";
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

void write_fit_fields(JsonWriter& w, const FitResult& f) {
    write_rows(w, f);
    write_model(w, f);
    write_terms(w, f);
    write_fit_statistics(w, f);
    write_comparison(w, f);
    w.key("joint_tests").begin_array();
    for (const auto& t : f.wald_tests) write_joint_test(w, t);
    w.end_array();
    write_texts(w, "notes", f.notes);
    write_texts(w, "warnings", f.warnings);
}

std::string fit_to_json(const FitResult& fit) {
    JsonWriter w = begin_document();
    write_fit_fields(w, fit);
    w.end_object();
    return w.str();
}

std::string fit_to_text(const FitResult& f, const std::string& outcome) {
    std::ostringstream o;
    write_heading(o, f, outcome);
    write_term_table(o, f);
    write_fit_statistics_text(o, f);
    o << multilevel_text(f);
    write_tests_text(o, f);
    write_notes_text(o, f);
    return o.str();
}

}  // namespace moderato
