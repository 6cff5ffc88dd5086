#include "plots/effect_overlays.hpp"

#include <qcustomplot.h>
#include <algorithm>
#include <cmath>

#include "plots/probe_plot_util.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

// The binned estimates in series 2's colour, the smooth curve in series 3's.
constexpr int kBinsSeries = 1;
constexpr int kSmoothSeries = 2;

QColor colourOf(int series, bool greyscale) {
    const QColor c = estuary::series(series);
    return greyscale ? estuary::toGrey(c) : c;
}

QBrush thinBrush() { return QBrush(estuary::withAlpha(estuary::ink, 0.45), Qt::DiagCrossPattern); }

// One set of bins (filled or hollow squares) with their intervals as bars.
void drawBinSet(QCustomPlot* plot, const std::vector<EffectOverlays::Bin>& bins, bool hollow, const QString& name,
                bool greyscale) {
    if (bins.empty()) return;
    QVector<double> x, y, below, above;
    for (const auto& b : bins) {
        x << b.x;
        y << b.estimate;
        below << b.estimate - b.lower;
        above << b.upper - b.estimate;
    }
    const QColor c = colourOf(kBinsSeries, greyscale);
    QPen pen(c);
    pen.setWidthF(1.6);
    QCPGraph* g = plot->addGraph();
    g->setLineStyle(QCPGraph::lsNone);
    g->setPen(pen);
    g->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssSquare, pen, hollow ? QBrush(Qt::white) : QBrush(c), 9));
    g->setData(x, y, true);
    g->setName(name);
    g->setSelectable(QCP::stNone);
    auto* bars = new QCPErrorBars(plot->xAxis, plot->yAxis);
    bars->removeFromLegend();
    bars->setDataPlottable(g);
    bars->setData(below, above);
    QPen barPen = pen;
    barPen.setWidthF(1.3);
    bars->setPen(barPen);
    bars->setWhiskerWidth(7);
    bars->setSymbolGap(10);
    bars->setSelectable(QCP::stNone);
}

void drawBins(QCustomPlot* plot, const EffectOverlays& o, bool greyscale) {
    std::vector<EffectOverlays::Bin> full, thin;
    for (const auto& b : o.bins) (b.thin ? thin : full).push_back(b);
    drawBinSet(plot, full, false, o.binsName, greyscale);
    drawBinSet(
        plot, thin, true,
        full.empty() ? o.binsName + QObject::tr(", few rows (hollow)") : QObject::tr("bin with few rows (hollow)"),
        greyscale);
}

// The points of `curve` where `keep` holds; the others NaN, so the line breaks there.
std::vector<CurvePoint> where(const std::vector<CurvePoint>& curve, const std::vector<bool>& keep) {
    std::vector<CurvePoint> out = curve;
    for (std::size_t i = 0; i < out.size(); ++i) {
        // A point is kept when it or a neighbour is kept, so the two parts meet.
        const bool near = keep[i] || (i > 0 && keep[i - 1]) || (i + 1 < out.size() && keep[i + 1]);
        if (!near) out[i].estimate = std::numeric_limits<double>::quiet_NaN();
    }
    return out;
}

void drawSmooth(QCustomPlot* plot, const EffectOverlays& o, bool greyscale) {
    const QColor c = colourOf(kSmoothSeries, greyscale);
    std::vector<bool> solid(o.smooth.size(), true);
    bool anyThin = false;
    for (std::size_t i = 0; i < o.smooth.size() && i < o.smoothThin.size(); ++i) {
        solid[i] = !o.smoothThin[i];
        anyThin = anyThin || o.smoothThin[i];
    }
    // The band's edges: fine lines, so the effect's own band stays readable beneath.
    const bool band = std::any_of(o.smooth.begin(), o.smooth.end(),
                                  [](const CurvePoint& p) { return std::isfinite(p.lower) && std::isfinite(p.upper); });
    if (band) {
        QPen edge(estuary::withAlpha(c, 0.8));
        edge.setWidthF(1.0);
        edge.setStyle(Qt::DotLine);
        for (const int side : {-1, +1}) {
            QVector<double> k, v;
            curveVectors(o.smooth, side, k, v);
            QCPGraph* g = plot->addGraph();
            g->setPen(edge);
            g->setData(k, v, true);
            g->setSelectable(QCP::stNone);
            g->setName(o.smoothBandName);
            g->removeFromLegend();  // the curve's own entry names its band
        }
    }
    QPen pen(c);
    pen.setWidthF(2.0);
    pen.setStyle(estuary::lineStyle(kSmoothSeries));
    QCPGraph* curve = plot->addGraph();
    curve->setPen(pen);
    curve->setName(o.smoothName);
    curve->setSelectable(QCP::stNone);
    setLineData(curve, where(o.smooth, solid));
    if (!anyThin) return;
    std::vector<bool> thin(solid.size());
    for (std::size_t i = 0; i < solid.size(); ++i) thin[i] = !solid[i];
    QPen pale(estuary::withAlpha(c, 0.45));
    pale.setWidthF(2.0);
    pale.setStyle(Qt::DotLine);
    QCPGraph* thinPart = plot->addGraph();
    thinPart->setPen(pale);
    thinPart->setName(QObject::tr("smooth curve, few rows nearby"));
    thinPart->setSelectable(QCP::stNone);
    setLineData(thinPart, where(o.smooth, thin));
}

