// The straight-line check of a run (private to analysis_run): where the data
// are, the binned estimates and the smooth curve, each when switched on and
// the model allows it; what cannot be computed becomes a note.
#pragma once

#include <optional>

#include "moderato/project/analysis_run.hpp"

namespace moderato {

// What a run held before re-probing: kept when computed for the same
// settings (both depend on the model and their own settings only, so a new
// pin or scale does not refit them).
struct PreviousCheck {
    std::optional<BinnedEffects> binned;
    std::optional<SmoothEffects> smooth;
};

// Fills run.support, run.binned, run.smooth and run.straight_line_notes for a
// Continuous probe, reusing `previous` where it matches.
void check_straight_line(AnalysisRun& run, const Analysis& analysis, PreviousCheck previous,
                         const RunProgress& progress);

// Whether `smooth` was computed for the analysis's smooth settings (bandwidth
// given or cross-validated, replicates, seed).
bool smooth_matches(const SmoothEffects& smooth, const Analysis& analysis);

}  // namespace moderato
