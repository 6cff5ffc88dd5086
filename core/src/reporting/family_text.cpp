#include "family_text.hpp"

#include <algorithm>

#include "moderato/probing/response_scale.hpp"
#include "moderato/reporting/analysis_tables.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

std::string model_scale_target(const FitResult& fit, const std::string& outcome) {
    switch (fit.family) {
        case Family::Logistic:
            return "the log-odds of " + outcome + " = 1";
        case Family::Probit:
            return "the probit of P(" + outcome + " = 1)";
        case Family::Poisson:
        case Family::NegativeBinomial:
            return fit.exposure.empty() ? "the log expected count of " + outcome
                                        : "the log rate of " + outcome + " per unit of " + fit.exposure;
        case Family::Linear:
            break;
    }
    return outcome;
}

std::string model_scale_clause(const FitResult& fit) {
    const std::string scale = model_scale_text(fit.family, !fit.exposure.empty());
    return scale.empty() ? "" : " on the " + scale + " scale";
}

std::string effect_target(const ProbeResult& p, const FitResult& fit) {
    if (p.scale == ProbeScale::Outcome) return outcome_scale_words(fit, p.outcome);
    return model_scale_target(fit, p.outcome);
}

void rate_ratio_sentence(const ProbeResult& p, const FitResult& fit, std::vector<std::string>& out) {
    if (p.rate_ratios.empty() || p.rate_ratios.size() != p.effects.size()) return;
    std::vector<std::string> at;
    for (std::size_t i = 0; i < p.rate_ratios.size() && i < 5; ++i) {
        const RateRatio& r = p.rate_ratios[i];
        at.push_back(format_sig(r.ratio) + " (" + level_text(p.level) + " CI " + format_range(r.ci_lower, r.ci_upper) +
                     ") at " + p.moderator + " = " + moderator_value_label(p, p.effects[i]));
    }
    const std::string what = fit.exposure.empty() ? "the expected count of " + p.outcome
                                                  : "the rate of " + p.outcome + " per unit of " + fit.exposure;
    const std::string step = p.binary_focal ? "moving " + p.focal + " from 0 to 1" : "one unit more of " + p.focal;
    out.push_back("As rate ratios, " + step + " multiplies " + what + " by " + join_and(at) +
                  "; a ratio of 1 is no effect.");
}

namespace {

bool said(const std::vector<std::string>& out, const std::string& word) {
    return std::any_of(out.begin(), out.end(), [&](const std::string& s) { return s.find(word) != std::string::npos; });
}

// "probabilities", "expected counts", "rates per unit of E".
std::string outcome_plural(const FitResult& fit) {
    if (binary_outcome(fit.family)) return "probabilities";
    return fit.exposure.empty() ? "expected counts" : "rates per unit of " + fit.exposure;
}

void overdispersion_caution(const AnalysisRun& run, std::vector<std::string>& out) {
    const FitResult& f = run.fit;
    if (!f.overdispersion || !f.overdispersion->evident() || said(out, "overdispers")) return;
    const Overdispersion& o = *f.overdispersion;
    out.push_back(
        "The counts of " + run.design.outcome +
        " vary more than a Poisson model allows (overdispersion: Pearson χ²/df = " + format_sig(o.pearson_ratio) +
        "; Cameron & Trivedi test z = " + format_sig(o.test_value) + ", " + p_clause(o.p_value) + "). " +
        (f.se == SeKind::Classical ? "Its model-based standard errors are then too small, its intervals "
                                     "too narrow and its regions too wide; "
                                   : "Robust standard errors allow for it, but the model's spread of the "
                                     "counts is wrong; ") +
        "fit the negative binomial family instead.");
}

}  // namespace

void family_cautions(const Analysis& a, const AnalysisRun& run, std::vector<std::string>& out) {
    const FitResult& f = run.fit;
    if (!generalized(f.family)) return;
    const std::string model = model_scale_text(f.family, !f.exposure.empty());
    const std::string outcome = outcome_scale_text(f.family, f.exposure);
    if (!said(out, "product coefficient (" + model))
        out.push_back("In a " + family_words(f.family) + " model the product coefficient (" + model +
                      " scale) gives neither the size nor the sign of the interaction in " + outcome_plural(f) +
                      ": there an effect also depends on the other predictors' values. Probe's outcome scale (" +
                      outcome + ") says how the " + outcome_plural(f) + " change.");
    overdispersion_caution(run, out);
    if (!f.exposure.empty() && !said(out, "per unit of " + f.exposure + " (exposure"))
        out.push_back("The model is for " + a.roles.outcome + " per unit of " + f.exposure + " (exposure: log(" +
                      f.exposure + ") enters with coefficient 1), so effects on the outcome scale are per unit of " +
                      f.exposure + ", and a row with twice the " + f.exposure + " is expected to count twice as many.");
}

}  // namespace moderato::detail
