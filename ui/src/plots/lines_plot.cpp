#include "plots/lines_plot.hpp"

#include <qcustomplot.h>
#include <QFontMetricsF>
#include <QResizeEvent>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

#include "plots/plot_style.hpp"
#include "plots/probe_plot_util.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

QColor seriesColour(int k, bool grey) { return grey ? estuary::toGrey(estuary::series(k)) : estuary::series(k); }

}  // namespace

LinesPlot::LinesPlot(QWidget* parent) : QWidget(parent), plot_(new QCustomPlot(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
    plot_->setObjectName(QStringLiteral("lines-plot"));
    stylePlot(plot_, font());
    setUpProbePlot(plot_);
    setMinimumHeight(200);
    connect(plot_, &QCustomPlot::afterLayout, this, &LinesPlot::placeCrossingNames);
    connect(plot_, &QCustomPlot::afterLayout, this, &LinesPlot::placeDifferRows);
}

// After every layout (an export's too): a pair's name that would cross the
// plot area's edge goes to the inner side of its leader (left or right), or
// to the other end of it (above or below).
void LinesPlot::placeCrossingNames() {
    const QRect r = plot_->axisRect()->rect();
    if (r.width() <= 0) return;
    for (const auto& [name, leader, preferAbove] : crossingNames_) {
        const QFontMetricsF fm(name->font());
        const QMargins pad = name->padding();
        const double w = fm.horizontalAdvance(name->text()) + pad.left() + pad.right();
        const double h = fm.height() + pad.top() + pad.bottom();
        const QPointF at = leader->start->pixelPosition();
        Qt::Alignment side = Qt::AlignHCenter;
        if (at.x() - 0.5 * w < r.left()) side = Qt::AlignLeft;
        else if (at.x() + 0.5 * w > r.right()) side = Qt::AlignRight;
        // From the side it was placed on each time, so every layout of the
        // same size places it alike (the workbench's export and the renderer's).
        bool above = preferAbove;
        if (above && at.y() - 14 - h < r.top()) above = false;
        else if (!above && at.y() + 14 + h > r.bottom()) above = true;
        leader->end->setCoords(0, above ? -14 : 14);
        name->setPositionAlignment((above ? Qt::AlignBottom : Qt::AlignTop) | side);
    }
}

QCPLayer* LinesPlot::movingLayer() const { return plot_->layer(kMovingLayer); }

void LinesPlot::setData(const LinesPlotData& data) {
    data_ = data;
    hasData_ = true;
    rebuild();
}

void LinesPlot::clear() {
    data_ = {};
    hasData_ = false;
    highlight_.clear();
    rebuild();
}

void LinesPlot::setGreyscale(bool on) {
    greyscale_ = on;
    rebuild();
}

void LinesPlot::resizeEvent(QResizeEvent* event) {
    QWidget::resizeEvent(event);
    if (hasData_ && fitLegend(plot_)) plot_->replot();
}

void LinesPlot::drawPoints() {
    pointsMode_ = 0;
    jittered_ = false;
    if (!data_.showPoints || !data_.points || data_.points->rows == 0) return;
    const LinesPoints& p = *data_.points;
    if (p.binned) {
        drawPointMaps(p);
        return;
    }
    pointsMode_ = 1;
    // Fewer points, more opaque: about 0.57 at 200 rows, 0.18 at 2,000, 0.1 from 6,400.
    const double alpha = std::clamp(8.0 / std::sqrt(static_cast<double>(p.rows)), 0.1, 0.6);
    jittered_ = data_.jitter && discreteFocal(p);
    const double width = jittered_ ? jitterWidth(p) : 0.0;
    for (int g = 0; g < p.groups; ++g) {
        const auto& xs =
            jittered_ ? jittered(p.x[static_cast<std::size_t>(g)], g, width) : p.x[static_cast<std::size_t>(g)];
        const auto& ys = p.y[static_cast<std::size_t>(g)];
        QCPGraph* graph = plot_->addGraph();
        graph->setLineStyle(QCPGraph::lsNone);
        graph->setScatterStyle(
            QCPScatterStyle(QCPScatterStyle::ssDisc, estuary::withAlpha(pointColour(g), alpha), 4.5));
        graph->setData(QVector<double>(xs.begin(), xs.end()),
                       QVector<double>(ys.begin(), ys.end()));  // QCPGraph sorts them by x
        graph->setAntialiasedScatters(p.rows <= 5000);
        graph->setSelectable(QCP::stNone);
        if (data_.pointsByGroup || g > 0) graph->removeFromLegend();
        else graph->setName(jittered_ ? tr("observed rows (spread sideways)") : tr("observed rows"));
    }
    // The points spread past the end values stay in view.
    if (jittered_) {
        const QCPRange r = plot_->xAxis->range();
        plot_->xAxis->setRange(std::min(r.lower, p.xRange.first - 1.2 * width),
                               std::max(r.upper, p.xRange.second + 1.2 * width));
    }
}

// Binned points: a grid of counts per group, drawn as translucent colour maps
// (log scale of the count; empty cells transparent).
void LinesPlot::drawPointMaps(const LinesPoints& p) {
    pointsMode_ = 2;
    constexpr int bx = LinesPoints::kBinsX, by = LinesPoints::kBinsY;
    for (int g = 0; g < p.groups; ++g) {
        const auto& c = p.counts[static_cast<std::size_t>(g)];
        const int most = *std::max_element(c.begin(), c.end());
        if (most == 0) continue;
        auto* map = new QCPColorMap(plot_->xAxis, plot_->yAxis);
        map->data()->setSize(bx, by);
        map->data()->setRange(QCPRange(p.xRange.first, p.xRange.second), QCPRange(p.yRange.first, p.yRange.second));
        for (int j = 0; j < by; ++j)
            for (int i = 0; i < bx; ++i) {
                const int k = c[static_cast<std::size_t>(j * bx + i)];
                map->data()->setCell(i, j, k > 0 ? static_cast<double>(k) : std::nan(""));
            }
        QCPColorGradient gradient;
        gradient.clearColorStops();
        gradient.setColorStopAt(0.0, estuary::withAlpha(pointColour(g), 0.12));
        gradient.setColorStopAt(1.0, estuary::withAlpha(pointColour(g), 0.75));
        gradient.setNanHandling(QCPColorGradient::nhTransparent);
        map->setGradient(gradient);
        map->setDataScaleType(QCPAxis::stLogarithmic);
        map->setDataRange(QCPRange(1.0, std::max(2.0, static_cast<double>(most))));
        map->setInterpolate(false);
        map->setSelectable(QCP::stNone);
        map->removeFromLegend();
    }
    // A colour map's own legend icon is a tiny copy of the map: a swatch reads better.
    if (!data_.pointsByGroup) {
        auto* swatch = new QCPBars(plot_->xAxis, plot_->yAxis);
        swatch->setName(tr("observed rows (binned counts)"));
        swatch->setBrush(estuary::withAlpha(estuary::ink, 0.45));
        swatch->setPen(Qt::NoPen);
        swatch->setSelectable(QCP::stNone);
    }
}

QColor LinesPlot::pointColour(int group) const {
    return data_.pointsByGroup ? seriesColour(group, greyscale_) : estuary::ink;
}

void LinesPlot::rebuild() {
    plot_->clearItems();
    plot_->clearPlottables();
    highlightLine_ = highlightBand_ = nullptr;
    crossoverMarkers_ = 0;
    crossingNames_.clear();
    differStrips_.clear();
    differStripRows_.clear();
    differRowLabels_.clear();
    differRects_.clear();
    differNames_.clear();
    pointsMode_ = 0;
    if (!hasData_) {
        plot_->replot();
        return;
    }
    const LinesPlotData& d = data_;
    plot_->xAxis->setRange(d.xRange.first, d.xRange.second);
    setAxisTitle(plot_->xAxis, d.focalTitle);
    setAxisTitle(plot_->yAxis, d.outcomeTitle);
    fitValueRange();

    plot_->setCurrentLayer(QStringLiteral("main"));
    drawPoints();
    drawLines();
    drawCrossings();
    if (!d.differName.isEmpty()) drawDifferStrips();
    drawHighlightLayer();
    fitLegend(plot_);
    plot_->replot();
}

// The value axis covers every band, the slider's line at both ends, and the
// points, with a margin that stays inside yBounds.
void LinesPlot::fitValueRange() {
    const LinesPlotData& d = data_;
    double ylo = std::numeric_limits<double>::infinity(), yhi = -ylo;
    auto take = [&](double v) {
        if (std::isfinite(v)) {
            ylo = std::min(ylo, v);
            yhi = std::max(yhi, v);
        }
    };
    for (const auto& l : d.lines)
        for (const auto& p : l.points) {
            take(p.lower);
            take(p.upper);
        }
    for (const auto& p : d.yExtent) {
        take(p.lower);
        take(p.upper);
    }
    for (const auto& l : d.groupLines)
        for (const auto& p : l) take(p.estimate);
    if (d.showPoints && d.points && d.points->rows > 0) {
        take(d.points->yRange.first);
        take(d.points->yRange.second);
    }
    // What is drawn spans lo to hi; the margin (or the room around a single value) comes on top.
    double lo = ylo, hi = yhi;
    if (!(yhi > ylo)) {
        lo = hi = std::isfinite(ylo) ? ylo : 0;
        ylo = lo - 1;
        yhi = lo + 1;
    } else {
        const double pad = 0.05 * (yhi - ylo);
        ylo -= pad;
        yhi += pad;
    }
    // The margin never reaches values the outcome cannot take (a negative
    // count, a probability above 1); a line that does sets the edge itself.
    const auto [least, most] = d.yBounds;
    ylo = lo >= least ? std::max(ylo, least) : lo;
    yhi = hi <= most ? std::min(yhi, most) : hi;
    plot_->yAxis->setRange(ylo, yhi);
}

// Thin, faint lines in the ink colour, one legend entry for them all.
void LinesPlot::drawGroupLines() {
    QColor ink = estuary::ink;
    ink.setAlphaF(0.28f);
    QPen pen(ink);
    pen.setWidthF(0.9);
    for (std::size_t k = 0; k < data_.groupLines.size(); ++k) {
        QCPGraph* g = plot_->addGraph();
        g->setPen(pen);
        g->setSelectable(QCP::stNone);
        setLineData(g, data_.groupLines[k]);
        if (k == 0) g->setName(data_.groupLinesName);
        else g->removeFromLegend();
    }
}

void LinesPlot::drawLines() {
    const LinesPlotData& d = data_;
    if (!d.groupLines.empty()) drawGroupLines();
    // Bands first (under every line), then the lines.
    for (const auto& l : d.lines) addBand(plot_, l.points, estuary::bandBrush(l.series, greyscale_));
    for (const auto& l : d.lines) {
        QCPGraph* g = plot_->addGraph();
        g->setName(l.name);
        g->setPen(estuary::seriesPen(l.series, 2.0, greyscale_));
        QPen markerPen = estuary::seriesPen(l.series, 1.6, greyscale_);
        markerPen.setStyle(Qt::SolidLine);
        g->setScatterStyle(QCPScatterStyle(static_cast<QCPScatterStyle::ScatterShape>(estuary::markerShape(l.series)),
                                           markerPen, QBrush(Qt::white), 8));
        // Markers at the start, middle and end of a line of 2k + 1 points.
        if (l.points.size() > 2) g->setScatterSkip(static_cast<int>((l.points.size() - 1) / 2) - 1);
        g->setSelectable(QCP::stNone);
        setLineData(g, l.points);
    }
}

void LinesPlot::drawCrossings() {
    const LinesPlotData& d = data_;
    // Crossover points inside the data: hollow diamond, interval as a bracket.
    for (const auto& c : d.crossings) {
        QPen ink(estuary::ink);
        ink.setWidthF(1.5);
        if (c.bounded) {
            auto* bracket = new QCPItemLine(plot_);
            bracket->start->setCoords(c.lower, c.y);
            bracket->end->setCoords(c.upper, c.y);
            bracket->setHead(QCPLineEnding(QCPLineEnding::esBar, 12));
            bracket->setTail(QCPLineEnding(QCPLineEnding::esBar, 12));
            bracket->setPen(ink);
        } else {
            auto* t = new QCPItemText(plot_);
            t->position->setCoords(c.x, c.y);
            t->setPositionAlignment(Qt::AlignTop | Qt::AlignHCenter);
            t->setPadding(QMargins(2, 10, 2, 2));
            t->setText(tr("interval unbounded"));
            t->setColor(estuary::ink);
            t->setFont(font());
        }
        if (!c.label.isEmpty()) {  // several pairs: say which two lines meet, above and below in turn
            const bool above = crossoverMarkers_ % 2 == 0;
            // A short leader from the diamond; the name sits at its far end, a fixed number of pixels away.
            auto* leader = new QCPItemLine(plot_);
            leader->start->setCoords(c.x, c.y);
            leader->end->setParentAnchor(leader->start);
            leader->end->setCoords(0, above ? -14 : 14);
            QPen thin(estuary::ink);
            thin.setWidthF(0.8);
            leader->setPen(thin);
            leader->setSelectable(false);
            auto* name = new QCPItemText(plot_);
            name->position->setParentAnchor(leader->end);
            name->position->setCoords(0, 0);
            name->setPositionAlignment((above ? Qt::AlignBottom : Qt::AlignTop) | Qt::AlignHCenter);
            name->setPadding(QMargins(3, 1, 3, 1));
            name->setBrush(QBrush(estuary::withAlpha(Qt::white, 0.85)));
            name->setText(c.label);
            name->setColor(estuary::ink);
            name->setFont(font());
            name->setSelectable(false);
            crossingNames_.push_back({name, leader, above});
        }
        QCPGraph* diamond = plot_->addGraph();
        diamond->setLineStyle(QCPGraph::lsNone);
        diamond->setPen(ink);
        diamond->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssDiamond, ink, QBrush(Qt::white), 13));
        diamond->setData(QVector<double>{c.x}, QVector<double>{c.y});
        diamond->setSelectable(QCP::stNone);
        if (crossoverMarkers_ == 0) diamond->setName(d.crossingName);
        else diamond->removeFromLegend();
        ++crossoverMarkers_;
    }
}

