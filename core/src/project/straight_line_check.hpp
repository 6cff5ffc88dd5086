// The straight-line check of a run (private to analysis_run): where the data
// are, the binned estimates and the smooth curve, each when switched on and
// the model allows it; what cannot be computed becomes a note.
#pragma once

#include <optional>

#include "moderato/project/analysis_run.hpp"

namespace moderato {

// Fills run.support, run.binned, run.smooth and run.straight_line_notes for a
// Continuous probe. `previous` (the run's smooth curve before re-probing) is
// kept when it was computed for the same smooth settings.
void check_straight_line(AnalysisRun& run, const Analysis& analysis, std::optional<SmoothEffects> previous,
                         const RunProgress& progress);

// Whether `smooth` was computed for the analysis's smooth settings (bandwidth
// given or cross-validated, replicates, seed).
bool smooth_matches(const SmoothEffects& smooth, const Analysis& analysis);

}  // namespace moderato
