#include "memo_multilevel.hpp"

#include <algorithm>
#include <cmath>

#include "moderato/support/report_text.hpp"
#include "multilevel_tables.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

std::string count(std::size_t n) { return format_count(static_cast<long long>(n)); }

// "Rows are nested in 45 groups of team (1 to 14 rows each, median 7); each
// group has its own intercept and its own slope of hours (REML, full covariance)."
std::string groups_sentence(const MultilevelResult& m) {
    std::vector<std::string> own{"its own intercept"};
    for (std::size_t k = 1; k < m.terms.size(); ++k) own.push_back("its own slope of " + m.terms[k]);
    return "Rows are nested in " + count(m.groups_count) + " groups of " + m.groups + " (" + count(m.size_min) +
           " to " + count(m.size_max) + " rows each, median " + format_sig(m.size_median) + "); each group has " +
           join_and(own) + " (" + estimation_name(m.estimation) + " estimates" +
           (m.terms.size() < 2                      ? ")."
            : m.structure == RandomCovariance::Full ? ", full covariance)."
                                                    : ", diagonal covariance).");
}

// "Between groups the intercept varies with SD 2.378 (variance 5.654) and the
// slope of hours varies with SD 0.1267 (variance 0.01606); the intercept and
// the slope of hours correlate at −0.9324; within groups the residual SD is
// 2.311 (variance 5.342)."
std::string variances_sentence(const MultilevelResult& m) {
    const Eigen::MatrixXd& T = m.covariance;
    std::vector<std::string> parts;
    for (Eigen::Index i = 0; i < T.rows(); ++i)
        parts.push_back("the " + random_term_name(m.terms[static_cast<std::size_t>(i)]) + " varies with SD " +
                        format_sig(std::sqrt(T(i, i))) + " (variance " + format_sig(T(i, i)) + ")");
    std::string s = "Between groups " + join_and(parts);
    std::vector<std::string> corr;
    if (m.structure == RandomCovariance::Full)
        for (Eigen::Index i = 1; i < T.rows(); ++i)
            for (Eigen::Index j = 0; j < i; ++j)
                corr.push_back("the " + random_term_name(m.terms[static_cast<std::size_t>(j)]) + " and the " +
                               random_term_name(m.terms[static_cast<std::size_t>(i)]) + " correlate at " +
                               format_sig(T(i, j) / std::sqrt(T(i, i) * T(j, j))));
    if (!corr.empty()) s += "; " + join_and(corr);
    return s + "; within groups the residual SD is " + format_sig(std::sqrt(m.residual_variance)) + " (variance " +
           format_sig(m.residual_variance) + ").";
}

std::string slope_test_sentence(const RandomSlopeTest& t) {
    return "Whether the slope of " + t.term + " varies between groups: likelihood ratio " + format_sig(t.statistic) +
           ", " + p_clause(t.p_value) + ", referred to a 50:50 mixture of χ²(" + std::to_string(t.df_low) +
           ") and χ²(" + std::to_string(t.df_high) + ") since a variance cannot be negative.";
}

std::string df_sentence(const FitResult& f) {
    const MultilevelResult& m = *f.multilevel;
    if (m.df == FixedEffectDf::Normal)
        return "The coefficients are tested against the normal distribution (z), which assumes many groups.";
    return "Each coefficient is tested with its own " + df_method_text(m.df_used()) +
           " degrees of freedom; the effects of the probe use " + format_df(f.df_inference) +
           ", those of the product terms.";
}

bool said(const std::vector<std::string>& out, const std::string& words) {
    return std::any_of(out.begin(), out.end(),
                       [&](const std::string& s) { return s.find(words) != std::string::npos; });
}

}  // namespace

void multilevel_sentences(const AnalysisRun& run, std::vector<std::string>& out) {
    if (!run.fit.multilevel) return;
    const MultilevelResult& m = *run.fit.multilevel;
    out.push_back(groups_sentence(m));
    out.push_back(variances_sentence(m));
    if (std::isfinite(m.icc))
        out.push_back("The intraclass correlation is " + format_sig(m.icc) +
                      ": that share of the variance left after the predictors lies between groups.");
    for (const auto& t : m.slope_tests) out.push_back(slope_test_sentence(t));
    out.push_back(df_sentence(run.fit));
}

std::string multilevel_comparison_sentence(const AnalysisRun& run) {
    const FitResult& f = run.fit;
    if (!f.multilevel || !f.comparison) return "";
    const NestedComparison& c = *f.comparison;
    const WaldTest& w = c.wald;
    const std::string what = c.dropped_terms.size() == 1 ? "the interaction term" : "the interaction terms";
    const std::string stat = std::isfinite(w.df2)
                                 ? "F(" + format_df(w.df1) + ", " + format_df(w.df2) + ") = " + format_sig(w.statistic)
                                 : "χ²(" + format_df(w.df1) + ") = " + format_sig(w.chi_square);
    return "With the multilevel model's standard errors the test of " + what + " is a Wald test: " + stat + ", " +
           p_clause(w.p_value) + ".";
}

void multilevel_cautions(const AnalysisRun& run, std::vector<std::string>& out) {
    if (!run.fit.multilevel) return;
    const MultilevelResult& m = *run.fit.multilevel;
    if (!said(out, "typical group"))
        out.push_back("The effects are those of a typical group of " + m.groups +
                      " (the model's fixed part); single groups differ from them.");
    if (m.groups_count < 30 && !said(out, std::to_string(m.groups_count) + " groups"))
        out.push_back("Only " + std::to_string(m.groups_count) + " groups of " + m.groups +
                      ": the variances between groups and any effect that depends on a group-level moderator rest "
                      "on the number of groups, not rows, and are imprecise with fewer than about 30.");
    if (m.singular && !said(out, "singular"))
        out.push_back(
            "The random part is singular (a variance at zero or a correlation at ±1): the model is more complex "
            "than these data support.");
    out.push_back("The " + count(m.groups_count) + " groups of " + m.groups +
                  " stand for other groups only as far as they resemble them: effects for a group with predictor "
                  "values unlike those seen here, or from another population, would be an extrapolation across "
                  "groups.");
}

}  // namespace moderato::detail