void LinesPlot::drawDifferStrips() {
    const LinesPlotData& d = data_;
    // Where the groups differ: thin strips along the bottom edge, under the grid.
    plot_->setCurrentLayer(kShadingLayer);
    const QBrush brush = estuary::significanceBrush(greyscale_);
    // A fine outline in the same colour, so the thin strip shows without shouting.
    QPen edge(estuary::withAlpha(greyscale_ ? estuary::toGrey(estuary::series(0)) : estuary::series(0), 0.55));
    edge.setWidthF(1.0);
    const bool any = std::any_of(d.differ.begin(), d.differ.end(), [&](const LinesPlotData::DifferRow& r) {
        return std::any_of(r.spans.begin(), r.spans.end(), [&](const auto& s) {
            return std::min(s.second, d.xRange.second) > std::max(s.first, d.xRange.first);
        });
    });
    // Several pairs: every row is drawn and named, so a pair that differs nowhere shows as an empty row.
    if (any) {
        // An unseen line along the bottom edge: rows hang their pixel offsets on its left end.
        auto* base = new QCPItemLine(plot_);
        for (auto* end : {base->start, base->end}) {
            end->setType(QCPItemPosition::ptAxisRectRatio);
            end->setCoords(end == base->start ? 0 : 1, 1);
        }
        base->setPen(Qt::NoPen);
        base->setSelectable(false);
        for (std::size_t r = 0; r < d.differ.size(); ++r)
            drawDifferRow(d.differ[r], static_cast<int>(r), base->start, brush, edge);
    }
    plot_->setCurrentLayer(QStringLiteral("main"));
    if (!differStrips_.empty()) {
        auto* swatch = new QCPBars(plot_->xAxis, plot_->yAxis);
        swatch->setName(d.differName);
        swatch->setBrush(brush);
        swatch->setPen(edge);
        swatch->setSelectable(QCP::stNone);
    }
}

