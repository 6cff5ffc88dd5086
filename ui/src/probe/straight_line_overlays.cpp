#include "probe/straight_line_overlays.hpp"

#include <QObject>

#include "common/number_text.hpp"

namespace moderato::ui {

namespace {

void addBins(const BinnedEffects& b, EffectOverlays& o) {
    for (const EffectBin& e : b.bins) o.bins.push_back({e.moderator_value, e.estimate, e.ci_lower, e.ci_upper, e.thin});
    o.binsName = QObject::tr("binned estimates, %1 CI").arg(levelText(b.level));
}

void addSmooth(const SmoothEffects& s, EffectOverlays& o) {
    for (const SmoothPoint& p : s.points) {
        CurvePoint c;
        c.x = p.moderator_value;
        c.estimate = p.effect;
        c.lower = p.low;
        c.upper = p.high;
        o.smooth.push_back(c);
        o.smoothThin.push_back(p.thin);
    }
    // One legend entry for the curve and its band (the band's edges are dotted in its colour).
    // Short entries keep a small figure's plot area: the bandwidth is in the caption and the panel.
    o.smoothName = s.replicates > 0 ? QObject::tr("smooth curve, %1 band dotted").arg(levelText(s.level))
                                    : QObject::tr("smooth curve");
    o.smoothBandName = QObject::tr("%1 band of the smooth curve").arg(levelText(s.level));
}

}  // namespace

EffectOverlays straightLineOverlays(const AnalysisRun& run, const ProbeSettings& ps, bool probabilityShown) {
    EffectOverlays o;
    const bool binned = ps.show_binned && run.binned, smooth = ps.show_smooth && run.smooth;
    if (!binned && !smooth) return o;
    if (probabilityShown) {
        o.notDrawnNote = QObject::tr("Straight-line check not drawn: it is on the log-odds scale");
        return o;
    }
    if (binned) addBins(*run.binned, o);
    if (smooth) addSmooth(*run.smooth, o);
    if (run.support) {
        o.thin = run.support->thin;
        o.thinName = QObject::tr("few rows");
    }
    return o;
}

}  // namespace moderato::ui
