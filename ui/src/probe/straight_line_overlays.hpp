// What the Effect plot draws of a run's straight-line check: the binned
// estimates and the smooth curve when switched on (and computed), and the
// moderator's thin stretches with either. On the probability scale the plot
// draws none of them (they are on the log-odds scale) and says so instead.
#pragma once

#include "moderato/project/analysis_run.hpp"
#include "plots/effect_overlays.hpp"

namespace moderato::ui {

EffectOverlays straightLineOverlays(const AnalysisRun& run, const ProbeSettings& settings, bool probabilityShown);

}  // namespace moderato::ui