void LinesPlot::drawDifferRow(const LinesPlotData::DifferRow& row, int index, QCPItemPosition* base,
                              const QBrush& brush, const QPen& edge) {
    const LinesPlotData& d = data_;
    // The rows' heights and places follow the names' font: placeDifferRows().
    for (const auto& [a, b] : row.spans) {
        const double from = std::max(a, d.xRange.first), to = std::min(b, d.xRange.second);
        if (!(to > from)) continue;
        auto* strip = new QCPItemRect(plot_);
        // x in the focal predictor's units; y in pixels above the bottom edge.
        for (QCPItemPosition* corner : {strip->topLeft, strip->bottomRight}) {
            corner->setTypeX(QCPItemPosition::ptPlotCoords);
            corner->setParentAnchorY(base);
            corner->setTypeY(QCPItemPosition::ptAbsolute);
        }
        strip->topLeft->setCoords(from, 0);
        strip->bottomRight->setCoords(to, 0);
        strip->setBrush(brush);
        strip->setPen(edge);
        strip->setSelectable(false);
        differStrips_.emplace_back(from, to);
        differStripRows_.push_back(index);
        differRects_.push_back(strip);
    }
    if (row.label.isEmpty()) return;
    auto* name = new QCPItemText(plot_);
    name->position->setParentAnchor(base);
    name->setPositionAlignment(Qt::AlignLeft | Qt::AlignVCenter);
    name->setPadding(QMargins(0, 0, 0, 0));
    QFont small = font();
    small.setPointSizeF(small.pointSizeF() * kSmallTextScale);
    name->setFont(small);
    name->setObjectName(QString::fromLatin1(kSmallTextName));
    name->setColor(estuary::ink);
    name->setText(row.label);
    name->setSelectable(false);
    differRowLabels_ << row.label;
    differNames_.emplace_back(name, index);
}

