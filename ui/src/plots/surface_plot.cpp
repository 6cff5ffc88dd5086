#include "plots/surface_plot.hpp"

#include <qcustomplot.h>
#include <QVBoxLayout>
#include <algorithm>

#include "common/scale_words.hpp"
#include "moderato/support/error.hpp"
#include "plots/plot_style.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

// What lies beyond the data keeps a trace of its colour under the "beyond"
// wash (about a quarter, as 60 of 255).
constexpr double kWashAlpha = 1.0 - 60.0 / 255.0;

// The wash over everything in the plot area outside the data's hull: one
// filled path (the area, minus the hull polygon), so its edge follows the
// hull smoothly at any size rather than the grid's cells.
class BeyondMask : public QCPAbstractItem {
public:
    BeyondMask(QCustomPlot* plot, const DataRegion& hull, const QBrush& brush)
        : QCPAbstractItem(plot), hull_(hull), brush_(brush) {
        setSelectable(false);
    }
    double selectTest(const QPointF&, bool, QVariant*) const override { return -1; }
    const QBrush& brush() const { return brush_; }

protected:
    void draw(QCPPainter* painter) override {
        QCPAxis* x = parentPlot()->xAxis;
        QCPAxis* z = parentPlot()->yAxis;
        QPolygonF hull;
        for (std::size_t i = 0; i < hull_.x.size(); ++i)
            hull << QPointF(x->coordToPixel(hull_.x[i]), z->coordToPixel(hull_.z[i]));
        QPainterPath path;
        path.setFillRule(Qt::OddEvenFill);
        path.addRect(QRectF(clipRect()));
        path.addPolygon(hull);
        path.closeSubpath();
        painter->setPen(Qt::NoPen);
        painter->setBrush(brush_);
        painter->drawPath(path);
    }

private:
    DataRegion hull_;
    QBrush brush_;
};

void styleScaleAxis(QCPAxis* axis, const QFont& font) {
    QPen pen(estuary::ink);
    axis->setBasePen(pen);
    axis->setTickPen(pen);
    axis->setSubTickPen(pen);
    axis->setTickLabelColor(estuary::ink);
    axis->setLabelColor(estuary::ink);
    axis->setTickLabelFont(font);
    axis->setLabelFont(font);
    axis->setTicker(numberTicker());
}

}  // namespace

QCPColorGradient SurfacePlot::ramp(bool greyscale) {
    QCPColorGradient g;
    g.clearColorStops();
    if (greyscale) {
        g.setColorStopAt(0.0, QColor(0xF7, 0xF7, 0xF7));
        g.setColorStopAt(0.55, estuary::toGrey(estuary::series(0)));
        g.setColorStopAt(1.0, estuary::toGrey(estuary::ink));
    } else {
        // near-white -> series 1 (#1F6F8B) -> ink (#1F2A44): one hue, light to dark
        g.setColorStopAt(0.0, QColor(0xF5, 0xF9, 0xFA));
        g.setColorStopAt(0.55, estuary::series(0));
        g.setColorStopAt(1.0, estuary::ink);
    }
    g.setColorInterpolation(QCPColorGradient::ciRGB);
    g.setLevelCount(256);
    g.setPeriodic(false);
    return g;
}

