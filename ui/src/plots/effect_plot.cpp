#include "plots/effect_plot.hpp"

#include <qcustomplot.h>
#include <QFontMetricsF>
#include <QResizeEvent>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>
#include <limits>

#include "common/number_text.hpp"
#include "plots/plot_style.hpp"
#include "plots/probe_plot_util.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

QCPItemRect* spanRect(QCustomPlot* plot, double a, double b, const QBrush& brush) {
    auto* r = new QCPItemRect(plot);
    for (QCPItemPosition* p : {r->topLeft, r->bottomRight}) {
        p->setTypeX(QCPItemPosition::ptPlotCoords);
        p->setTypeY(QCPItemPosition::ptAxisRectRatio);
    }
    r->topLeft->setCoords(a, 0);
    r->bottomRight->setCoords(b, 1);
    r->setBrush(brush);
    r->setPen(Qt::NoPen);
    r->setSelectable(false);
    return r;
}

// A legend entry with a filled box (QCPBars draw their icon as a rectangle).
void legendSwatch(QCustomPlot* plot, const QString& name, const QBrush& brush, const QPen& pen = Qt::NoPen) {
    auto* bars = new QCPBars(plot->xAxis, plot->yAxis);
    bars->setName(name);
    bars->setBrush(brush);
    bars->setPen(pen);
    bars->setSelectable(QCP::stNone);
}

QCPItemStraightLine* verticalLine(QCustomPlot* plot, double x, const QPen& pen) {
    auto* l = new QCPItemStraightLine(plot);
    l->point1->setCoords(x, 0);
    l->point2->setCoords(x, 1);
    l->setPen(pen);
    l->setSelectable(false);
    return l;
}

// Size of a text item's box (text lines and padding), in the units it is laid out in.
QSizeF boxSize(const QCPItemText* t) {
    const QRectF text =
        QFontMetricsF(t->font()).boundingRect(QRectF(0, 0, 0, 0), Qt::TextDontClip | t->textAlignment(), t->text());
    const QMargins pad = t->padding();
    return {text.width() + pad.left() + pad.right(), text.height() + pad.top() + pad.bottom()};
}

// How many pixels of [top, bottom] the span [a, b] covers.
double overlap(double top, double bottom, std::pair<double, double> span) {
    return std::max(0.0, std::min(bottom, span.second) - std::max(top, span.first));
}

QFont smallFont(const QFont& base, double scale = 0.9) {
    QFont f = base;
    f.setPointSizeF(std::max(6.0, base.pointSizeF() * scale));
    return f;
}

}  // namespace

