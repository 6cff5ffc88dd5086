#include "moderato/reporting/analysis_tables.hpp"

#include <cctype>
#include <cmath>

#include "family_text.hpp"
#include "moderato/support/report_text.hpp"
#include "multilevel_tables.hpp"

namespace moderato {

std::string se_description(const FitResult& fit, const std::string& clusters) {
    if (fit.multilevel)
        return std::string("model-based (") + (fit.multilevel->estimation == MixedEstimation::Reml ? "REML" : "ML") +
               ", " + df_method_text(fit.multilevel->df_used()) + " df)";
    switch (fit.se) {
        case SeKind::Classical:
            return generalized(fit.family) || fit.multilevel ? "model-based" : "classical";
        case SeKind::Cluster:
            return "cluster-robust (" + (clusters.empty() ? std::string() : clusters + ", ") +
                   std::to_string(fit.n_clusters) + " clusters)";
        default: {
            std::string s = to_string(fit.se);
            for (auto& c : s) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
            return s;
        }
    }
}

namespace {

ExportCell num(double x) { return {format_sig(x), exact_text(x)}; }
ExportCell pval(double p) { return {format_p_value(p), exact_text(p)}; }
ExportCell text(const std::string& s) { return {s, ""}; }
ExportCell count(long long n) { return {format_count(n), std::to_string(n)}; }

// The house order of an estimate with its inference, in every table that
// shows one (conditional effects, cell contrasts; the Probe section's pinned
// values and readout): the value, its interval, SE, test value, p.
std::vector<std::string> inference_columns(const std::string& value, double level, const std::string& statistic) {
    const std::string lv = level_text(level);
    return {value, lv + " CI low", lv + " CI high", "SE", statistic, "p"};
}
std::vector<ExportCell> inference_cells(double estimate, double lo, double hi, double se, double statistic, double p) {
    return {num(estimate), num(lo), num(hi), num(se), num(statistic), pval(p)};
}

ExportTable estimates_table(const Analysis& a, const AnalysisRun& run) {
    const bool centred = a.centring == Centring::Mean && run.centred_fit;
    const FitResult& fit = centred ? *run.centred_fit : run.fit;
    ExportTable t;
    t.title = "Estimates";
    const std::string lv = level_text(fit.level);
    t.columns = {"Term", "Estimate", "SE", statistic_name(fit), "p", lv + " CI low", lv + " CI high"};
    t.numeric = {false, true, true, true, true, true, true};
    const bool own_df = fit.multilevel.has_value();  // each term its own df, in the last column
    if (own_df) {
        t.columns.push_back("df");
        t.numeric.push_back(true);
    }
    for (const auto& c : fit.coefficients) {
        if (c.aliased) {
            t.rows.push_back({text(c.term), text("aliased"), text(""), text(""), text(""), text(""), text("")});
            if (own_df) t.rows.back().push_back(text(""));
            continue;
        }
        t.rows.push_back({text(c.term), num(c.estimate), num(c.std_error), num(c.statistic), pval(c.p_value),
                          num(c.ci_lower), num(c.ci_upper)});
        if (own_df) t.rows.back().push_back({format_df(c.df), exact_text(c.df)});
    }
    t.notes.push_back("Standard errors: " + se_description(fit, a.roles.clusters) +
                      "; n = " + format_count(static_cast<long long>(fit.n)) +
                      (fit.n_excluded ? " (" + format_count(static_cast<long long>(fit.n_excluded)) +
                                            " rows with missing values left out)"
                                      : "") +
                      ".");
    if (generalized(fit.family))
        t.notes.push_back("Estimates are on the " + model_scale_text(fit.family, !fit.exposure.empty()) + " scale" +
                          (count_outcome(fit.family) ? "; exp(estimate) is the factor by which one unit more of a "
                                                       "term multiplies the " +
                                                           outcome_scale_text(fit.family, fit.exposure) + "."
                                                     : "."));
    if (own_df)
        t.notes.push_back("Multilevel model: the fixed effects, those of a typical group of " + fit.multilevel->groups +
                          ". " + detail::df_note(fit));
    if (centred) {
        std::string cols;
        for (const auto& [col, centre] : run.centres)
            cols += (cols.empty() ? "" : ", ") + col + " at " + format_sig(centre);
        t.notes.push_back("Centred columns (" + cols +
                          "): lower-order terms are effects at the centre; the fit and the probe are unchanged.");
    }
    return t;
}

// A count model's dispersion: the negative binomial's alpha with its
// interval, or a Poisson model's overdispersion statistics.
void dispersion_rows(const FitResult& f, ExportTable& t) {
    if (f.dispersion) {
        const Dispersion& d = *f.dispersion;
        const std::string lv = level_text(f.level);
        t.rows.push_back({text("Dispersion α (variance = mean + α·mean²)"), num(d.alpha)});
        t.rows.push_back({text("SE of α"), num(d.std_error)});
        t.rows.push_back({text("α " + lv + " CI low"), num(d.ci_lower)});
        t.rows.push_back({text("α " + lv + " CI high"), num(d.ci_upper)});
    }
    if (f.overdispersion) {
        const Overdispersion& o = *f.overdispersion;
        t.rows.push_back({text("Pearson χ² / df"), num(o.pearson_ratio)});
        t.rows.push_back({text("Overdispersion z (Cameron & Trivedi)"), num(o.test_value)});
        t.rows.push_back({text("p of overdispersion z (one-sided)"), pval(o.p_value)});
        if (o.evident())
            t.notes.push_back(
                "The counts vary more than a Poisson model allows; the negative binomial family allows for it.");
    }
}

void generalized_fit_rows(const FitResult& f, ExportTable& t) {
    t.rows.push_back({text("Deviance"), num(f.deviance)});
    if (!std::isnan(f.null_deviance)) t.rows.push_back({text("Null deviance"), num(f.null_deviance)});
    t.rows.push_back({text("McFadden R²"), num(f.mcfadden_r2)});
    t.rows.push_back({text("LR χ² (" + format_sig(f.lr_df) + ")"), num(f.lr_statistic)});
    t.rows.push_back({text("p of LR χ²"), pval(f.lr_p_value)});
    dispersion_rows(f, t);
}

ExportTable fit_table(const AnalysisRun& run) {
    const FitResult& f = run.fit;
    if (f.multilevel) return detail::multilevel_fit_table(f);
    ExportTable t;
    t.title = "Fit statistics";
    t.columns = {"Statistic", "Value"};
    t.numeric = {false, true};
    t.rows.push_back({text("Observations used"), count(static_cast<long long>(f.n))});
    t.rows.push_back({text("Rows left out (missing values)"), count(static_cast<long long>(f.n_excluded))});
    if (f.family == Family::Linear) {
        t.rows.push_back({text("R²"), num(f.r_squared)});
        t.rows.push_back({text("Adjusted R²"), num(f.adj_r_squared)});
        t.rows.push_back({text("Residual SD"), num(f.residual_sd)});
        t.rows.push_back({text("F (" + format_sig(f.f_df1) + ", " + format_sig(f.f_df2) + ")"), num(f.f_statistic)});
        t.rows.push_back({text("p of F"), pval(f.f_p_value)});
    } else {
        generalized_fit_rows(f, t);
    }
    t.rows.push_back({text("Log-likelihood"), num(f.log_likelihood)});
    t.rows.push_back({text("AIC"), num(f.aic)});
    t.rows.push_back({text("BIC"), num(f.bic)});
    return t;
}

std::string df_text(double df1, double df2) {
    if (!std::isfinite(df2)) return format_sig(df1);
    return format_sig(df1) + ", " + format_sig(df2);
}

ExportTable comparison_table(const Analysis& a, const AnalysisRun& run) {
    const FitResult& f = run.fit;
    const NestedComparison& c = *f.comparison;
    ExportTable t;
    std::string dropped;
    for (const auto& d : c.dropped_terms) dropped += (dropped.empty() ? "" : ", ") + d;
    t.title = "With and without the interaction (" + dropped + ")";
    t.columns = {"Test", "Statistic", "df", "p"};
    t.numeric = {false, true, true, true};             // df "1, 196": numbers too, kept on one line
    const bool multilevel = f.multilevel.has_value();  // the Wald test alone: no R² change, no LR test
    if (!multilevel && f.family == Family::Linear) {
        t.rows.push_back({text("R² without the interaction"), num(c.r_squared_reduced), text(""), text("")});
        t.rows.push_back({text("R² with the interaction"), num(f.r_squared), text(""), text("")});
        t.rows.push_back(
            {text("R² change F test (classical)"), num(c.f_statistic), text(df_text(c.df1, c.df2)), pval(c.p_value)});
    } else if (!multilevel) {
        t.rows.push_back(
            {text("Likelihood-ratio χ²"), num(c.lr_statistic), text(format_sig(c.df1)), pval(c.lr_p_value)});
    }
    const WaldTest& w = c.wald;
    const bool chi = !std::isfinite(w.df2);
    t.rows.push_back(
        {text(std::string("Wald ") + (chi ? "χ²" : "F") + " (" + se_description(f, a.roles.clusters) + ")"),
         num(chi ? w.chi_square : w.statistic), text(df_text(w.df1, w.df2)), pval(w.p_value)});
    const bool linear = f.family == Family::Linear;
    const std::string model_test = linear ? "the R² change F test" : "the likelihood-ratio test";
    if (multilevel)
        t.notes.push_back(
            "With the multilevel model's standard errors the test to report is the Wald test" +
            std::string(f.multilevel->df == FixedEffectDf::Normal
                            ? " against χ² (which assumes many groups)."
                            : ", on " + df_method_text(f.multilevel->df_used()) + " degrees of freedom."));
    else
        t.notes.push_back(a.se == SeKind::Classical
                              ? "With " + se_description(f, a.roles.clusters) +
                                    " standard errors the test to report is " + model_test + "."
                              : "With " + se_description(f, a.roles.clusters) +
                                    " standard errors the test to report is the Wald test; " + model_test +
                                    (linear ? " assumes the same error variance in every row."
                                            : " assumes the model's variance is right."));
    return t;
}

ExportTable effects_table(const ProbeResult& p, const FitResult& fit) {
    ExportTable t;
    const bool prob = p.scale == ProbeScale::Outcome;
    const bool ratios = !p.rate_ratios.empty() && p.rate_ratios.size() == p.effects.size();
    t.title = "Effect of " + p.focal + " on " + detail::effect_target(p, fit) +
              (p.categorical_moderator ? " in each group of " : " at chosen values of ") + p.moderator;
    t.columns = {p.moderator};
    for (auto& c : inference_columns("Effect", p.level, prob ? "z" : statistic_name(fit))) t.columns.push_back(c);
    t.numeric = {!p.categorical_moderator, true, true, true, true, true, true};
    if (ratios) {
        const std::string lv = level_text(p.level);
        t.columns.insert(t.columns.end(), {"Rate ratio", "RR " + lv + " CI low", "RR " + lv + " CI high"});
        t.numeric.insert(t.numeric.end(), {true, true, true});
    }
    t.columns.push_back("Note");
    t.numeric.push_back(false);
    bool beyond = false;
    for (const auto& e : p.effects) {
        ExportCell at = p.categorical_moderator || !e.level.empty()
                            ? text(e.level.empty() ? format_sig(e.moderator_value) : e.level)
                            : ExportCell{moderator_value_label(p, e), exact_text(e.moderator_value)};
        if (e.beyond_data) {
            at.text += " †";
            beyond = true;
        }
        std::vector<ExportCell> row{at};
        for (auto& c : inference_cells(e.estimate, e.ci_lower, e.ci_upper, e.std_error, e.statistic, e.p_value))
            row.push_back(std::move(c));
        if (ratios) {
            const RateRatio& r = p.rate_ratios[t.rows.size()];
            row.insert(row.end(), {num(r.ratio), num(r.ci_lower), num(r.ci_upper)});
        }
        row.push_back(text(e.beyond_data ? "beyond the data" : ""));
        t.rows.push_back(std::move(row));
    }
    if (beyond)
        t.notes.push_back("† beyond the data: an extrapolation outside the observed " + p.moderator + " values.");
    if (!p.categorical_moderator)
        t.notes.push_back("Observed " + p.moderator + ": " +
                          format_range(p.observed_range.first, p.observed_range.second) +
                          ". Pointwise intervals; each row is one test.");
    if (prob) {
        std::string scale = outcome_scale_text(fit.family, fit.exposure);
        scale[0] = static_cast<char>(std::toupper(static_cast<unsigned char>(scale[0])));
        t.notes.push_back(scale + (p.averaging == Averaging::AtValues ? " scale, at the means and reference levels."
                                                                      : " scale, averaged over the observed rows."));
    }
    if (ratios)
        t.notes.push_back(std::string("Rate ratio: the factor by which ") +
                          (p.binary_focal ? "moving " + p.focal + " from 0 to 1" : "one unit more of " + p.focal) +
                          " multiplies the " + (fit.exposure.empty() ? "expected count" : "rate") +
                          " (exp of the effect on the log scale, with its interval); 1 is no effect.");
    return t;
}

ExportTable cell_table_export(const CellTable& c) {
    ExportTable t;
    const bool logistic = c.family == Family::Logistic;
    t.title = "Cells of " + c.row_factor + " × " + c.column_factor + " (" + to_string(c.scale) + " scale)";
    const std::string lv = level_text(c.level);
    // The predicted value, its interval, SE: the house order (no test: a cell mean is not tested).
    t.columns = {c.row_factor,   c.column_factor, "n", "Observed mean", "Predicted",
                 lv + " CI low", lv + " CI high", "SE"};
    t.numeric = {false, false, true, true, true, true, true, true};
    if (logistic) {
        t.columns.insert(t.columns.end(), {"Probability", "P CI low", "P CI high"});
        t.numeric.insert(t.numeric.end(), {true, true, true});
    }
    for (const auto& cell : c.cells) {
        std::vector<ExportCell> row{
            text(cell.row_level),    text(cell.column_level), count(static_cast<long long>(cell.n)),
            num(cell.observed_mean), num(cell.estimate),      num(cell.ci_lower),
            num(cell.ci_upper),      num(cell.std_error)};
        if (logistic)
            row.insert(row.end(), {num(cell.probability), num(cell.probability_lower), num(cell.probability_upper)});
        t.rows.push_back(std::move(row));
    }
    for (const auto& n : c.notes) t.notes.push_back(n);
    return t;
}

ExportTable contrasts_table(const CellTable& c, const FitResult& fit) {
    ExportTable t;
    t.title = "Simple effects and the interaction contrast";
    t.columns = {"Comparison"};
    for (auto& col : inference_columns("Estimate", c.level, statistic_name(fit))) t.columns.push_back(col);
    t.numeric = {false, true, true, true, true, true, true};
    auto add = [&](const std::string& label, bool ok, double e, double se, double st, double p, double lo, double hi) {
        if (!ok) {
            t.rows.push_back({text(label), text("not estimable"), text(""), text(""), text(""), text(""), text("")});
            return;
        }
        std::vector<ExportCell> row{text(label)};
        for (auto& cell : inference_cells(e, lo, hi, se, st, p)) row.push_back(std::move(cell));
        t.rows.push_back(std::move(row));
    };
    for (const auto& s : c.row_effects)
        add(s.label, s.estimable, s.estimate, s.std_error, s.statistic, s.p_value, s.ci_lower, s.ci_upper);
    for (const auto& s : c.column_effects)
        add(s.label, s.estimable, s.estimate, s.std_error, s.statistic, s.p_value, s.ci_lower, s.ci_upper);
    for (const auto& i : c.interactions)
        add(i.label, i.estimable, i.estimate, i.std_error, i.statistic, i.p_value, i.ci_lower, i.ci_upper);
    if (c.family == Family::Logistic) t.notes.push_back("On the log-odds scale.");
    return t;
}

}  // namespace

std::string statistic_name(const FitResult& fit) { return generalized(fit.family) ? "z" : "t"; }

std::string moderator_value_label(const ProbeResult& p, const EffectPoint& e) {
    if (!e.level.empty()) return e.level;
    if (p.categorical_moderator) return format_sig(e.moderator_value);
    const std::string value = format_sig(e.moderator_value);
    if (p.points == ProbePoints::Percentiles) {
        const char* names[] = {" (10th percentile)", " (median)", " (90th percentile)"};
        for (std::size_t k = 0; k < 3; ++k)
            if (e.moderator_value == p.moderator_percentiles[k]) return value + names[k];
        return value;
    }
    const double sd = p.moderator_sd;
    const double tol = 1e-9 * (std::fabs(p.moderator_mean) + sd + 1);
    if (std::fabs(e.moderator_value - p.moderator_mean) <= tol) return value + " (mean)";
    if (sd > 0 && std::fabs(e.moderator_value - (p.moderator_mean - sd)) <= tol)
        return value + " (mean \xE2\x88\x92 1 SD)";
    if (sd > 0 && std::fabs(e.moderator_value - (p.moderator_mean + sd)) <= tol) return value + " (mean + 1 SD)";
    return value;
}

std::vector<NamedTable> analysis_tables(const Analysis& a, const AnalysisRun& run) {
    std::vector<NamedTable> out;
    out.push_back({"estimates", estimates_table(a, run)});
    out.push_back({"fit-statistics", fit_table(run)});
    if (run.fit.multilevel) {
        out.push_back({"variance-components", detail::variance_components_table(*run.fit.multilevel)});
        if (auto slopes = detail::slope_tests_table(*run.fit.multilevel))
            out.push_back({"random-slope-tests", std::move(*slopes)});
    }
    if (run.fit.comparison) out.push_back({"model-comparison", comparison_table(a, run)});
    if (run.probe) out.push_back({"conditional-effects", effects_table(*run.probe, run.fit)});
    if (run.cells) {
        out.push_back({"cell-table", cell_table_export(*run.cells)});
        out.push_back({"cell-contrasts", contrasts_table(*run.cells, run.fit)});
    }
    return out;
}

}  // namespace moderato