// Thin stretches of the moderator: a hatched strip along the bottom of the plot area.
void drawThin(QCustomPlot* plot, const EffectOverlays& o) {
    if (o.thin.empty()) return;
    const QString layer = plot->currentLayer()->name();
    plot->setCurrentLayer(kShadingLayer);
    const QCPRange x = plot->xAxis->range();
    bool drawn = false;
    for (const Region& r : o.thin) {
        const double a = std::max(r.lo, x.lower), b = std::min(r.hi, x.upper);
        if (!(b > a)) continue;
        auto* strip = new QCPItemRect(plot);
        for (QCPItemPosition* p : {strip->topLeft, strip->bottomRight}) {
            p->setTypeX(QCPItemPosition::ptPlotCoords);
            p->setTypeY(QCPItemPosition::ptAxisRectRatio);
        }
        strip->topLeft->setCoords(a, 0.955);
        strip->bottomRight->setCoords(b, 1.0);
        strip->setBrush(thinBrush());
        strip->setPen(QPen(estuary::withAlpha(estuary::ink, 0.35), 0.8));
        strip->setSelectable(false);
        drawn = true;
    }
    plot->setCurrentLayer(layer);
    if (!drawn) return;
    auto* swatch = new QCPBars(plot->xAxis, plot->yAxis);  // a legend entry with a filled box
    swatch->setName(o.thinName);
    swatch->setBrush(thinBrush());
    swatch->setPen(QPen(estuary::withAlpha(estuary::ink, 0.35), 0.8));
    swatch->setSelectable(QCP::stNone);
}

void drawNote(QCustomPlot* plot, const QString& text, const QFont& font) {
    auto* t = new QCPItemText(plot);
    t->position->setType(QCPItemPosition::ptAxisRectRatio);
    t->position->setCoords(0.01, 0.02);
    t->setPositionAlignment(Qt::AlignTop | Qt::AlignLeft);
    t->setTextAlignment(Qt::AlignLeft);
    t->setText(text);
    QFont f = font;
    f.setPointSizeF(std::max(6.0, font.pointSizeF() * 0.85));
    t->setFont(f);
    t->setColor(estuary::ink);
    t->setBrush(QBrush(QColor(255, 255, 255, 220)));
    t->setPadding(QMargins(3, 1, 3, 1));
    t->setSelectable(false);
}

}  // namespace

void widenForOverlays(const EffectOverlays& o, double& lo, double& hi) {
    if (!o.notDrawnNote.isEmpty()) return;
    for (const auto& b : o.bins)
        for (const double v : {b.lower, b.upper, b.estimate})
            if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
    // The smooth curve where its local fit has rows enough (a thin stretch may swing far off).
    for (std::size_t i = 0; i < o.smooth.size(); ++i) {
        if (i < o.smoothThin.size() && o.smoothThin[i]) continue;
        const CurvePoint& p = o.smooth[i];
        for (const double v : {p.lower, p.upper, p.estimate})
            if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
    }
}

void drawEffectOverlays(QCustomPlot* plot, const EffectOverlays& o, bool greyscale, const QFont& font) {
    if (!o.notDrawnNote.isEmpty()) {
        drawNote(plot, o.notDrawnNote, font);
        return;
    }
    drawThin(plot, o);
    if (!o.smooth.empty()) drawSmooth(plot, o, greyscale);
    if (!o.bins.empty()) drawBins(plot, o, greyscale);
}

}  // namespace moderato::ui