EffectPlot::EffectPlot(QWidget* parent) : QWidget(parent), plot_(new QCustomPlot(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
    plot_->setObjectName(QStringLiteral("effect-plot"));
    stylePlot(plot_, font());
    setUpProbePlot(plot_);
    plot_->yAxis2->setRange(0, 1);
    plot_->setMouseTracking(true);
    plot_->setToolTip(tr("Drag to move the moderator; the Lines plot and the readout follow"));
    connect(plot_, &QCustomPlot::mousePress, this, &EffectPlot::onPress);
    connect(plot_, &QCustomPlot::mouseMove, this, &EffectPlot::onMove);
    connect(plot_, &QCustomPlot::mouseRelease, this, &EffectPlot::onRelease);
    connect(plot_, &QCustomPlot::afterLayout, this, &EffectPlot::placeLabels);
    noteMargins_ = new QCPMarginGroup(plot_);
    // The notes' row keeps the margins of its last layout (QCustomPlot counts an element's own
    // margins in its group): cleared before each replot, the plot area alone sets them.
    connect(plot_, &QCustomPlot::beforeReplot, this, [this] {
        if (noteRow_) noteRow_->setMargins(QMargins());
    });
    setMinimumHeight(180);
}

QCPLayer* EffectPlot::movingLayer() const { return plot_->layer(kMovingLayer); }

void EffectPlot::setData(const EffectPlotData& data) {
    data_ = data;
    hasData_ = true;
    rebuild();
}

void EffectPlot::clear() {
    hasData_ = false;
    data_ = {};
    rebuild();
}

void EffectPlot::setGreyscale(bool on) {
    greyscale_ = on;
    rebuild();
}

void EffectPlot::setExportLook(bool exporting, bool markSlider) {
    exporting_ = exporting;
    markSlider_ = markSlider;
    setCurrent(current_, currentPoint_, false);
}

bool EffectPlot::sliderMarkShown() const { return handleLabel_ && handleLabel_->visible(); }

QString EffectPlot::handleText() const { return handleLabel_ ? handleLabel_->text() : QString(); }

void EffectPlot::resizeEvent(QResizeEvent* event) {
    QWidget::resizeEvent(event);
    if (hasData_ && fitLegend(plot_)) plot_->replot();
}

void EffectPlot::rebuild() {
    plot_->clearItems();
    plot_->clearPlottables();
    handle_ = whisker_ = nullptr;
    knob_ = nullptr;
    handleLabel_ = nullptr;
    groupHighlight_ = nullptr;
    drawnBoundaries_.clear();
    boundaryNotes_.clear();
    if (noteRow_) {
        // The notes' row goes with the notes it held.
        plot_->plotLayout()->remove(noteRow_);
        plot_->plotLayout()->simplify();
        noteRow_ = nullptr;
    }
    beyondNotes_.clear();
    boundaryLabels_.clear();
    if (hasData_) {
        if (data_.groups) buildGroups();
        else buildContinuous();
        buildMoving();
        setCurrent(current_, currentPoint_, false);
        fitLegend(plot_);
    }
    plot_->replot();
}

void EffectPlot::buildContinuous() {
    const EffectPlotData& d = data_;
    auto xTicker = numberTicker();
    plot_->xAxis->setTicker(xTicker);
    plot_->xAxis->setRange(d.axis.first, d.axis.second);
    double lo = 0, hi = 0;
    for (const auto* points : {&d.curve, &d.groupSpread})
        for (const auto& c : *points) {
            if (std::isfinite(c.lower)) lo = std::min(lo, c.lower);
            if (std::isfinite(c.upper)) hi = std::max(hi, c.upper);
        }
    widenForOverlays(d.overlays, lo, hi);
    const double pad = 0.08 * (hi > lo ? hi - lo : 1.0);
    plot_->yAxis->setRange(lo - pad, hi + pad);
    setAxisTitle(plot_->xAxis, d.moderatorTitle);
    setAxisTitle(plot_->yAxis, d.effectTitle);

    const auto [anySignificant, anyNotSignificant] = drawRegions();
    drawCurve(anySignificant, anyNotSignificant);
    drawEffectOverlays(plot_, d.overlays, greyscale_, font());
    drawBoundaries();
    drawBoundaryNotes();
    if (!d.rug.empty()) drawRug();
}

// Shading under the grid: beyond the data, then the significant regions and
// their complement within the axis range. Says which kinds were drawn.
std::pair<bool, bool> EffectPlot::drawRegions() {
    const EffectPlotData& d = data_;
    plot_->setCurrentLayer(kShadingLayer);
    shadeBeyond(d.axis.first, d.observed.first);
    shadeBeyond(d.observed.second, d.axis.second);
    // Significant regions and their complement within the axis range.
    double cursor = d.axis.first;
    bool anySignificant = false, anyNotSignificant = false;
    for (const Region& r : d.significant) {
        const double a = std::max(r.lo, d.axis.first), b = std::min(r.hi, d.axis.second);
        if (b <= a) continue;
        if (a > cursor) {
            spanRect(plot_, cursor, a, estuary::notSignificantBrush());
            anyNotSignificant = true;
        }
        spanRect(plot_, a, b, estuary::significanceBrush(greyscale_));
        anySignificant = true;
        cursor = b;
    }
    if (cursor < d.axis.second) {
        spanRect(plot_, cursor, d.axis.second, estuary::notSignificantBrush());
        anyNotSignificant = true;
    }
    return {anySignificant, anyNotSignificant};
}

void EffectPlot::shadeBeyond(double a, double b) {
    if (b <= a) return;
    const QFont note = smallFont(font(), 0.85);
    QColor noteColour = estuary::ink;
    noteColour.setAlphaF(0.65f);
    spanRect(plot_, a, b, QBrush(estuary::beyond));
    auto* t = new QCPItemText(plot_);
    t->position->setTypeX(QCPItemPosition::ptPlotCoords);
    t->position->setTypeY(QCPItemPosition::ptAxisRectRatio);
    t->position->setCoords(0.5 * (a + b), 1.0);
    t->setPositionAlignment(Qt::AlignBottom | Qt::AlignHCenter);
    t->setText(tr("beyond\nthe data"));
    t->setTextAlignment(Qt::AlignCenter);
    t->setFont(note);
    t->setColor(noteColour);
    t->setPadding(QMargins(2, 2, 2, 12));
    t->setSelectable(false);
    beyondNotes_.push_back({t, a, b});
}

// The band and the effect curve, the legend, and the zero line.
void EffectPlot::drawCurve(bool anySignificant, bool anyNotSignificant) {
    const EffectPlotData& d = data_;
    plot_->setCurrentLayer(QStringLiteral("main"));
    // Legend: effect, band, region, not significant, beyond the data (the band's graphs stay out of it).
    addBand(plot_, d.curve, estuary::bandBrush(0, greyscale_));
    QCPGraph* curve = plot_->addGraph();  // after the band, so it draws above it
    QPen curvePen = estuary::seriesPen(0, 2.2, greyscale_);
    curvePen.setStyle(Qt::SolidLine);
    curve->setPen(curvePen);
    curve->setName(tr("conditional effect"));
    setLineData(curve, d.curve);
    legendSwatch(plot_, d.bandName, estuary::bandBrush(0, greyscale_));
    if (!d.groupSpread.empty()) drawGroupSpread();
    if (anySignificant) legendSwatch(plot_, tr("region of significance"), estuary::significanceBrush(greyscale_));
    if (anyNotSignificant) legendSwatch(plot_, tr("not significant"), estuary::notSignificantBrush());
    if (d.axis.first < d.observed.first || d.axis.second > d.observed.second)
        legendSwatch(plot_, tr("beyond the data"), QBrush(estuary::beyond), QPen(estuary::grid));

    QPen zeroPen(estuary::ink);
    zeroPen.setWidthF(1.0);
    auto* zero = new QCPItemStraightLine(plot_);
    zero->point1->setCoords(0, 0);
    zero->point2->setCoords(1, 0);
    zero->setPen(zeroPen);
    zero->setSelectable(false);
}

// The groups' own slopes: dotted lines at effect ± z × SD, in the ink colour.
void EffectPlot::drawGroupSpread() {
    QPen pen(estuary::ink);
    pen.setWidthF(1.3);
    pen.setStyle(Qt::DotLine);
    for (const bool upper : {false, true}) {
        std::vector<CurvePoint> edge = data_.groupSpread;
        for (auto& c : edge) c.estimate = upper ? c.upper : c.lower;
        QCPGraph* g = plot_->addGraph();
        g->setPen(pen);
        g->setSelectable(QCP::stNone);
        setLineData(g, edge);
        if (!upper) g->setName(data_.groupSpreadName);
        else g->removeFromLegend();
    }
}

// The Johnson–Neyman boundaries inside the axis, as labelled dashed lines.
void EffectPlot::drawBoundaries() {
    const EffectPlotData& d = data_;
    const QFont note = smallFont(font(), 0.85);
    QPen boundaryPen(estuary::ink);
    boundaryPen.setWidthF(1.2);
    boundaryPen.setStyle(Qt::DashLine);
    std::vector<double> shown;
    for (double b : d.boundaries)
        if (std::isfinite(b) && b >= d.axis.first && b <= d.axis.second) shown.push_back(b);
    const double span = d.axis.second - d.axis.first;
    for (std::size_t k = 0; k < shown.size(); ++k) {
        const double b = shown[k];
        verticalLine(plot_, b, boundaryPen);
        auto* t = new QCPItemText(plot_);
        t->position->setTypeX(QCPItemPosition::ptPlotCoords);
        t->position->setTypeY(QCPItemPosition::ptAxisRectRatio);
        t->position->setCoords(b, 0);
        // Labels of close boundaries go to the outer side of their lines.
        Qt::Alignment h = Qt::AlignHCenter;
        if (k + 1 < shown.size() && shown[k + 1] - b < 0.1 * span) h = Qt::AlignRight;
        else if (k > 0 && b - shown[k - 1] < 0.1 * span) h = Qt::AlignLeft;
        t->setPositionAlignment(Qt::AlignTop | h);
        t->setText(numberText(b));
        t->setFont(note);
        t->setColor(estuary::ink);
        t->setBrush(QBrush(QColor(255, 255, 255, 220)));
        t->setPadding(QMargins(3, 1, 3, 1));
        t->setSelectable(false);
        boundaryLabels_.push_back({t, b, h});
        drawnBoundaries_.push_back(b);
    }
}

// Boundaries beyond the axis: a note at that edge of the plot ("← boundary
// at −7.000, beyond the data"), so the axis need not stretch to show them.
void EffectPlot::drawBoundaryNotes() {
    const EffectPlotData& d = data_;
    QStringList left, right;
    for (double b : d.boundaries) {
        if (!std::isfinite(b)) continue;
        if (b < d.axis.first) left << numberText(b);
        else if (b > d.axis.second) right << numberText(b);
    }
    if (left.isEmpty() && right.isEmpty()) return;
    // In a row of their own over the plot area, so they never cover the curve:
    // the left-hand note at the left, the right-hand one at the right.
    noteRow_ = new QCPLayoutGrid;
    noteRow_->setColumnSpacing(12);
    QCPLayoutGrid* layout = plot_->plotLayout();
    int row = 0;
    while (row < layout->rowCount() && layout->element(row, 0) != plot_->axisRect()) ++row;
    layout->insertRow(row);
    layout->addElement(row, 0, noteRow_);
    layout->setRowStretchFactor(row, 0.001);
    // As wide as the plot area, not over the value axis's labels.
    noteRow_->setAutoMargins(QCP::msLeft | QCP::msRight);
    noteRow_->setMarginGroup(QCP::msLeft | QCP::msRight, noteMargins_);
    plot_->axisRect()->setMarginGroup(QCP::msLeft | QCP::msRight, noteMargins_);
    const auto note = [this](const QStringList& values, bool atLeft) {
        if (values.isEmpty()) return;
        const QString where = values.size() == 1
                                  ? tr("boundary at %1, beyond the data").arg(values.front())
                                  : tr("boundaries at %1, beyond the data").arg(values.join(tr(" and ")));
        const QString text = atLeft ? QStringLiteral("← ") + where : where + QStringLiteral(" →");
        auto* t = new QCPTextElement(plot_, text, smallFont(font(), 0.85));
        t->setObjectName(QString::fromLatin1(kSmallTextName));  // not a title: the plot's text size in an export
        t->setTextFlags((atLeft ? Qt::AlignLeft : Qt::AlignRight) | Qt::AlignVCenter);
        t->setTextColor(estuary::ink);
        t->setMargins(QMargins(0, 2, 0, 2));
        t->setSelectable(false);
        noteRow_->addElement(0, noteRow_->elementCount(), t);
        boundaryNotes_ << text;
    };
    note(left, true);
    note(right, false);
}

// Rug: ticks along the bottom edge (on the hidden right axis, range 0..1).
void EffectPlot::drawRug() {
    const EffectPlotData& d = data_;
    QCPGraph* rug = plot_->addGraph(plot_->xAxis, plot_->yAxis2);
    rug->removeFromLegend();
    rug->setLineStyle(QCPGraph::lsNone);
    QPainterPath tick;
    tick.moveTo(0, 0);
    tick.lineTo(0, -7);
    QColor c = estuary::ink;
    c.setAlphaF(d.rug.size() > 500 ? 0.35f : 0.6f);
    QPen pen(c);
    pen.setWidthF(1.0);
    rug->setScatterStyle(QCPScatterStyle(tick, pen, Qt::NoBrush, 6));
    rug->setAntialiasedScatters(false);
    QVector<double> k(static_cast<qsizetype>(d.rug.size())), v(static_cast<qsizetype>(d.rug.size()), 0.0);
    std::copy(d.rug.begin(), d.rug.end(), k.begin());
    rug->setData(k, v, true);
    rug->setSelectable(QCP::stNone);
}

void EffectPlot::buildGroups() {
    const EffectPlotData& d = data_;
    const int L = static_cast<int>(d.groupEffects.size());
    auto ticker = QSharedPointer<QCPAxisTickerText>(new QCPAxisTickerText);
    for (int k = 0; k < L; ++k)
        ticker->addTick(
            k, k < static_cast<int>(d.groupNames.size()) ? d.groupNames[static_cast<std::size_t>(k)] : QString());
    plot_->xAxis->setTicker(ticker);
    plot_->xAxis->setRange(-0.5, L - 0.5);
    double lo = 0, hi = 0;
    for (const auto& e : d.groupEffects) {
        lo = std::min(lo, e.ci_lower);
        hi = std::max(hi, e.ci_upper);
    }
    const double pad = 0.1 * (hi > lo ? hi - lo : 1.0);
    plot_->yAxis->setRange(lo - pad, hi + pad);
    setAxisTitle(plot_->xAxis, d.moderatorTitle);
    setAxisTitle(plot_->yAxis, d.effectTitle);

    plot_->setCurrentLayer(kShadingLayer);
    bool anySignificant = false, anyNotSignificant = false;
    for (int k = 0; k < L; ++k) {
        const auto& e = d.groupEffects[static_cast<std::size_t>(k)];
        const bool significant = e.ci_lower > 0 || e.ci_upper < 0;
        (significant ? anySignificant : anyNotSignificant) = true;
        spanRect(plot_, k - 0.42, k + 0.42,
                 significant ? estuary::significanceBrush(greyscale_) : estuary::notSignificantBrush());
    }
    plot_->setCurrentLayer(QStringLiteral("main"));
    for (int k = 0; k < L; ++k) {
        const auto& e = d.groupEffects[static_cast<std::size_t>(k)];
        QCPGraph* g = plot_->addGraph();
        g->setLineStyle(QCPGraph::lsNone);
        const QPen pen = estuary::seriesPen(k, 1.8, greyscale_);
        QPen solid = pen;
        solid.setStyle(Qt::SolidLine);
        g->setPen(solid);
        g->setScatterStyle(QCPScatterStyle(static_cast<QCPScatterStyle::ScatterShape>(estuary::markerShape(k)), solid,
                                           QBrush(Qt::white), 10));
        const auto& names = d.legendNames.empty() ? d.groupNames : d.legendNames;
        g->setName(k < static_cast<int>(names.size()) ? names[static_cast<std::size_t>(k)] : QString());
        g->setData(QVector<double>{double(k)}, QVector<double>{e.estimate});
        auto* bars = new QCPErrorBars(plot_->xAxis, plot_->yAxis);
        bars->removeFromLegend();
        bars->setDataPlottable(g);
        bars->setData(QVector<double>{e.estimate - e.ci_lower}, QVector<double>{e.ci_upper - e.estimate});
        bars->setPen(solid);
        bars->setWhiskerWidth(12);
        bars->setSelectable(QCP::stNone);
    }
    if (anySignificant) legendSwatch(plot_, tr("interval excludes zero"), estuary::significanceBrush(greyscale_));
    if (anyNotSignificant) legendSwatch(plot_, tr("not significant"), estuary::notSignificantBrush());
    QPen zeroPen(estuary::ink);
    auto* zero = new QCPItemStraightLine(plot_);
    zero->point1->setCoords(0, 0);
    zero->point2->setCoords(1, 0);
    zero->setPen(zeroPen);
    zero->setSelectable(false);
}

void EffectPlot::buildMoving() {
    plot_->setCurrentLayer(kMovingLayer);
    QPen handlePen(estuary::ink);
    handlePen.setWidthF(1.4);
    if (data_.groups) {
        groupHighlight_ = new QCPItemRect(plot_);
        for (QCPItemPosition* p : {groupHighlight_->topLeft, groupHighlight_->bottomRight}) {
            p->setTypeX(QCPItemPosition::ptPlotCoords);
            p->setTypeY(QCPItemPosition::ptAxisRectRatio);
        }
        QPen outline(estuary::withAlpha(estuary::ink, 0.55));
        outline.setWidthF(1.0);
        outline.setStyle(Qt::DashLine);
        groupHighlight_->setPen(outline);
        groupHighlight_->setBrush(estuary::withAlpha(estuary::ink, 0.06));
        groupHighlight_->setSelectable(false);
    } else {
        handle_ = new QCPItemLine(plot_);
        for (QCPItemPosition* p : {handle_->start, handle_->end}) {
            p->setTypeX(QCPItemPosition::ptPlotCoords);
            p->setTypeY(QCPItemPosition::ptAxisRectRatio);
        }
        handle_->setPen(handlePen);
        handle_->setSelectable(false);
    }
    whisker_ = new QCPItemLine(plot_);
    QPen whiskerPen(estuary::ink);
    whiskerPen.setWidthF(2.2);
    whisker_->setPen(whiskerPen);
    whisker_->setHead(QCPLineEnding(QCPLineEnding::esBar, 10));
    whisker_->setTail(QCPLineEnding(QCPLineEnding::esBar, 10));
    whisker_->setSelectable(false);
    knob_ = new QCPItemTracer(plot_);
    knob_->setStyle(QCPItemTracer::tsCircle);
    knob_->setSize(12);
    QPen knobPen(Qt::white);
    knobPen.setWidthF(2.0);
    knob_->setPen(knobPen);
    knob_->setBrush(estuary::ink);
    knob_->setSelectable(false);
    handleLabel_ = new QCPItemText(plot_);
    handleLabel_->position->setTypeX(QCPItemPosition::ptPlotCoords);
    handleLabel_->position->setTypeY(QCPItemPosition::ptAxisRectRatio);
    handleLabel_->setFont(smallFont(font(), 0.95));
    handleLabel_->setColor(Qt::white);
    handleLabel_->setBrush(estuary::ink);
    handleLabel_->setPadding(QMargins(5, 2, 5, 2));
    handleLabel_->setSelectable(false);
    plot_->setCurrentLayer(QStringLiteral("main"));
}

void EffectPlot::setCurrent(double m, const EffectPoint& at, bool replot) {
    current_ = m;
    currentPoint_ = at;
    if (!knob_ || !hasData_) return;
    // An export shows the slider only when asked to, and then says what it is.
    const bool shown = !exporting_ || markSlider_;
    if (data_.groups) {
        groupHighlight_->topLeft->setCoords(m - 0.45, 0.0);
        groupHighlight_->bottomRight->setCoords(m + 0.45, 1.0);
        groupHighlight_->setVisible(shown);
    } else {
        handle_->start->setCoords(m, 0.0);
        handle_->end->setCoords(m, 1.0);
        handle_->setVisible(shown);
    }
    // No estimate yet (recomputed when the drag ends): the handle moves alone.
    // Groups: the group's own marker and interval are the estimate; the frame marks the choice.
    const bool known = shown && std::isfinite(at.estimate) && !data_.groups;
    whisker_->setVisible(known && std::isfinite(at.ci_lower) && std::isfinite(at.ci_upper));
    knob_->setVisible(known);
    if (known) {
        whisker_->start->setCoords(m, at.ci_lower);
        whisker_->end->setCoords(m, at.ci_upper);
        knob_->position->setCoords(m, at.estimate);
    }
    const std::size_t k = static_cast<std::size_t>(std::max(0L, std::lround(m)));
    QString value = data_.groups ? (k < data_.groupNames.size() ? data_.groupNames[k] : QString()) : numberText(m);
    if (exporting_) value = QStringLiteral("%1 = %2").arg(data_.moderatorTitle, value);
    if (!data_.groups && at.beyond_data) value += tr("  beyond the data");
    handleLabel_->setText(value);
    handleLabel_->setVisible(shown);
    handleLabel_->position->setCoords(m, 0.0);
    alignHandleLabel();
    if (replot) movingLayer()->replot();
}

void EffectPlot::alignHandleLabel() {
    if (!handleLabel_) return;
    const QRect r = plot_->axisRect()->rect();
    const double px = plot_->xAxis->coordToPixel(current_);
    const double half = 0.5 * boxSize(handleLabel_).width();
    Qt::Alignment h = Qt::AlignHCenter;
    if (r.width() > 0) {
        if (px - r.left() < half + 2) h = Qt::AlignLeft;
        else if (r.right() - px < half + 2) h = Qt::AlignRight;
    }
    handleLabel_->setPositionAlignment(Qt::AlignTop | h);
}

void EffectPlot::placeLabels() {
    alignHandleLabel();
    const QRect r = plot_->axisRect()->rect();
    if (r.width() <= 0) return;
    QCPAxis* x = plot_->xAxis;
    // A note wider than its strip goes against the plot area's outer edge.
    for (const BeyondNote& n : beyondNotes_) {
        const double half = 0.5 * boxSize(n.item).width(), mid = 0.5 * (n.from + n.to), px = x->coordToPixel(mid);
        Qt::Alignment h = Qt::AlignHCenter;
        double at = mid;
        if (px - half < r.left()) {
            h = Qt::AlignLeft;
            at = x->pixelToCoord(r.left());
        } else if (px + half > r.right()) {
            h = Qt::AlignRight;
            at = x->pixelToCoord(r.right());
        }
        // At the bottom (over the rug), else the middle or the top: wherever it covers least of
        // the curve, its band and the zero line.
        const double w = boxSize(n.item).width() + 4, hgt = boxSize(n.item).height() + 10;
        const double left = h == Qt::AlignLeft ? r.left() : h == Qt::AlignRight ? r.right() - w : px - 0.5 * w;
        const auto drawn = curvePixels(left, left + w);
        const double zero = plot_->yAxis->coordToPixel(0);
        const auto covered = [&](double top) {
            return overlap(top, top + hgt, drawn) + 4 * overlap(top, top + hgt, {zero - 2, zero + 2});
        };
        const double place[] = {r.bottom() - hgt, r.center().y() - 0.5 * hgt, static_cast<double>(r.top())};
        int best = 0;
        for (int k = 1; k < 3; ++k)
            if (covered(place[k]) < covered(place[best])) best = k;
        const Qt::Alignment v[] = {Qt::AlignBottom, Qt::AlignVCenter, Qt::AlignTop};
        n.item->position->setCoords(at, best == 0 ? 1.0 : best == 1 ? 0.5 : 0.0);
        n.item->setPositionAlignment(v[best] | h);
        n.item->setPadding(best == 0 ? QMargins(2, 2, 2, 12) : QMargins(2, 4, 2, 4));
    }
    // A boundary label that would cross the edge goes to the inner side of its line.
    for (const BoundaryLabel& b : boundaryLabels_) {
        const double w = boxSize(b.item).width(), px = x->coordToPixel(b.value);
        const double left = b.side == Qt::AlignLeft ? px : b.side == Qt::AlignRight ? px - w : px - 0.5 * w;
        Qt::Alignment h = b.side;
        if (left < r.left()) h = Qt::AlignLeft;
        else if (left + w > r.right()) h = Qt::AlignRight;
        b.item->setPositionAlignment(Qt::AlignTop | h);
    }
}

// The pixel rows the curve and its band cover between two pixel columns (top, bottom); an empty span (+∞, −∞)
// where nothing is drawn.
std::pair<double, double> EffectPlot::curvePixels(double fromPx, double toPx) const {
    double top = std::numeric_limits<double>::infinity(), bottom = -top;
    const double a = plot_->xAxis->pixelToCoord(fromPx), b = plot_->xAxis->pixelToCoord(toPx);
    for (const CurvePoint& p : data_.curve) {
        if (p.x < std::min(a, b) || p.x > std::max(a, b)) continue;
        for (double v : {p.estimate, p.lower, p.upper}) {
            if (!std::isfinite(v)) continue;
            const double py = plot_->yAxis->coordToPixel(v);
            top = std::min(top, py);
            bottom = std::max(bottom, py);
        }
    }
    return {top, bottom};
}

double EffectPlot::valueAtPixel(double px) const { return plot_->xAxis->pixelToCoord(px); }
double EffectPlot::pixelOfValue(double m) const { return plot_->xAxis->coordToPixel(m); }
int EffectPlot::plotAreaMiddleY() const { return plot_->axisRect()->rect().center().y(); }

double EffectPlot::snap(double m) const {
    if (data_.groups) {
        const double last = std::max(0.0, static_cast<double>(data_.groupEffects.size()) - 1);
        return std::clamp(std::round(m), 0.0, last);
    }
    return std::clamp(m, data_.axis.first, data_.axis.second);
}

void EffectPlot::onPress(QMouseEvent* e) {
    if (!hasData_ || e->button() != Qt::LeftButton) return;
    if (!plot_->axisRect()->rect().adjusted(-6, -6, 6, 6).contains(e->pos())) return;
    dragging_ = true;
    Q_EMIT dragStarted();
    Q_EMIT valueDragged(snap(valueAtPixel(e->pos().x())));
}

void EffectPlot::onMove(QMouseEvent* e) {
    if (dragging_) {
        const double m = snap(valueAtPixel(e->pos().x()));
        if (m != current_) Q_EMIT valueDragged(m);
        return;
    }
    if (!hasData_) return;
    const QRect r = plot_->axisRect()->rect();
    if (!r.contains(e->pos())) plot_->unsetCursor();
    else if (std::abs(e->pos().x() - pixelOfValue(current_)) < 8) plot_->setCursor(Qt::SplitHCursor);
    else plot_->setCursor(Qt::PointingHandCursor);
}

void EffectPlot::onRelease(QMouseEvent* e) {
    if (!dragging_) return;
    const double m = snap(valueAtPixel(e->pos().x()));
    if (m != current_) Q_EMIT valueDragged(m);
    dragging_ = false;
    Q_EMIT dragFinished(current_);
}

}  // namespace moderato::ui