// After every layout (an export's too, whose font is larger): each row of
// strips is tall enough for the names, stacked up from the bottom edge.
void LinesPlot::placeDifferRows() {
    const bool named = !differNames_.empty();
    // A named row: the name's line and two pixels above and below, rows 3 pixels apart, the
    // first clear of the axis line (a name's descenders are not cut at the plot area's edge).
    int height = kDifferStripHeight, base = 0;
    if (named) {
        height = static_cast<int>(std::ceil(QFontMetricsF(differNames_.front().first->font()).height())) + 4;
        base = 2;
    }
    const int pitch = std::max(kDifferRowPitch, height + 3);
    differRowPitch_ = pitch;
    for (std::size_t i = 0; i < differRects_.size(); ++i) {
        const int lift = base + differStripRows_[i] * pitch;
        QCPItemRect* r = differRects_[i];
        r->topLeft->setCoords(r->topLeft->coords().x(), -height - lift);
        r->bottomRight->setCoords(r->bottomRight->coords().x(), -lift);
    }
    for (const auto& [name, row] : differNames_) name->position->setCoords(4, -base - row * pitch - height / 2.0);
}

void LinesPlot::drawHighlightLayer() {
    const LinesPlotData& d = data_;
    // The slider's line, on the moving layer.
    plot_->setCurrentLayer(kMovingLayer);
    highlightBand_ = addBand(plot_, {}, QBrush(estuary::withAlpha(estuary::ink, 0.10)));
    highlightLine_ = plot_->addGraph();
    highlightLine_->setSelectable(QCP::stNone);
    if (d.highlightName.isEmpty()) highlightLine_->removeFromLegend();
    highlightLine_->setName(d.highlightName);
    plot_->setCurrentLayer(QStringLiteral("main"));
    setHighlight(highlight_, highlightSeries_, false);
}

