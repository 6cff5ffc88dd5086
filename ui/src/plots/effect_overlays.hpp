// The straight-line check drawn over the Effect plot: the binned estimates
// (a filled square at each bin's median with its interval as a bar; a thin
// bin hollow), the smooth curve (dash-dot, paler and dotted where its local
// fit is thin) with its bootstrap band as two fine edges, and the moderator's
// thin stretches as a hatched strip along the bottom of the plot area. All
// on the model's scale; EffectPlot draws them only when the plot shows it.
#pragma once

#include <QString>
#include <vector>

#include "moderato/probing/probe.hpp"
#include "moderato/probing/probe_curves.hpp"

class QCustomPlot;
class QFont;

namespace moderato::ui {

struct EffectOverlays {
    struct Bin {
        double x = 0;  // the bin's median
        double estimate = 0, lower = 0, upper = 0;
        bool thin = false;
    };
    std::vector<Bin> bins;
    QString binsName;  // legend entry ("binned estimates (3 bins)")
    // The smooth curve over its grid; lower/upper NaN without a band.
    std::vector<CurvePoint> smooth;
    std::vector<bool> smoothThin;        // per point of `smooth`
    QString smoothName, smoothBandName;  // the band's name stays out of the legend (the curve's says it)
    std::vector<Region> thin;            // thin stretches of the moderator
    QString thinName;
    // Said on the plot instead of drawing the overlays (e.g. they are on the
    // log-odds scale and the plot shows probabilities); empty: none.
    QString notDrawnNote;

    bool any() const { return !bins.empty() || !smooth.empty() || !notDrawnNote.isEmpty(); }
};

// Widens [lo, hi] on the value axis to take in the bins' intervals and the
// smooth curve with its band where its local fit is not thin.
void widenForOverlays(const EffectOverlays& o, double& lo, double& hi);
// Draws the overlays (legend entries included) on the plot's current axes.
void drawEffectOverlays(QCustomPlot* plot, const EffectOverlays& o, bool greyscale, const QFont& font);

}  // namespace moderato::ui