SurfacePlot::SurfacePlot(QWidget* parent) : QWidget(parent), plot_(new QCustomPlot(this)) {
    setObjectName(QStringLiteral("surface-plot"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
    stylePlot(plot_, font());
    plot_->axisRect()->setBackground(QBrush(estuary::beyond));
    plot_->xAxis->grid()->setVisible(false);
    plot_->yAxis->grid()->setVisible(false);
    plot_->xAxis2->setVisible(true);
    plot_->yAxis2->setVisible(true);
    plot_->xAxis2->setTickLabels(false);
    plot_->yAxis2->setTickLabels(false);
    connect(plot_->xAxis, qOverload<const QCPRange&>(&QCPAxis::rangeChanged), plot_->xAxis2,
            qOverload<const QCPRange&>(&QCPAxis::setRange));
    connect(plot_->yAxis, qOverload<const QCPRange&>(&QCPAxis::rangeChanged), plot_->yAxis2,
            qOverload<const QCPRange&>(&QCPAxis::setRange));
    for (QCPAxis* a : {plot_->xAxis2, plot_->yAxis2}) {
        a->setBasePen(QPen(estuary::ink));
        a->setTickPen(QPen(estuary::ink));
        a->setSubTickPen(QPen(estuary::ink));
    }

    // One column: the title, the map beside its colour scale, the legend; so
    // the title and the legend have the figure's whole width.
    QCPLayoutGrid* top = plot_->plotLayout();
    QCPAxisRect* rect = plot_->axisRect();
    top->take(rect);
    top->simplify();
    title_ = new QCPTextElement(plot_, QString(), font());
    title_->setTextColor(estuary::ink);
    top->addElement(0, 0, title_);
    auto* body = new QCPLayoutGrid;
    top->addElement(1, 0, body);
    body->addElement(0, 0, rect);
    scale_ = new QCPColorScale(plot_);
    scale_->setType(QCPAxis::atRight);
    scale_->setBarWidth(12);
    styleScaleAxis(scale_->axis(), font());
    body->addElement(0, 1, scale_);
    auto* group = new QCPMarginGroup(plot_);
    plot_->axisRect()->setMarginGroup(QCP::msBottom | QCP::msTop, group);
    scale_->setMarginGroup(QCP::msBottom | QCP::msTop, group);
    scale_->setVisible(false);
    // The legend (edge of the data, beyond the data) in a row under the plot.
    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(2, 0, legendRow);
    legendRow->addElement(0, 0, plot_->legend);
    legendRow->setMargins(QMargins(0, 0, 0, 4));
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setBorderPen(Qt::NoPen);
    plot_->legend->setVisible(false);
    plot_->plotLayout()->setRowStretchFactor(2, 0.001);
}

QString SurfacePlot::subtitle() const {
    if (!grid_) return {};
    if (compact_) return tr("others at means / reference levels");
    QString what;
    if (probability_ && family_ == Family::Logistic)
        what = tr("Predicted probability that %1 = 1 (inverse logit of the log-odds)").arg(outcome_);
    else if (family_ == Family::Logistic) what = tr("Predicted log-odds that %1 = 1").arg(outcome_);
    else what = tr("Predicted %1").arg(probability_ ? words_.outcomeOf : words_.modelOf);
    return what + tr("; other predictors at their means or reference levels");
}

void SurfacePlot::setRun(const Analysis& analysis, const AnalysisRun& run, const DataRegion* region,
                         std::shared_ptr<const SurfacePoints> points) {
    if (!run.surface) {
        clear();
        return;
    }
    grid_ = *run.surface;
    probability_ = generalized(run.fit.family) && analysis.probe.scale == ProbeScale::Outcome;
    values_ = probability_ ? surface_probabilities(*grid_, run.fit.family) : grid_->predicted;
    outcome_ = QString::fromStdString(analysis.roles.outcome);
    words_ = scaleWords(run.fit.family, run.fit.exposure, outcome_);
    family_ = run.fit.family;
    try {
        region_ = region ? *region : data_region(run.design, grid_->x, grid_->z);
    } catch (const InputError&) {
        region_ = {};
    }
    points_.reset();
    // The observed rows only when the analysis shows data points (as the Lines plot does).
    if (analysis.probe.show_points)
        points_ = points ? std::move(points) : makeSurfacePoints(run.design, grid_->x, grid_->z);
    redraw();
}

void SurfacePlot::clear() {
    grid_.reset();
    values_.resize(0, 0);
    region_ = {};
    points_.reset();
    redraw();
}

void SurfacePlot::setGreyscale(bool on) {
    greyscale_ = on;
    redraw();
}

void SurfacePlot::setExportSize(double /*widthIn*/, double heightIn) { exportHeightIn_ = heightIn; }

void SurfacePlot::setExportLook(bool exporting, bool /*markSlider*/) {
    const bool compact = exporting && exportHeightIn_ < kCompactFigureHeightIn;
    if (compact == compact_) return;
    compact_ = compact;
    redraw();
}

void SurfacePlot::redraw() {
    plot_->clearPlottables();
    plot_->clearItems();
    map_ = nullptr;
    mask_ = nullptr;
    beyondCells_ = 0;
    title_->setText(subtitle());
    scale_->setVisible(grid_.has_value());
    if (!grid_) {
        plot_->xAxis->setLabel(QString());
        plot_->yAxis->setLabel(QString());
        replotWhenShown();
        return;
    }
    const SurfaceGrid& g = *grid_;
    const int nx = static_cast<int>(g.x_values.size()), nz = static_cast<int>(g.z_values.size());
    setAxisTitle(plot_->xAxis, QString::fromStdString(g.x));
    setAxisTitle(plot_->yAxis, QString::fromStdString(g.z));
    const BeyondQuadrants q = drawMap(g);
    // The wash beyond the data's hull, over the map and under the rows and edge.
    mask_ = region_.x.size() >= 3
                ? new BeyondMask(plot_, region_, QBrush(estuary::withAlpha(estuary::beyond, kWashAlpha)))
                : nullptr;
    // The observed rows, light dots (thinned when dense).
    if (points_ && !points_->x.empty()) drawObservedRows();
    // Edge of the data.
    if (region_.x.size() >= 2) drawEdge();
    markBeyond(q, nx * nz);
    plot_->legend->setVisible(region_.x.size() >= 2);
    // Cells are centred on the grid's end values: show them whole.
    const double hx = (g.x_values.back() - g.x_values.front()) / (2.0 * (nx - 1));
    const double hz = (g.z_values.back() - g.z_values.front()) / (2.0 * (nz - 1));
    // The grid spans the observed values: a variable observed only at 0 or
    // above keeps its axis there (the first cells show half).
    const auto from = [](double first, double half) { return first >= 0 ? std::max(0.0, first - half) : first - half; };
    plot_->xAxis->setRange(from(g.x_values.front(), hx), g.x_values.back() + hx);
    plot_->yAxis->setRange(from(g.z_values.front(), hz), g.z_values.back() + hz);
    replotWhenShown();
}

void SurfacePlot::replotWhenShown() {
    // Hidden (the Lines plot is on show): painted when shown. An export draws
    // the plot itself, from the plottables built above.
    replotDue_ = !isVisible();
    if (!replotDue_) plot_->replot();
}

void SurfacePlot::showEvent(QShowEvent* event) {
    QWidget::showEvent(event);
    if (replotDue_) {
        replotDue_ = false;
        plot_->replot();
    }
}

// The colour map of the predicted values; cells beyond the data faded.
SurfacePlot::BeyondQuadrants SurfacePlot::drawMap(const SurfaceGrid& g) {
    const int nx = static_cast<int>(g.x_values.size()), nz = static_cast<int>(g.z_values.size());
    map_ = new QCPColorMap(plot_->xAxis, plot_->yAxis);
    map_->setName(tr("predicted"));
    map_->removeFromLegend();
    map_->data()->setSize(nx, nz);
    map_->data()->setRange(QCPRange(g.x_values.front(), g.x_values.back()),
                           QCPRange(g.z_values.front(), g.z_values.back()));
    const bool haveRegion = region_.x.size() >= 3;
    // Where the beyond cells gather most (for the label): per quadrant sums.
    BeyondQuadrants q;
    for (int i = 0; i < nx; ++i)
        for (int k = 0; k < nz; ++k) {
            const double x = g.x_values[static_cast<std::size_t>(i)], z = g.z_values[static_cast<std::size_t>(k)];
            map_->data()->setCell(i, k, values_(k, i));
            if (haveRegion && !region_.contains(x, z)) {
                ++beyondCells_;
                const int at = (2 * i >= nx ? 1 : 0) + (2 * k >= nz ? 2 : 0);
                q.x[at] += x;
                q.z[at] += z;
                ++q.n[at];
            }
        }
    // The colour scale hands its gradient to the map: set the ramp after joining them.
    map_->setColorScale(scale_);
    map_->setGradient(ramp(greyscale_));
    scale_->setGradient(ramp(greyscale_));
    map_->setInterpolate(true);
    map_->rescaleDataRange(true);
    scale_->axis()->setLabel(
        probability_ ? words_.outcomeOf
                     : (family_ == Family::Logistic ? tr("log-odds of %1 = 1").arg(outcome_) : words_.modelOf));
    return q;
}

void SurfacePlot::drawObservedRows() {
    auto* pts = new QCPGraph(plot_->xAxis, plot_->yAxis);
    pts->setName(tr("observed rows"));
    pts->setLineStyle(QCPGraph::lsNone);
    // ink dots with a light ring: visible on both ends of the ramp
    const bool many = points_->rows > 2000;
    pts->setScatterStyle(QCPScatterStyle(
        QCPScatterStyle::ssCircle, QPen(QColor(255, 255, 255, many ? 90 : 150), 0.8),
        QBrush(estuary::withAlpha(greyscale_ ? estuary::toGrey(estuary::ink) : estuary::ink, many ? 0.3 : 0.5)), 4));
    pts->removeFromLegend();
    pts->setData(QVector<double>(points_->x.begin(), points_->x.end()),
                 QVector<double>(points_->z.begin(), points_->z.end()));
}

void SurfacePlot::drawEdge() {
    auto* edge = new QCPCurve(plot_->xAxis, plot_->yAxis);
    edge->setName(compact_ ? tr("data edge") : tr("edge of the observed data"));
    QPen pen(greyscale_ ? estuary::toGrey(estuary::ink) : estuary::ink);
    pen.setWidthF(1.4);
    edge->setPen(pen);
    QVector<double> t, xs, zs;
    for (std::size_t i = 0; i <= region_.x.size(); ++i) {
        const std::size_t j = i % region_.x.size();
        t << static_cast<double>(i);
        xs << region_.x[j];
        zs << region_.z[j];
    }
    edge->setData(t, xs, zs, true);
}

void SurfacePlot::markBeyond(const BeyondQuadrants& q, int cells) {
    // "beyond the data" in the legend (a filled key); also written inside
    // the plot where the beyond area is large enough to hold it.
    if (beyondCells_ > 0) {
        auto* key = new QCPBars(plot_->xAxis, plot_->yAxis);
        key->setName(tr("beyond the data"));
        key->setPen(QPen(estuary::grid));
        key->setBrush(QBrush(estuary::beyond));
        key->setSelectable(QCP::stNone);
    }
    int best = -1;
    for (int k = 0; k < 4; ++k)
        if (q.n[k] > 0 && (best < 0 || q.n[k] > q.n[best])) best = k;
    if (best >= 0 && q.n[best] >= cells / 10) {
        auto* label = new QCPItemText(plot_);
        label->position->setType(QCPItemPosition::ptPlotCoords);
        label->position->setCoords(q.x[best] / q.n[best], q.z[best] / q.n[best]);
        label->setPositionAlignment(Qt::AlignCenter);
        label->setText(tr("beyond the data"));
        QFont f = font();
        f.setItalic(true);
        label->setFont(f);
        label->setColor(estuary::ink);
        label->setPadding(QMargins(3, 1, 3, 1));
        label->setBrush(QBrush(estuary::withAlpha(estuary::beyond, 0.85)));
        label->setClipToAxisRect(true);
    }
}

}  // namespace moderato::ui
