// The memo's content: sentences generated from the numbers, the equation,
// the cautions and the options footer. Rendering to HTML and Markdown is in
// memo_render.cpp.
#include "moderato/reporting/memo.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <nlohmann/json.hpp>

#include "family_text.hpp"
#include "memo_multilevel.hpp"
#include "memo_straight_line.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/reporting/table_export.hpp"
#include "moderato/support/report_text.hpp"

#include "support/text_util.hpp"

namespace moderato {

using detail::join_and;
namespace {

const char* const kMinus = "\xE2\x88\x92";

std::string ci_text(double level, double lo, double hi) { return level_text(level) + " CI " + format_range(lo, hi); }

// The design columns of the focal × moderator product (one per moderator
// dummy for a categorical moderator).
std::vector<int> product_columns(const Design& d, const std::string& focal, const std::string& moderator) {
    std::vector<int> out;
    for (std::size_t j = 0; j < d.columns.size(); ++j) {
        const auto& atoms = d.columns[j].atoms;
        if (atoms.size() != 2) continue;
        const bool fm = atoms[0].column == focal && atoms[1].column == moderator;
        const bool mf = atoms[1].column == focal && atoms[0].column == moderator;
        if ((fm || mf) && atoms[fm ? 0 : 1].power == 1 && atoms[fm ? 0 : 1].level.empty())
            out.push_back(static_cast<int>(j));
    }
    return out;
}

// The focal effect at moderator value m on the probe's scale (its sign says
// whether a region is one of positive or negative effects).
double effect_at(const Analysis& a, const AnalysisRun& run, double m) {
    const ProbeResult& p = *run.probe;
    if (p.scale != ProbeScale::Outcome) return p.effect_function.effect(m);
    ScaleRequest req;
    req.focal = p.focal;
    req.moderator = p.moderator;
    req.averaging = p.averaging;
    if (!a.roles.second_moderator.empty())
        req.values[a.roles.second_moderator] = std::isnan(a.probe.second_value)
                                                   ? typical_values(run.design).at(a.roles.second_moderator)
                                                   : a.probe.second_value;
    return probability_effect(run.design, run.fit, req, m).estimate;
}

struct Clipped {
    double lo, hi;
    bool from_start, to_end;  // touches the observed minimum / maximum
};

std::vector<Clipped> clip(const std::vector<Region>& regions, double lo, double hi) {
    std::vector<Clipped> out;
    const double eps = 1e-12 * std::max(1.0, std::fabs(hi - lo));
    for (const auto& r : regions) {
        const double a = std::max(r.lo, lo), b = std::min(r.hi, hi);
        if (b - a <= eps) continue;
        out.push_back({a, b, a <= lo + eps, b >= hi - eps});
    }
    return out;
}

// "above 3.2", "below 1.1", "between 2 and 4", "throughout".
std::string region_words(const Clipped& c, const std::string& name) {
    if (c.from_start && c.to_end) return "throughout the observed range";
    if (c.from_start) return "for " + name + " below " + format_sig(c.hi);
    if (c.to_end) return "for " + name + " above " + format_sig(c.lo);
    return "for " + name + " between " + format_range(c.lo, c.hi);
}

std::string effect_of(const ProbeResult& p, const FitResult& fit) {
    return "the effect of " + p.focal + " on " + detail::effect_target(p, fit);
}

// ", with w held at 3.2" for a three-way model (its effects are conditional on that value).
std::string held_clause(const Analysis& a, const AnalysisRun& run) {
    const std::string& w = a.roles.second_moderator;
    if (w.empty()) return "";
    const auto typical = typical_values(run.design);
    const auto it = typical.find(w);
    const bool chosen = !std::isnan(a.probe.second_value);
    const double v = chosen ? a.probe.second_value : it == typical.end() ? std::nan("") : it->second;
    if (std::isnan(v)) return "";
    for (const auto& c : run.design.categoricals)
        if (c.column == w) {
            const auto k = static_cast<std::size_t>(std::llround(v));
            return k < c.levels.size() ? ", with " + w + " = " + c.levels[k] : "";
        }
    return ", with " + w + " held at " + (chosen ? format_sig(v) : "its mean (" + format_sig(v) + ")");
}

// "is positive and differs from zero for z above 3.2, and negative for z below −1"
std::string significance_clause(const Analysis& a, const AnalysisRun& run, const std::vector<Region>& regions) {
    const ProbeResult& p = *run.probe;
    const auto [lo, hi] = p.observed_range;
    const auto parts = clip(regions, lo, hi);
    if (parts.empty()) return "does not differ from zero anywhere in the observed range";
    std::vector<std::string> positive, negative;
    for (const auto& c : parts) {
        const double mid = 0.5 * (c.lo + c.hi);
        (effect_at(a, run, mid) > 0 ? positive : negative).push_back(region_words(c, p.moderator));
    }
    std::string s;
    if (!positive.empty()) s = "is positive and differs from zero " + join_and(positive);
    if (!negative.empty())
        s += (s.empty() ? "is negative and differs from zero " : ", and negative ") + join_and(negative);
    return s;
}

}  // namespace

std::vector<std::string> region_sentences(const Analysis& a, const AnalysisRun& run) {
    if (!run.probe || !run.probe->johnson_neyman) return {};
    const ProbeResult& p = *run.probe;
    const auto [lo, hi] = p.observed_range;
    std::vector<std::string> out;
    out.push_back("Among the observed values of " + p.moderator + " (" + format_range(lo, hi) + ")" +
                  held_clause(a, run) + ", " + effect_of(p, run.fit) + " " +
                  significance_clause(a, run, p.johnson_neyman->significant) + " (" + level_text(p.level) +
                  " pointwise intervals).");
    std::vector<std::string> outside;
    for (std::size_t i = 0; i < p.johnson_neyman->boundaries.size(); ++i)
        if (i < p.jn_beyond_data.size() && p.jn_beyond_data[i])
            outside.push_back(format_sig(p.johnson_neyman->boundaries[i]));
    if (!outside.empty())
        out.push_back(
            std::string(outside.size() == 1 ? "The Johnson–Neyman boundary at " : "The Johnson–Neyman boundaries at ") +
            join_and(outside) + (outside.size() == 1 ? " lies" : " lie") + " beyond the data (" + p.moderator +
            " observed from " + format_range(lo, hi) + "): an extrapolation, not a finding.");
    return out;
}

std::string simultaneous_region_sentence(const Analysis& a, const AnalysisRun& run) {
    if (!run.probe || !run.probe->simultaneous) return "";
    const ProbeResult& p = *run.probe;
    return "With the simultaneous band, which keeps the chance of any false region at " + level_text(1 - p.level) +
           " (critical value " + format_sig(p.simultaneous->critical_value) + "), " + effect_of(p, run.fit) + " " +
           significance_clause(a, run, p.simultaneous->significant) + ".";
}

namespace {

void continuous_sentences(const Analysis& a, const AnalysisRun& run, std::vector<std::string>& out) {
    const ProbeResult& p = *run.probe;
    const bool prob = p.scale == ProbeScale::Outcome;
    // The product coefficient, on the model's own scale.
    if (a.roles.second_moderator.empty()) {
        const auto cols = product_columns(run.design, p.focal, p.moderator);
        if (cols.size() == 1) {
            const Coefficient& c = run.fit.coefficients[static_cast<std::size_t>(cols[0])];
            if (!c.aliased)
                out.push_back("Each one-unit increase in " + p.moderator + " changes the effect of " + p.focal +
                              " on " + detail::model_scale_target(run.fit, p.outcome) + " by " +
                              format_sig(c.estimate) + " (" + ci_text(run.fit.level, c.ci_lower, c.ci_upper) + ", " +
                              p_clause(c.p_value) + ").");
        }
    }
    for (auto& s : region_sentences(a, run)) out.push_back(std::move(s));
    if (std::string s = simultaneous_region_sentence(a, run); !s.empty()) out.push_back(std::move(s));
    if (prob && p.interaction_effect) {
        const InteractionEffect& ie = *p.interaction_effect;
        out.push_back("On the " + outcome_scale_text(run.fit.family, run.fit.exposure) +
                      " scale the interaction effect (" + to_string(ie.kind) + ", " +
                      (p.averaging == Averaging::AtValues ? "at the means" : "averaged over the observed rows") +
                      ") is " + format_sig(ie.estimate) + " (" + ci_text(p.level, ie.ci_lower, ie.ci_upper) + ", " +
                      p_clause(ie.p_value) + ").");
    }
    if (!p.effects.empty()) {
        std::vector<std::string> at;
        for (std::size_t i = 0; i < p.effects.size() && i < 5; ++i) {
            const EffectPoint& e = p.effects[i];
            at.push_back(format_sig(e.estimate) + " (" + ci_text(p.level, e.ci_lower, e.ci_upper) + ") at " +
                         p.moderator + " = " + moderator_value_label(p, e) +
                         (e.beyond_data ? ", beyond the data" : ""));
        }
        std::string s = effect_of(p, run.fit) + " at chosen values: " + join_and(at) + ".";
        s[0] = 'T';
        out.push_back(s);
    }
    detail::rate_ratio_sentence(p, run.fit, out);
}

// Every pairwise difference of the groups' effects, with the adjusted p;
// the joint test is said once, in comparison_sentence.
void pairwise_sentence(const ProbeResult& p, const FitResult& fit, std::vector<std::string>& out) {
    if (p.slope_contrasts.size() < 2) return;
    std::vector<std::string> parts;
    for (const auto& c : p.slope_contrasts)
        parts.push_back(c.second + " − " + c.first + " " + format_sig(c.estimate) + " (" +
                        ci_text(p.level, c.ci_lower, c.ci_upper) + ", adjusted " + p_clause(c.p_adjusted) + ")");
    out.push_back("Pairwise, the effect of " + p.focal +
                  (p.scale == ProbeScale::Outcome ? " on " + detail::effect_target(p, fit) : "") +
                  " differs between groups (the second group's minus the first's; p-values " +
                  adjustment_text(p.adjustment) + " over " + std::to_string(p.slope_contrasts.size()) +
                  " pairs): " + join_and(parts) + ".");
}

void group_sentences(const AnalysisRun& run, std::vector<std::string>& out) {
    const ProbeResult& p = *run.probe;
    std::vector<std::string> parts;
    for (const auto& e : p.effects)
        parts.push_back(format_sig(e.estimate) + " (" + ci_text(p.level, e.ci_lower, e.ci_upper) + ") for " +
                        p.moderator + " = " + moderator_value_label(p, e));
    if (!parts.empty()) {
        out.push_back("The effect of " + p.focal + " on " + detail::effect_target(p, run.fit) + " is " +
                      join_and(parts) + ".");
    }
    detail::rate_ratio_sentence(p, run.fit, out);
    const auto cols = product_columns(run.design, p.focal, p.moderator);
    if (cols.size() == 1) {
        const Coefficient& c = run.fit.coefficients[static_cast<std::size_t>(cols[0])];
        if (!c.aliased)
            out.push_back(std::string("The slopes differ by ") + format_sig(c.estimate) +
                          detail::model_scale_clause(run.fit) + " (" + ci_text(run.fit.level, c.ci_lower, c.ci_upper) +
                          ", " + p_clause(c.p_value) + ").");
    } else if (cols.size() > 1) {
        pairwise_sentence(p, run.fit, out);
    }
}

void crossover_sentences(const AnalysisRun& run, std::vector<std::string>& out) {
    const ProbeResult& p = *run.probe;
    const auto [flo, fhi] = p.focal_range;
    int shown = 0;
    for (const Crossover& c : p.crossovers) {
        if (++shown > 3) break;
        // c.groups: "g=0 vs g=1", or "lines at any two values of z" for a numeric moderator.
        const std::string lines = c.groups.rfind("lines", 0) == 0 ? "The " + c.groups : "The lines for " + c.groups;
        if (c.ci_kind == FiellerInterval::None || !std::isfinite(c.focal_value)) {
            out.push_back(lines + " are parallel: they do not cross.");
            continue;
        }
        std::string s = lines + " cross at " + p.focal + " = " + format_sig(c.focal_value);
        const std::string lv = level_text(p.level);
        if (c.ci_kind == FiellerInterval::Bounded)
            s += " (" + lv + " Fieller interval " + format_range(c.ci_lower, c.ci_upper) + ")";
        else if (c.ci_kind == FiellerInterval::Unbounded)
            s += " (the " + lv + " Fieller interval is unbounded: " + p.focal + " below " + format_sig(c.ci_lower) +
                 " or above " + format_sig(c.ci_upper) + ")";
        else s += " (the " + lv + " Fieller interval is the whole line: the crossing point is not pinned down)";
        s += c.within_observed_range ? ", inside the observed " + p.focal + " values (" + format_range(flo, fhi) +
                                           "): the interaction is disordinal there."
                                     : ", outside the observed " + p.focal + " values (" + format_range(flo, fhi) +
                                           "): within the data the interaction is ordinal.";
        out.push_back(s);
        const auto gaps = clip(c.gap_regions.significant, flo, fhi);
        std::vector<std::string> where;
        for (const auto& g : gaps) where.push_back(region_words(g, p.focal));
        out.push_back(where.empty() ? "Their predicted " + p.outcome + " does not differ anywhere in the observed " +
                                          p.focal + " range."
                                    : "Their predicted " + p.outcome + " differs " + join_and(where) + ".");
    }
}

void cell_sentences(const AnalysisRun& run, std::vector<std::string>& out) {
    const CellTable& c = *run.cells;
    const std::string scale = c.family == Family::Logistic ? " on the log-odds scale" : "";
    int shown = 0;
    for (const auto& i : c.interactions) {
        if (++shown > 4) break;
        if (!i.estimable) continue;
        // The row effect of level i at the reference column level and at level j.
        const SimpleEffect* at_ref = nullptr;
        const SimpleEffect* at_j = nullptr;
        for (const auto& s : c.row_effects) {
            if (s.level != i.row_level) continue;
            if (s.at_level == c.column_levels.front()) at_ref = &s;
            if (s.at_level == i.column_level) at_j = &s;
        }
        std::string s;
        if (at_ref && at_j && at_ref->estimable && at_j->estimable)
            s = "Moving " + c.row_factor + " from " + c.row_levels.front() + " to " + i.row_level + " changes " +
                run.design.outcome + " by " + format_sig(at_ref->estimate) + " when " + c.column_factor + " = " +
                c.column_levels.front() + " and by " + format_sig(at_j->estimate) + " when " + c.column_factor + " = " +
                i.column_level + scale + "; ";
        s += std::string(s.empty() ? "T" : "t") + "he difference in differences is " + format_sig(i.estimate) + " (" +
             ci_text(c.level, i.ci_lower, i.ci_upper) + ", " + p_clause(i.p_value) + ").";
        out.push_back(s);
    }
}

// The test of the interaction to report follows the chosen standard errors:
// the classical R²-change F (linear) or likelihood-ratio test (logistic)
// with model-based SEs, else the Wald test with the chosen covariance, the
// other one then named as secondary with its reason. Said once.
void comparison_sentence(const Analysis& a, const AnalysisRun& run, std::vector<std::string>& out) {
    if (!run.fit.comparison) return;
    if (run.fit.multilevel) {  // the Wald test with the model's own standard errors; no R²
        out.push_back(detail::multilevel_comparison_sentence(run));
        return;
    }
    const NestedComparison& c = *run.fit.comparison;
    const std::string what = c.dropped_terms.size() == 1 ? "the interaction term" : "the interaction terms";
    const bool linear = run.fit.family == Family::Linear, robust = a.se != SeKind::Classical;
    const std::string model_test =
        linear ? "Adding " + what + " raises R² from " + format_sig(c.r_squared_reduced) + " to " +
                     format_sig(run.fit.r_squared) + " (change " + format_sig(c.r_squared_change) + "; F(" +
                     format_sig(c.df1) + ", " + format_sig(c.df2) + ") = " + format_sig(c.f_statistic) + ", " +
                     p_clause(c.p_value) + ")"
               : "Adding " + what + " improves the fit: likelihood-ratio χ²(" + format_sig(c.df1) +
                     ") = " + format_sig(c.lr_statistic) + ", " + p_clause(c.lr_p_value);
    if (!robust) {
        out.push_back(model_test + "; with " + (linear ? "classical" : "model-based") +
                      " standard errors this is the test of " + what + " to report.");
        return;
    }
    const WaldTest& w = c.wald;
    const std::string stat =
        std::isfinite(w.df2) ? "F(" + format_sig(w.df1) + ", " + format_sig(w.df2) + ") = " + format_sig(w.statistic)
                             : "χ²(" + format_sig(w.df1) + ") = " + format_sig(w.chi_square);
    out.push_back("With " + se_description(run.fit, a.roles.clusters) + " standard errors the test of " + what +
                  " to report is the Wald test: " + stat + ", " + p_clause(w.p_value) + ". " + model_test + ", " +
                  (linear ? "a classical test that assumes the same error variance in every row"
                          : "a test that assumes the model's variance is right") +
                  ", so it is secondary here.");
}

// "x×z" as \text{x} \times \text{z} (products outside \text, so any math renderer reads them).
std::string latex_term(const std::string& term) {
    static const std::string times = "\xC3\x97";
    std::string out;
    std::size_t from = 0;
    while (true) {
        const auto at = term.find(times, from);
        out +=
            "\\text{" + latex_escape(term.substr(from, at == std::string::npos ? std::string::npos : at - from)) + "}";
        if (at == std::string::npos) break;
        out += " \\times ";
        from = at + times.size();
    }
    return out;
}

// The left-hand side of the equation in three notations, and that of the
// fitted equation: E[y] (linear), logit P(y = 1), probit P(y = 1), log E[y].
struct EquationSide {
    std::string text, html, latex, fitted;
};

EquationSide equation_side(const FitResult& f, const std::string& y) {
    const std::string yh = "<i>" + html_escape(y) + "</i>", yl = "\\text{" + latex_escape(y) + "}";
    switch (link_of(f.family)) {
        case Link::Logit:
        case Link::Probit: {
            const std::string link = f.family == Family::Probit ? "probit" : "logit";
            const std::string text = link + " P(" + y + " = 1)";
            return {text, link + "&nbsp;P(" + yh + " = 1)", "\\operatorname{" + link + "} P(" + yl + " = 1)", text};
        }
        case Link::Log:
            return {"log E[" + y + "]", "log&nbsp;E[" + yh + "]", "\\log \\mathrm{E}[" + yl + "]", "log E[" + y + "]"};
        case Link::Identity:
            break;
    }
    return {"E[" + y + "]", "E[" + yh + "]", "\\mathrm{E}[" + yl + "]", y};
}

// The model as an equation in three notations; a count model's exposure as
// its offset log(E), with coefficient 1.
void equation(const AnalysisRun& run, Memo& m) {
    const FitResult& f = run.fit;
    const EquationSide side = equation_side(f, run.design.outcome);
    std::string t = side.text + " = ", h = side.html + " = ", l = side.latex + " = ";
    std::string fitted = side.fitted + " \xE2\x89\x88 ";  // ≈
    int k = 0;
    for (std::size_t j = 0; j < f.coefficients.size(); ++j) {
        const Coefficient& c = f.coefficients[j];
        const bool intercept = c.term == "intercept";
        const std::string plus = k ? " + " : "";
        t += plus + "b" + subscript_text(k) + (intercept ? "" : "\xC2\xB7" + c.term);
        h +=
            plus + "<i>b</i><sub>" + std::to_string(k) + "</sub>" + (intercept ? "" : "&middot;" + html_escape(c.term));
        l += plus + "b_{" + std::to_string(k) + "}" + (intercept ? "" : "\\," + latex_term(c.term));
        if (!c.aliased) {
            const std::string v = format_sig(std::fabs(c.estimate));
            fitted += (k ? (c.estimate < 0 ? std::string(" ") + kMinus + " " : " + ")
                         : (c.estimate < 0 ? std::string(kMinus) : "")) +
                      v + (intercept ? "" : "\xC2\xB7" + c.term);
        }
        ++k;
    }
    if (!f.exposure.empty()) {
        t += " + log(" + f.exposure + ")";
        h += " + log(" + html_escape(f.exposure) + ")";
        l += " + \\log(\\text{" + latex_escape(f.exposure) + "})";
        fitted += " + log(" + f.exposure + ")";
    }
    m.equation_text = t;
    m.equation_html = h;
    m.equation_latex = l;
    m.fitted_text = fitted;
}

void flatten(const nlohmann::json& j, const std::string& prefix,
             std::vector<std::pair<std::string, std::string>>& out) {
    if (j.is_object()) {
        for (auto it = j.begin(); it != j.end(); ++it)
            flatten(it.value(), prefix.empty() ? it.key() : prefix + "." + it.key(), out);
    } else if (j.is_array() && !j.empty() && (j.front().is_object() || j.front().is_array())) {
        for (std::size_t i = 0; i < j.size(); ++i) flatten(j[i], prefix + "[" + std::to_string(i) + "]", out);
    } else if (j.is_string()) {
        const std::string v = j.get<std::string>();
        out.emplace_back(prefix, v.empty() ? std::string("(none)") : v);
    } else if (j.is_array() && j.empty()) {
        out.emplace_back(prefix, "(none)");
    } else if (j.is_null()) {
        out.emplace_back(prefix, "default");
    } else {
        out.emplace_back(prefix, j.dump());
    }
}

}  // namespace

std::vector<std::string> memo_findings(const Analysis& a, const AnalysisRun& run) {
    std::vector<std::string> out;
    switch (run.kind) {
        case ProbeKind::Continuous:
            if (run.probe) continuous_sentences(a, run, out);
            if (run.probe) crossover_sentences(run, out);
            break;
        case ProbeKind::Groups:
            if (run.probe) group_sentences(run, out);
            if (run.probe) crossover_sentences(run, out);
            break;
        case ProbeKind::Cells:
            if (run.cells) cell_sentences(run, out);
            break;
    }
    comparison_sentence(a, run, out);
    detail::multilevel_sentences(run, out);
    if (run.kind == ProbeKind::Continuous) detail::straight_line_sentences(run, out);
    return out;
}

std::vector<std::string> memo_cautions(const Analysis& a, const AnalysisRun& run) {
    std::vector<std::string> out = run.cautions;
    auto said = [&](const char* word) {
        return std::any_of(out.begin(), out.end(),
                           [&](const std::string& s) { return s.find(word) != std::string::npos; });
    };
    if (!said("not causal"))
        out.push_back(
            "These are associations in observational data, not causal effects, unless the focal predictor "
            "was randomised.");
    if (!said("extrapolation"))
        out.push_back(
            "Effects and boundaries outside the observed range of the moderator would be extrapolations; "
            "the statements above stay within it.");
    if (run.kind == ProbeKind::Continuous && !said("many moderator values"))
        out.push_back(
            "Scanning many moderator values for significance inflates false positives; the simultaneous "
            "band guards against this.");
    if (!said("observations,"))
        out.push_back(
            "Interaction estimates need large samples; with n = " + format_count(static_cast<long long>(run.fit.n)) +
            ", treat the boundaries of regions as approximate.");
    detail::family_cautions(a, run, out);
    detail::multilevel_cautions(run, out);
    detail::straight_line_cautions(run, out);
    return out;
}

std::vector<std::pair<std::string, std::string>> analysis_options(const Project& project, const Analysis& a) {
    const nlohmann::json doc = nlohmann::json::parse(project_to_json(project));
    std::vector<std::pair<std::string, std::string>> out;
    for (const auto& j : doc["analyses"])
        if (j["id"] == a.id) flatten(j, "analysis", out);
    for (const auto& j : doc["datasets"])
        if (j["id"] == a.dataset) flatten(j, "dataset", out);
    int k = 0;
    for (const auto& j : doc["derived_columns"])
        if (j["dataset"] == a.dataset) flatten(j, "derived[" + std::to_string(k++) + "]", out);
    return out;
}

namespace {

// "1,200 of 1,250", or for a fit in the database "every complete row in the
// database (400,000); plots and checks: a random sample of 200,000".
std::string rows_used(const AnalysisRun& run) {
    const auto count = [](std::size_t n) { return format_count(static_cast<long long>(n)); };
    if (run.sample_fit)
        return "every complete row in the database (" + count(run.fit.n) + "); plots and checks: a random sample of " +
               count(run.sample_fit->n);
    return count(run.fit.n) + " of " + count(run.table ? run.table->rows() : 0);
}

}  // namespace

Memo build_memo(const Project& project, const Analysis& a, const AnalysisRun& run, const MemoContext& ctx,
                std::vector<MemoFigure> figures) {
    Memo m;
    m.title = a.name.empty() ? a.id : a.name;
    m.subtitle = ctx.caption;
    m.notes = a.memo_notes;
    m.findings = memo_findings(a, run);
    equation(run, m);
    m.tables = analysis_tables(a, run);
    m.figures = std::move(figures);
    m.cautions = memo_cautions(a, run);
    m.footer.emplace_back("software", ctx.software);
    m.footer.emplace_back("project file", ctx.project_file);
    // A PostgreSQL source has an address and a fingerprint (rows and an
    // order-free checksum, "pg-md5-sum:..."), not a file and its SHA-256.
    const bool server = ctx.data_sha256.rfind("pg-md5-sum:", 0) == 0;
    const std::string hash = server ? "data fingerprint" : "data SHA-256";
    m.footer.emplace_back(server ? "data source" : "data file", ctx.data_file);
    m.footer.emplace_back(hash, ctx.data_sha256);
    if (!ctx.recorded_sha256.empty())
        m.footer.emplace_back(hash + " as saved",
                              ctx.recorded_sha256 == ctx.data_sha256
                                  ? "matches"
                                  : ctx.recorded_sha256 + " (differs: the data changed after the project was saved)");
    m.footer.emplace_back("rows used", rows_used(run));
    for (auto& kv : analysis_options(project, a)) m.footer.push_back(std::move(kv));
    return m;
}

}  // namespace moderato
