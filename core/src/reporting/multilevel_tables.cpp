#include "multilevel_tables.hpp"

#include <cmath>

#include "moderato/support/report_text.hpp"

namespace moderato::detail {

namespace {

ExportCell num(double x) { return {format_sig(x), exact_text(x)}; }
ExportCell pval(double p) { return {format_p_value(p), exact_text(p)}; }
ExportCell text(const std::string& s) { return {s, ""}; }
ExportCell count(long long n) { return {format_count(n), std::to_string(n)}; }

std::string sizes_note(const MultilevelResult& m) {
    return format_count(static_cast<long long>(m.groups_count)) + " groups of " + m.groups + ", " +
           format_count(static_cast<long long>(m.size_min)) + " to " +
           format_count(static_cast<long long>(m.size_max)) + " rows each (median " + format_sig(m.size_median) +
           "); " + estimation_name(m.estimation) + " estimates" +
           (m.terms.size() < 2                      ? "."
            : m.structure == RandomCovariance::Full ? ", full covariance of the random effects."
                                                    : ", diagonal covariance (no correlations) of the random effects.");
}

}  // namespace

std::string estimation_name(MixedEstimation e) { return e == MixedEstimation::Reml ? "REML" : "ML"; }

std::string random_term_name(const std::string& term) {
    return term == "intercept" || term == "residual" ? term : "slope of " + term;
}

ExportTable variance_components_table(const MultilevelResult& m) {
    const Eigen::MatrixXd& T = m.covariance;
    const auto q = static_cast<std::size_t>(T.rows());
    const bool correlations = m.structure == RandomCovariance::Full && q > 1;
    ExportTable t;
    t.title = "Random part: variance between and within groups of " + m.groups;
    t.columns = {"Component", "Variance", "SD"};
    if (correlations)
        for (std::size_t j = 0; j + 1 < q; ++j) t.columns.push_back("Correlation with " + random_term_name(m.terms[j]));
    t.numeric.assign(t.columns.size(), true);
    t.numeric[0] = false;
    for (std::size_t i = 0; i < q; ++i) {
        const auto I = static_cast<Eigen::Index>(i);
        std::vector<ExportCell> row{text(random_term_name(m.terms[i])), num(T(I, I)), num(std::sqrt(T(I, I)))};
        for (std::size_t j = 0; correlations && j + 1 < q; ++j) {
            const auto J = static_cast<Eigen::Index>(j);
            row.push_back(j < i ? num(T(I, J) / std::sqrt(T(I, I) * T(J, J))) : text(""));
        }
        t.rows.push_back(std::move(row));
    }
    std::vector<ExportCell> residual{text("residual (within groups)"), num(m.residual_variance),
                                     num(std::sqrt(m.residual_variance))};
    residual.resize(t.columns.size(), text(""));
    t.rows.push_back(std::move(residual));
    t.notes.push_back(sizes_note(m));
    if (std::isfinite(m.icc))
        t.notes.push_back("Intraclass correlation " + format_sig(m.icc) +
                          ": the share of the variance left after the predictors that lies between groups.");
    if (m.singular)
        t.notes.push_back(
            "Singular fit: a variance at zero or a correlation at ±1; the random part is more than these data "
            "support.");
    if (!m.converged) t.notes.push_back("The variance estimates did not settle: the results are not reliable.");
    return t;
}

std::optional<ExportTable> slope_tests_table(const MultilevelResult& m) {
    if (m.slope_tests.empty()) return std::nullopt;
    ExportTable t;
    t.title = "Random slopes: does the slope vary between groups of " + m.groups + "?";
    t.columns = {"Random slope", "Likelihood ratio", "Reference distribution", "p"};
    t.numeric = {false, true, false, true};
    for (const auto& s : m.slope_tests)
        t.rows.push_back(
            {text(s.term), num(s.statistic),
             text("50:50 mixture of χ²(" + std::to_string(s.df_low) + ") and χ²(" + std::to_string(s.df_high) + ")"),
             pval(s.p_value)});
    t.notes.push_back(
        "Each test compares the model with the random slope (its variance and covariances) against the model "
        "without it; a variance cannot be negative, so the statistic is referred to a 50:50 mixture of two χ² "
        "distributions.");
    return t;
}

ExportTable multilevel_fit_table(const FitResult& f) {
    const MultilevelResult& m = *f.multilevel;
    ExportTable t;
    t.title = "Fit statistics";
    t.columns = {"Statistic", "Value"};
    t.numeric = {false, true};
    t.rows.push_back({text("Observations used"), count(static_cast<long long>(f.n))});
    t.rows.push_back({text("Rows left out (missing values)"), count(static_cast<long long>(f.n_excluded))});
    t.rows.push_back({text("Groups of " + m.groups), count(static_cast<long long>(m.groups_count))});
    t.rows.push_back({text("Residual SD (within groups)"), num(f.residual_sd)});
    if (f.f_df1 > 0) {
        t.rows.push_back({text("Wald F (" + format_df(f.f_df1) + ", " + format_df(f.f_df2) + ")"), num(f.f_statistic)});
        t.rows.push_back({text("p of F"), pval(f.f_p_value)});
    }
    t.rows.push_back(
        {text(m.estimation == MixedEstimation::Reml ? "REML criterion" : "Log-likelihood"), num(f.log_likelihood)});
    t.rows.push_back({text("AIC"), num(f.aic)});
    t.rows.push_back({text("BIC"), num(f.bic)});
    return t;
}

std::string df_note(const FitResult& f) {
    const MultilevelResult& m = *f.multilevel;
    if (m.df == FixedEffectDf::Normal) return "Tests against the normal distribution (z), which assumes many groups.";
    return "Each term is tested with its own " + df_method_text(m.df_used()) + " degrees of freedom (column df).";
}

}  // namespace moderato::detail