void LinesPlot::setHighlight(const std::vector<CurvePoint>& points, int series, bool replot, const QString& mark) {
    highlight_ = points;
    highlightSeries_ = series;
    if (!mark.isEmpty()) highlightMark_ = mark;
    if (!highlightLine_) return;
    QPen pen;
    if (series < 0) {
        pen = QPen(estuary::ink);
        pen.setWidthF(2.6);
        highlightBand_->setBrush(QBrush(estuary::withAlpha(estuary::ink, 0.10)));
    } else {
        pen = estuary::seriesPen(series, 3.6, greyscale_);
        highlightBand_->setBrush(Qt::NoBrush);
    }
    highlightLine_->setPen(pen);
    setBandData(highlightBand_, series < 0 ? points : std::vector<CurvePoint>{});
    setLineData(highlightLine_, points);
    applySliderMark();
    if (replot) movingLayer()->replot();
}

void LinesPlot::setExportLook(bool exporting, bool markSlider) {
    exporting_ = exporting;
    markSlider_ = markSlider;
    applySliderMark();
    if (!exporting && hasData_) fitLegend(plot_);  // the legend entry may be back
}

bool LinesPlot::sliderLineShown() const { return highlightLine_ && highlightLine_->visible(); }

QString LinesPlot::sliderLineLegendName() const {
    return highlightLine_ && plot_->legend->hasItemWithPlottable(highlightLine_) ? highlightLine_->name() : QString();
}

void LinesPlot::applySliderMark() {
    if (!highlightLine_) return;
    const bool shown = !exporting_ || markSlider_;
    highlightLine_->setVisible(shown);
    highlightBand_->setVisible(shown);
    // Live: "at the slider's value" (groups: no entry, the line is a group's
    // own drawn bolder). A marked export names the value it shows.
    QString name = data_.highlightName;
    if (exporting_) {
        const QString mark = highlightMark_.isEmpty() ? data_.highlightName : highlightMark_;
        name = !shown ? QString() : highlightSeries_ >= 0 ? tr("%1 (marked)").arg(mark) : mark;
    }
    const bool listed = plot_->legend->hasItemWithPlottable(highlightLine_);
    if (name.isEmpty() && listed) highlightLine_->removeFromLegend();
    highlightLine_->setName(name);
    if (!name.isEmpty() && !listed) highlightLine_->addToLegend();
}

}  // namespace moderato::ui
