#include "memo_straight_line.hpp"

#include <algorithm>

#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato::detail {

namespace {

std::string count(std::size_t n) { return format_count(static_cast<long long>(n)); }

bool shown(const AnalysisRun& run) { return run.binned || run.smooth || !run.straight_line_notes.empty(); }

// One bin in a sentence, with the straight line's effect at the same value.
std::string bin_sentence(const BinnedEffects& b, std::size_t k) {
    const EffectBin& e = b.bins[k];
    std::string s = "Bin " + std::to_string(k + 1) + " of " + b.moderator + " (" + b.moderator + " from " +
                    format_range(e.min, e.max) + ", " + count(e.rows) + " rows): at its median " +
                    format_sig(e.moderator_value) + " the effect of " + b.focal + " is " + format_sig(e.estimate) +
                    " (" + level_text(b.level) + " CI " + format_range(e.ci_lower, e.ci_upper) +
                    "); the straight line gives " + format_sig(e.linear.estimate) + " there.";
    if (e.thin)
        s += " Few rows for a bin's four coefficients (under " + std::to_string(4 * ThinRule::rows_per_coefficient) +
             "): read this estimate with care.";
    return s;
}

std::string smooth_sentence(const SmoothEffects& s) {
    std::string how = s.method == BandwidthMethod::CrossValidation
                          ? "chosen by " + std::to_string(s.folds) + "-fold cross-validation"
                          : "as given";
    std::string out = "The smooth curve of the effect of " + s.focal +
                      " (a kernel estimate, local straight lines) uses a bandwidth of " + format_sig(s.bandwidth) +
                      " in units of " + s.moderator + ", " + how;
    if (s.replicates > 0)
        out += "; its band holds " + level_text(s.level) + " percentile intervals from " +
               count(static_cast<std::size_t>(s.replicates)) + " bootstrap replicates (seed " + std::to_string(s.seed) +
               ")";
    else out += "; it has no band (no bootstrap replicates were asked for)";
    return out + ".";
}

std::string thin_sentence(const CommonSupport& c) {
    std::vector<std::string> parts;
    for (const Region& r : c.thin) parts.push_back(format_range(r.lo, r.hi));
    return "The data are thin for " + c.moderator + " from " + join_and(parts) + "; the rule: " + c.rule + ".";
}

}  // namespace

void straight_line_sentences(const AnalysisRun& run, std::vector<std::string>& out) {
    if (run.binned) {
        for (std::size_t k = 0; k < run.binned->bins.size(); ++k) out.push_back(bin_sentence(*run.binned, k));
        std::string test = linearity_sentence(*run.binned);
        if (!test.empty() && test.back() != '.') test += '.';
        out.push_back(std::move(test));
    }
    if (run.smooth) out.push_back(smooth_sentence(*run.smooth));
    if ((run.binned || run.smooth) && run.support && !run.support->thin.empty())
        out.push_back(thin_sentence(*run.support));
}

void straight_line_cautions(const AnalysisRun& run, std::vector<std::string>& out) {
    if (!shown(run)) return;
    for (const std::string& n : run.straight_line_notes) out.push_back(n);
    // (binned_effects' cautions say that a test which does not reject is no proof, when it does not.)
    if (run.binned) out.insert(out.end(), run.binned->cautions.begin(), run.binned->cautions.end());
    if (run.smooth) out.insert(out.end(), run.smooth->cautions.begin(), run.smooth->cautions.end());
    const bool thin_bin = run.binned && std::any_of(run.binned->bins.begin(), run.binned->bins.end(),
                                                    [](const EffectBin& b) { return b.thin; });
    if (thin_bin || (run.support && !run.support->thin.empty()))
        out.push_back(
            "Where the moderator's data are thin, the binned estimates and the smooth curve rest on few rows "
            "and can swing widely; they say little there.");
    const bool logistic = (run.binned && run.binned->family == Family::Logistic) ||
                          (run.smooth && run.smooth->family == Family::Logistic);
    if (logistic)
        out.push_back(
            "The binned estimates and the smooth curve are on the model's log-odds scale, not the probability "
            "scale.");
}

}  // namespace moderato::detail
