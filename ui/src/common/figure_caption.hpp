// The caption under an exported figure and the statement at the top of a
// readout: model, SE kind, level, n — so a figure explains itself.
#pragma once

#include <QString>

#include "moderato/project/analysis_run.hpp"

namespace moderato::ui {

// "Linear model of y on x × z (+2 controls) · HC3 SEs · 95% intervals · n = 1,200";
// with a second moderator: "… on x × z × w, w held at 3.2 (mean + 1 SD) · …";
// a multilevel fit: "Multilevel linear model of y on x × z, in groups of team · model-based SEs · …"
QString figureCaption(const Analysis& analysis, const AnalysisRun& run);
// The same for one plot: the Effect plot's adds its straight-line check when
// shown ("… · straight-line check: binned estimates (3 bins), smooth curve
// (bandwidth 1.2)", with ", log-odds scale" for a logistic model, or "not
// drawn" on the probability scale).
QString figureCaption(const Analysis& analysis, const AnalysisRun& run, FigurePlot plot);
// "HC3" / "classical" / "cluster-robust (shop, 40 clusters)" / "model-based"
QString seDescription(const Analysis& analysis, const AnalysisRun& run);

}  // namespace moderato::ui
