// The straight-line check of a run: common support, binned estimates, smooth curve.
#include "project/straight_line_check.hpp"

#include <cmath>
#include <string>

#include "moderato/support/error.hpp"

namespace moderato {

namespace {

// Why the model rules the check out, or "" when it allows it.
std::string refusal(const AnalysisRun& run, const Analysis& a) {
    if (a.multilevel.active())
        return "The straight-line check is not available for multilevel models: the binned estimates and the "
               "smooth curve would ignore the groups.";
    const Column* focal = run.table ? run.table->find(a.roles.focal) : nullptr;
    if (!focal || focal->kind != ColumnKind::Numeric) return "The straight-line check needs a numeric focal predictor.";
    return {};
}

void add_support(AnalysisRun& run, const Analysis& a) {
    try {
        run.support = common_support(run.design, a.roles.focal, a.roles.moderator);
    } catch (const InputError& e) {
        if (a.probe.show_binned || a.probe.show_smooth)
            run.straight_line_notes.push_back(std::string("Where the data are could not be shown: ") + e.what());
    }
}

void add_binned(AnalysisRun& run, const Analysis& a, std::optional<BinnedEffects> previous) {
    if (previous && static_cast<int>(previous->bins.size()) == a.probe.bins && previous->focal == a.roles.focal &&
        previous->moderator == a.roles.moderator) {
        run.binned = std::move(previous);
        return;
    }
    try {
        run.binned = binned_effects(run.design, run.fit, run.spec, a.roles.focal, a.roles.moderator, a.probe.bins);
    } catch (const InputError& e) {
        run.straight_line_notes.push_back(std::string("The binned estimates could not be computed: ") + e.what());
    }
}

void add_smooth(AnalysisRun& run, const Analysis& a, std::optional<SmoothEffects> previous,
                const RunProgress& progress) {
    if (previous && smooth_matches(*previous, a)) {
        run.smooth = std::move(previous);
        return;
    }
    SmoothOptions options;
    options.bandwidth = a.probe.smooth_bandwidth;
    options.replicates = a.probe.smooth_replicates;
    options.seed = a.probe.smooth_seed;
    options.level = a.level;
    options.progress = progress;
    try {
        run.smooth = smooth_effects(run.design, run.fit, a.roles.focal, a.roles.moderator, options);
    } catch (const InputError& e) {
        run.straight_line_notes.push_back(std::string("The smooth curve could not be computed: ") + e.what());
    }
}

}  // namespace

bool smooth_matches(const SmoothEffects& s, const Analysis& a) {
    const double h = a.probe.smooth_bandwidth;
    const bool bandwidth = std::isnan(h) ? s.method == BandwidthMethod::CrossValidation
                                         : s.method == BandwidthMethod::Given && s.bandwidth == h;
    return bandwidth && s.replicates == a.probe.smooth_replicates && s.seed == a.probe.smooth_seed &&
           s.focal == a.roles.focal && s.moderator == a.roles.moderator;
}

void check_straight_line(AnalysisRun& run, const Analysis& a, PreviousCheck previous, const RunProgress& progress) {
    const Column* focal = run.table ? run.table->find(a.roles.focal) : nullptr;
    if (focal && focal->kind == ColumnKind::Numeric) add_support(run, a);
    if (!a.probe.show_binned && !a.probe.show_smooth) return;
    if (const std::string why = refusal(run, a); !why.empty()) {
        run.straight_line_notes.push_back(why);
        return;
    }
    if (a.probe.show_binned) add_binned(run, a, std::move(previous.binned));
    if (a.probe.show_smooth) add_smooth(run, a, std::move(previous.smooth), progress);
}

}  // namespace moderato
