#include "plots/diagnostic_plots.hpp"

#include <qcustomplot.h>
#include <QFontMetricsF>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

#include "common/number_text.hpp"
#include "plots/plot_style.hpp"
#include "plots/probe_plot_util.hpp"
#include "plots/scatter_thinning.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

// Display thinning (the picture at plot size, not the data): above
// kThinAbove points, one unflagged point per cell of a kThinBinsX ×
// kThinBinsY grid over the panel's range (cells of about 4 px at the usual
// plot size; the dots are 3 px, so a dense cloud still reads as one); above
// kFlaggedThinAbove flagged points, one flagged point per cell of a grid of
// the same size (their 7 px markers cover a cell and its neighbours). The
// flagged rows with the largest and smallest y (the labelled rows) and the
// smallest and largest x are always drawn; every flagged row stays in the list.
constexpr std::size_t kThinAbove = 20000;
constexpr int kThinBinsX = 120, kThinBinsY = 80;
constexpr std::size_t kFlaggedThinAbove = 5000;
constexpr int kFlaggedBinsX = 120, kFlaggedBinsY = 80;
constexpr const char* kUnderLayer = "grid";       // reference lines: under the points, over the grid
constexpr const char* kFlaggedLayer = "flagged";  // flagged rows and the ring of the selected ones

QColor shade(const QColor& c, bool grey) { return grey ? estuary::toGrey(c) : c; }

QCPRange padded(double lo, double hi, double share = 0.07) {
    if (!std::isfinite(lo) || !std::isfinite(hi)) return QCPRange(-1, 1);
    if (hi <= lo) return QCPRange(lo - 1, hi + 1);
    const double pad = share * (hi - lo);
    return QCPRange(lo - pad, hi + pad);
}

// A text in plot coordinates of `rect`, clipped to it.
QCPItemText* label(QCustomPlot* plot, QCPAxisRect* rect, const QString& text, double x, double y, Qt::Alignment align,
                   const QFont& font) {
    auto* t = new QCPItemText(plot);
    t->position->setAxes(rect->axis(QCPAxis::atBottom), rect->axis(QCPAxis::atLeft));
    t->position->setType(QCPItemPosition::ptPlotCoords);
    t->position->setCoords(x, y);
    t->setClipAxisRect(rect);
    t->setPositionAlignment(align);
    t->setText(text);
    t->setFont(font);
    t->setColor(estuary::ink);
    t->setClipToAxisRect(true);
    t->setPadding(QMargins(2, 1, 2, 1));
    t->setBrush(QBrush(QColor(255, 255, 255, 200)));
    t->setSelectable(false);  // clicks go to the points
    return t;
}

// A straight line through (x1, y1) and (x2, y2) in plot coordinates of `rect`, under the points.
QCPItemStraightLine* straightLine(QCustomPlot* plot, QCPAxisRect* rect, const QPen& pen, double x1, double y1,
                                  double x2, double y2) {
    auto* line = new QCPItemStraightLine(plot);
    line->setLayer(QLatin1String(kUnderLayer));
    line->setClipAxisRect(rect);
    for (QCPItemPosition* p : {line->point1, line->point2})
        p->setAxes(rect->axis(QCPAxis::atBottom), rect->axis(QCPAxis::atLeft));
    line->setPen(pen);
    line->setSelectable(false);
    line->point1->setCoords(x1, y1);
    line->point2->setCoords(x2, y2);
    return line;
}

QCPGraph* scatterGraph(QCPAxisRect* rect, const QString& name, const QCPScatterStyle& style) {
    auto* g = new QCPGraph(rect->axis(QCPAxis::atBottom), rect->axis(QCPAxis::atLeft));
    g->setName(name);
    g->setLineStyle(QCPGraph::lsNone);
    g->setScatterStyle(style);
    g->setSelectable(QCP::stNone);
    return g;
}

// A multiple in a rule ("4 / 480 rows"): whole numbers without decimals.
QString ruleNumber(double v) { return v == std::round(v) ? countText(v) : numberText(v); }

// What the residual axis shows, in words (core's plot_residual).
QString residualTitle(const Diagnostics& d) {
    if (generalized(d.family)) return QString::fromStdString(d.plot_residual_name);
    if (d.weighted) return DiagnosticPlot::tr("weighted residual (residual × √weight)");
    return DiagnosticPlot::tr("residual (observed − fitted)");
}

// Thins the flagged points among `keep` (positions in `p`) when there are
// more than kFlaggedThinAbove of them: one per cell of the fine grid, always
// keeping the kMaxLabels largest and smallest y (the labelled rows) and the
// smallest and largest x. The unflagged positions are left as they are.
std::vector<std::size_t> thinFlagged(const DiagnosticPoints::Panel& p, const std::vector<std::size_t>& keep,
                                     const std::vector<char>& flagged) {
    std::vector<std::size_t> out, at;  // `at`: positions of the flagged points
    for (std::size_t k : keep) (flagged[p.obs[k]] ? at : out).push_back(k);
    if (at.size() <= kFlaggedThinAbove) return keep;
    std::vector<double> fx(at.size()), fy(at.size());
    for (std::size_t j = 0; j < at.size(); ++j) {
        fx[j] = p.x[at[j]];
        fy[j] = p.y[at[j]];
    }
    std::vector<char> must(at.size(), 0);
    std::vector<std::size_t> order(at.size());
    for (std::size_t j = 0; j < order.size(); ++j) order[j] = j;
    const std::size_t m = DiagnosticPlot::kMaxLabels;
    const auto top = order.begin() + static_cast<std::ptrdiff_t>(m);
    std::partial_sort(order.begin(), top, order.end(), [&](std::size_t a, std::size_t b) { return fy[a] > fy[b]; });
    for (auto it = order.begin(); it != top; ++it) must[*it] = 1;
    std::partial_sort(order.begin(), top, order.end(), [&](std::size_t a, std::size_t b) { return fy[a] < fy[b]; });
    for (auto it = order.begin(); it != top; ++it) must[*it] = 1;
    must[static_cast<std::size_t>(std::min_element(fx.begin(), fx.end()) - fx.begin())] = 1;
    must[static_cast<std::size_t>(std::max_element(fx.begin(), fx.end()) - fx.begin())] = 1;
    for (std::size_t j : thinScatter(fx, fy, kFlaggedThinAbove, kFlaggedBinsX, kFlaggedBinsY,
                                     [&](std::size_t j) { return must[j] != 0; }))
        out.push_back(at[j]);
    return out;
}

}  // namespace

DiagnosticPlot::DiagnosticPlot(Kind kind, QWidget* parent)
    : QWidget(parent), kind_(kind), plot_(new QCustomPlot(this)) {
    setObjectName(figureKey() + QStringLiteral("-plot"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
    stylePlot(plot_, font());
    // Flagged rows above the axes: a point on an axis line is still drawn whole and takes the click.
    plot_->addLayer(QLatin1String(kFlaggedLayer), plot_->layer(QStringLiteral("axes")), QCustomPlot::limAbove);
    setUpLayout();
    setMinimumSize(220, kind_ == Influence ? 240 : 180);
    connect(plot_, &QCustomPlot::afterLayout, this, &DiagnosticPlot::placeRowLabels);
    connect(plot_, &QCustomPlot::plottableClick, this, [this](QCPAbstractPlottable* p, int index, QMouseEvent*) {
        for (const Panel& panel : panels_)
            if (p == panel.flagged && index >= 0 && static_cast<std::size_t>(index) < panel.drawnFlagged.size())
                Q_EMIT observationClicked(panel.drawnFlagged[static_cast<std::size_t>(index)]);
    });
}

void DiagnosticPlot::resizeEvent(QResizeEvent* event) {
    QWidget::resizeEvent(event);
    if (d_ && fitLegend(plot_)) plot_->replot();
}

void DiagnosticPlot::setUpLayout() {
    // Row 0 the title; then one row per panel; the legend in a row under
    // the panels, so it never hides points.
    plot_->plotLayout()->insertRow(0);
    QFont tf = font();
    tf.setBold(true);
    title_ = new QCPTextElement(plot_, figureName(), tf);
    title_->setTextColor(estuary::ink);
    plot_->plotLayout()->addElement(0, 0, title_);
    setPanelCount(kind_ == Influence ? 2 : 1);
    const int legendAt = plot_->plotLayout()->rowCount();
    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(legendAt, 0, legendRow);
    legendRow->addElement(0, 0, plot_->legend);
    legendRow->setMargins(QMargins(0, 0, 0, 2));
    plot_->plotLayout()->setRowStretchFactor(legendAt, 0.001);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(3);
    plot_->legend->setBorderPen(Qt::NoPen);
    plot_->legend->setRowSpacing(0);
    plot_->legend->setColumnSpacing(10);
    plot_->legend->setVisible(false);
    QFont lf = font();
    lf.setPointSizeF(lf.pointSizeF() * 0.9);
    plot_->legend->setFont(lf);
}

void DiagnosticPlot::setPanelCount(int count) {
    panels_.assign(static_cast<std::size_t>(count), Panel{});
    panels_[0].rect = plot_->axisRect();
    if (count == 1) return;
    // Further panels stacked under the first, sharing its left and right
    // margins; each panel under a caption that states its flag rule.
    auto* margins = new QCPMarginGroup(plot_);
    panels_[0].rect->setMarginGroup(QCP::msLeft | QCP::msRight, margins);
    for (int k = 1; k < count; ++k) {
        auto* rect = new QCPAxisRect(plot_);
        plot_->plotLayout()->addElement(1 + k, 0, rect);
        rect->axis(QCPAxis::atTop)->setVisible(false);
        rect->axis(QCPAxis::atRight)->setVisible(false);
        rect->setMarginGroup(QCP::msLeft | QCP::msRight, margins);
        styleAxisRect(rect, font());
        panels_[static_cast<std::size_t>(k)].rect = rect;
    }
    for (int k = count - 1; k >= 0; --k) {
        plot_->plotLayout()->insertRow(1 + k);
        auto* caption = new QCPTextElement(plot_, QString(), smallFont());
        caption->setObjectName(QLatin1String(kPanelCaptionName));
        caption->setTextColor(estuary::ink);
        caption->setMargins(QMargins(0, k == 0 ? 0 : 6, 0, 0));
        plot_->plotLayout()->addElement(1 + k, 0, caption);
        panels_[static_cast<std::size_t>(k)].caption = caption;
    }
}

QString DiagnosticPlot::figureName() const {
    switch (kind_) {
        case Residuals:
            return tr("Residuals against fitted values");
        case Quantiles:
            return tr("Normal quantile plot");
        case Influence:
            return tr("Influence of each row");
    }
    return {};
}

FigurePlot DiagnosticPlot::figureKind() const {
    // The kinds kept figures are stored under in project files: the influence
    // view keeps its kind (and key) though it is drawn differently now.
    switch (kind_) {
        case Residuals:
            return FigurePlot::Residuals;
        case Quantiles:
            return FigurePlot::QQ;
        case Influence:
            return FigurePlot::Influence;
    }
    return FigurePlot::Residuals;
}

QCPAxisRect* DiagnosticPlot::panelRect(int panel) const { return panels_.at(static_cast<std::size_t>(panel)).rect; }
const std::vector<std::size_t>& DiagnosticPlot::drawnObservations(int panel) const {
    return panels_.at(static_cast<std::size_t>(panel)).drawn;
}
const std::vector<std::size_t>& DiagnosticPlot::drawnFlagged(int panel) const {
    return panels_.at(static_cast<std::size_t>(panel)).drawnFlagged;
}
QCPGraph* DiagnosticPlot::pointsGraph(int panel) const { return panels_.at(static_cast<std::size_t>(panel)).points; }
QCPGraph* DiagnosticPlot::flaggedGraph(int panel) const { return panels_.at(static_cast<std::size_t>(panel)).flagged; }
double DiagnosticPlot::ruleValue(int panel) const { return panels_.at(static_cast<std::size_t>(panel)).rule; }
QString DiagnosticPlot::panelCaption(int panel) const {
    const QCPTextElement* caption = panels_.at(static_cast<std::size_t>(panel)).caption;
    return caption ? caption->text() : QString();
}
const std::vector<std::size_t>& DiagnosticPlot::labelledObservations(int panel) const {
    return panels_.at(static_cast<std::size_t>(panel)).labelled;
}

RowNumbers DiagnosticPlot::fitOrder(RowNumbers rows, std::size_t n) {
    if (rows.number.size() == n) return rows;
    // The order the rows were used in the fit.
    rows.number.resize(n);
    for (std::size_t i = 0; i < n; ++i) rows.number[i] = static_cast<double>(i + 1);
    rows.word = tr("row");
    rows.axisTitle = tr("row, in the order the fit used them");
    return rows;
}

void DiagnosticPlot::setDiagnostics(std::shared_ptr<const Diagnostics> d, RowNumbers rows,
                                    std::shared_ptr<const DiagnosticPoints> points, bool paintNextTurn) {
    d_ = std::move(d);
    rows_ = d_ ? fitOrder(std::move(rows), d_->n) : std::move(rows);
    highlighted_.clear();
    points_.reset();
    if (d_)
        points_ = points ? std::move(points)
                         : std::make_shared<const DiagnosticPoints>(DiagnosticPlot::points(kind_, *d_, rows_));
    for (std::size_t k = 0; k < panels_.size(); ++k)
        panels_[k].pts = points_ && k < points_->panels.size() ? &points_->panels[k] : nullptr;
    paintNextTurn_ = paintNextTurn;
    redraw();
    paintNextTurn_ = false;
}

void DiagnosticPlot::setHighlighted(const std::vector<std::size_t>& observations) {
    highlighted_ = observations;
    for (Panel& p : panels_) drawHighlight(p);
    plot_->replot();
}

void DiagnosticPlot::setGreyscale(bool on) {
    greyscale_ = on;
    redraw();
}

DiagnosticPoints DiagnosticPlot::points(Kind kind, const Diagnostics& d, const RowNumbers& rowNumbers) {
    DiagnosticPoints out;
    out.panels.resize(kind == Influence ? 2 : 1);
    // Each panel's x and y of every observation; points without both are left out.
    auto take = [](DiagnosticPoints::Panel& p, const std::vector<double>& x, const std::vector<double>& y,
                   const std::vector<std::size_t>& obs) {
        for (std::size_t k = 0; k < obs.size(); ++k)
            if (std::isfinite(x[k]) && std::isfinite(y[k])) {
                p.x.push_back(x[k]);
                p.y.push_back(y[k]);
                p.obs.push_back(obs[k]);
            }
    };
    std::vector<std::size_t> all(d.n);
    for (std::size_t i = 0; i < d.n; ++i) all[i] = i;
    auto values = [](const Eigen::VectorXd& v) { return std::vector<double>(v.data(), v.data() + v.size()); };
    switch (kind) {
        case Residuals: {
            take(out.panels[0], values(d.fitted), values(d.plot_residual()), all);
            const int bins = static_cast<int>(std::clamp<std::size_t>(d.n / 10, 2, 20));
            out.bins = binned_residuals(d.fitted, d.plot_residual(), bins);
            break;
        }
        case Quantiles: {
            const QuantilePlot q = normal_quantile_plot(d.quantile_residual());
            take(out.panels[0], q.theoretical, q.observed, q.order);
            break;
        }
        case Influence: {
            const RowNumbers rows = fitOrder(rowNumbers, d.n);
            take(out.panels[0], rows.number, values(d.cooks_distance), all);
            take(out.panels[1], rows.number, values(d.leverage), all);
            break;
        }
    }
    std::vector<char> flagged(d.n, 0);
    for (const auto& r : d.flagged) flagged[r.observation] = 1;
    for (DiagnosticPoints::Panel& p : out.panels) {
        p.xs.assign(d.n, NAN);
        p.ys.assign(d.n, NAN);
        for (std::size_t k = 0; k < p.obs.size(); ++k) {
            p.xs[p.obs[k]] = p.x[k];
            p.ys[p.obs[k]] = p.y[k];
        }
        p.keep = thinFlagged(p,
                             thinScatter(p.x, p.y, kThinAbove, kThinBinsX, kThinBinsY,
                                         [&](std::size_t k) { return flagged[p.obs[k]] != 0; }),
                             flagged);
        // In the order QCPGraph keeps its data (by x), so it need not sort them.
        std::stable_sort(p.keep.begin(), p.keep.end(), [&](std::size_t a, std::size_t b) { return p.x[a] < p.x[b]; });
    }
    return out;
}

void DiagnosticPlot::clearPanels() {
    plot_->clearPlottables();
    plot_->clearItems();
    binMeans_ = nullptr;
    binBars_ = nullptr;
    for (Panel& p : panels_) {
        p.points = p.flagged = p.highlight = nullptr;
        p.drawn.clear();
        p.drawnFlagged.clear();
        p.labelled.clear();
        p.labels.clear();
        p.rule = NAN;
        p.ruleWords.clear();
        p.ruleShort.clear();
        p.xlo = p.ylo = INFINITY;
        p.xhi = p.yhi = -INFINITY;
        for (QCPAxis* axis : p.rect->axes()) axis->setLabel(QString());
        if (p.caption) p.caption->setText(QString());
    }
    plot_->legend->setVisible(false);
}

void DiagnosticPlot::redraw() {
    clearPanels();
    if (!d_ || !points_) {
        plot_->replot();
        return;
    }
    std::vector<char> flagged(d_->n, 0);
    for (const auto& r : d_->flagged) flagged[r.observation] = 1;
    // The rows first, then what each kind adds over them, then the flagged rows on top.
    for (Panel& p : panels_) drawPoints(p, flagged);
    switch (kind_) {
        case Residuals:
            decorateResiduals();
            break;
        case Quantiles:
            decorateQuantiles();
            break;
        case Influence:
            decorateInfluence();
            break;
    }
    for (Panel& p : panels_) drawFlagged(p);
    plot_->legend->setVisible(true);
    fitLegend(plot_);
    plot_->replot(paintNextTurn_ ? QCustomPlot::rpQueuedReplot : QCustomPlot::rpRefreshHint);
}

void DiagnosticPlot::drawPoints(Panel& panel, const std::vector<char>& flagged) {
    const DiagnosticPoints::Panel& p = *panel.pts;
    const std::vector<std::size_t>& keep = p.keep;
    QVector<double> px, py;
    std::vector<std::size_t> flaggedAt;  // positions k of the flagged points
    for (std::size_t k : keep) {
        panel.xlo = std::min(panel.xlo, p.x[k]);
        panel.xhi = std::max(panel.xhi, p.x[k]);
        panel.ylo = std::min(panel.ylo, p.y[k]);
        panel.yhi = std::max(panel.yhi, p.y[k]);
        if (flagged[p.obs[k]]) {
            flaggedAt.push_back(k);
        } else {
            px << p.x[k];
            py << p.y[k];
            panel.drawn.push_back(p.obs[k]);
        }
    }
    // QCPGraph keeps its data sorted by x: sort the flagged points the same
    // way so a clicked point's index names its observation.
    std::stable_sort(flaggedAt.begin(), flaggedAt.end(), [&](std::size_t a, std::size_t b) { return p.x[a] < p.x[b]; });
    for (std::size_t k : flaggedAt) panel.drawnFlagged.push_back(p.obs[k]);
    panel.dense = keep.size() < p.x.size() || p.x.size() > 3000;
    const QColor pointColour = estuary::withAlpha(shade(estuary::series(0), greyscale_), panel.dense ? 0.35 : 0.55);
    panel.points =
        scatterGraph(panel.rect, tr("rows"),
                     QCPScatterStyle(QCPScatterStyle::ssDisc, pointColour, pointColour, panel.dense ? 3 : 4.5));
    panel.points->setData(px, py, true);  // sorted by x in points()
    panel.points->setAdaptiveSampling(true);
    // Later panels repeat the legend of the first; a compact figure's legend leaves the rows out.
    if (&panel != &panels_.front() || compact_) panel.points->removeFromLegend();
}

void DiagnosticPlot::drawFlagged(Panel& p) {
    QVector<double> fx, fy;
    for (std::size_t o : p.drawnFlagged) {
        fx << p.pts->xs[o];
        fy << p.pts->ys[o];
    }
    const QColor flagColour = shade(estuary::series(1), greyscale_);
    p.flagged = scatterGraph(p.rect, compact_ ? tr("flagged (any rule)") : tr("flagged rows (any rule)"),
                             QCPScatterStyle(QCPScatterStyle::ssDiamond, QPen(flagColour, 1.2),
                                             QBrush(estuary::withAlpha(flagColour, 0.75)), 7));
    p.flagged->setData(fx, fy, true);  // sorted by x in drawPoints
    p.flagged->setSelectable(QCP::stSingleData);
    p.flagged->setSelectionDecorator(nullptr);
    p.flagged->setLayer(QLatin1String(kFlaggedLayer));
    if (&p != &panels_.front()) p.flagged->removeFromLegend();

    p.highlight = scatterGraph(
        p.rect, tr("selected in the list"),
        QCPScatterStyle(QCPScatterStyle::ssCircle, QPen(shade(estuary::ink, greyscale_), 1.6), Qt::NoBrush, 13));
    p.highlight->removeFromLegend();
    p.highlight->setLayer(QLatin1String(kFlaggedLayer));
    drawHighlight(p);
}

void DiagnosticPlot::drawHighlight(Panel& p) {
    if (!p.highlight) return;
    QVector<double> hx, hy;
    for (std::size_t o : highlighted_)
        if (p.pts && o < p.pts->xs.size() && std::isfinite(p.pts->xs[o]) && std::isfinite(p.pts->ys[o])) {
            hx << p.pts->xs[o];
            hy << p.pts->ys[o];
        }
    p.highlight->setData(hx, hy);  // sorts by x
}

QFont DiagnosticPlot::smallFont() const {
    QFont small = font();
    small.setPointSizeF(small.pointSizeF() * 0.85);
    return small;
}

void DiagnosticPlot::decorateResiduals() {
    const Diagnostics& d = *d_;
    Panel& p = panels_[0];
    QPen zeroPen(estuary::ink);
    zeroPen.setWidthF(1.0);
    zeroPen.setStyle(Qt::DashLine);
    straightLine(plot_, p.rect, zeroPen, 0, 0, 1, 0);
    setAxisTitle(p.rect->axis(QCPAxis::atBottom), QString::fromStdString(d.fitted_name));
    setAxisTitle(p.rect->axis(QCPAxis::atLeft), residualTitle(d));
    QCPRange xr = padded(p.xlo, p.xhi);
    if (binary_outcome(d.family)) xr = QCPRange(std::max(-0.02, xr.lower), std::min(1.02, xr.upper));

    // The mean residual in bins of the fitted value, each with the interval
    // of its mean: where an interval misses zero, the model misses a pattern.
    const BinnedResiduals& b = *points_->bins;
    QVector<double> key, mean, below, above;
    for (std::size_t g = 0; g < b.count.size(); ++g) {
        if (!std::isfinite(b.residual_lower[g]) || !std::isfinite(b.residual_upper[g])) continue;  // one row
        key << b.fitted_mean[g];
        mean << b.residual_mean[g];
        below << b.residual_mean[g] - b.residual_lower[g];
        above << b.residual_upper[g] - b.residual_mean[g];
    }
    const QColor ink = shade(estuary::ink, greyscale_);
    binMeans_ = scatterGraph(
        p.rect, tr("mean residual in %1 bins, with %2% interval").arg(key.size()).arg(std::lround(b.level * 100)),
        QCPScatterStyle(QCPScatterStyle::ssSquare, QPen(ink, 1.2), QBrush(ink), 5));
    binMeans_->setData(key, mean, true);  // bins come in order of the fitted value
    binBars_ = new QCPErrorBars(p.rect->axis(QCPAxis::atBottom), p.rect->axis(QCPAxis::atLeft));
    binBars_->setDataPlottable(binMeans_);
    binBars_->setErrorType(QCPErrorBars::etValueError);
    binBars_->setData(below, above);
    binBars_->setPen(QPen(ink, 1.4));
    binBars_->setWhiskerWidth(6);
    binBars_->setSelectable(QCP::stNone);
    binBars_->removeFromLegend();

    double ylo = p.ylo, yhi = p.yhi;
    for (int g = 0; g < key.size(); ++g) {
        ylo = std::min(ylo, mean[g] - below[g]);
        yhi = std::max(yhi, mean[g] + above[g]);
    }
    p.rect->axis(QCPAxis::atBottom)->setRange(xr);
    p.rect->axis(QCPAxis::atLeft)->setRange(padded(ylo, yhi));
}

void DiagnosticPlot::decorateQuantiles() {
    const Diagnostics& d = *d_;
    Panel& p = panels_[0];
    QPen refPen(estuary::ink);
    refPen.setWidthF(1.0);
    straightLine(plot_, p.rect, refPen, 0, 0, 1, 1);
    setAxisTitle(p.rect->axis(QCPAxis::atBottom), tr("normal quantile (Blom plotting positions)"));
    setAxisTitle(p.rect->axis(QCPAxis::atLeft), QString::fromStdString(d.quantile_residual_name));
    p.rect->axis(QCPAxis::atBottom)->setRange(padded(p.xlo, p.xhi));
    p.rect->axis(QCPAxis::atLeft)->setRange(padded(std::min(p.ylo, p.xlo), std::max(p.yhi, p.xhi)));
}

void DiagnosticPlot::decorateInfluence() {
    const Diagnostics& d = *d_;
    Panel& cooks = panels_[0];
    Panel& leverage = panels_[1];
    setAxisTitle(cooks.rect->axis(QCPAxis::atLeft), tr("Cook's distance"));
    setAxisTitle(leverage.rect->axis(QCPAxis::atLeft), tr("leverage"));
    setAxisTitle(leverage.rect->axis(QCPAxis::atBottom), rows_.axisTitle);
    // Both panels over the same rows; the row numbers are read on the lower one.
    const QCPRange xr = padded(std::min(cooks.xlo, leverage.xlo), std::max(cooks.xhi, leverage.xhi), 0.02);
    cooks.rect->axis(QCPAxis::atBottom)->setTickLabels(false);
    // The rules core flags rows by (Diagnostics::cooks_threshold, leverage_threshold), stated over each panel.
    const QString n = countText(static_cast<long long>(d.n));
    const QString cooksRule = ruleNumber(d.rules.cooks_numerator), leverageRule = ruleNumber(d.rules.leverage_multiple);
    const QString cooksAt = numberText(d.cooks_threshold), leverageAt = numberText(d.leverage_threshold);
    drawRuleLine(cooks, d.cooks_threshold, xr,
                 tr("Cook's distance: flagged above %1 / %2 rows = %3").arg(cooksRule, n, cooksAt),
                 tr("Cook's distance > %1 / %2 = %3").arg(cooksRule, n, cooksAt));
    drawRuleLine(leverage, d.leverage_threshold, xr,
                 tr("Leverage: flagged above %1 × %2 coefficients / %3 rows = %4")
                     .arg(leverageRule, countText(d.p), n, leverageAt),
                 tr("leverage > %1 × %2 / %3 = %4").arg(leverageRule, countText(d.p), n, leverageAt));
    for (Panel* p : {&cooks, &leverage}) {
        p->rect->axis(QCPAxis::atBottom)->setRange(xr);
        // From just below zero, so rows at zero show whole above the axis.
        const double top = std::max(std::isfinite(p->yhi) ? p->yhi : 0.0, p->rule);
        const double upper = top > 0 ? top * 1.15 : 1.0;
        p->rect->axis(QCPAxis::atLeft)->setRange(-0.04 * upper, upper);
    }
    labelRows(cooks, d.cooks_distance, d.cooks_threshold);
    labelRows(leverage, d.leverage, d.leverage_threshold);
}

void DiagnosticPlot::drawRuleLine(Panel& p, double value, const QCPRange& xr, const QString& words,
                                  const QString& brief) {
    p.rule = value;
    p.ruleWords = words;
    p.ruleShort = brief;
    p.caption->setText(exporting_ ? brief : words);
    QPen pen(shade(estuary::series(1), greyscale_));
    pen.setWidthF(1.2);
    pen.setStyle(Qt::DashLine);
    // A line across the panel, under the points.
    auto* line = new QCPGraph(p.rect->axis(QCPAxis::atBottom), p.rect->axis(QCPAxis::atLeft));
    line->setLayer(QLatin1String(kUnderLayer));
    line->setName(tr("flag rule"));
    line->setPen(pen);
    line->setSelectable(QCP::stNone);
    line->setData(QVector<double>{xr.lower, xr.upper}, QVector<double>{value, value}, true);
    if (&p != &panels_.front()) line->removeFromLegend();  // one entry for both panels
}

void DiagnosticPlot::labelRows(Panel& p, const Eigen::VectorXd& value, double above) {
    // The largest rows above the rule line, by value.
    std::vector<std::size_t> over;
    for (std::size_t i = 0; i < d_->n; ++i)
        if (std::isfinite(value[static_cast<Eigen::Index>(i)]) && value[static_cast<Eigen::Index>(i)] > above)
            over.push_back(i);
    // Only the first kMaxLabels in order (ties by row, as a stable sort of the rows would give).
    const auto first = over.begin() + static_cast<std::ptrdiff_t>(std::min(over.size(), kMaxLabels));
    std::partial_sort(over.begin(), first, over.end(), [&](std::size_t a, std::size_t b) {
        const double va = value[static_cast<Eigen::Index>(a)], vb = value[static_cast<Eigen::Index>(b)];
        return va > vb || (va == vb && a < b);
    });
    over.erase(first, over.end());
    const QCPRange xr = p.rect->axis(QCPAxis::atBottom)->range();
    const QCPRange yr = p.rect->axis(QCPAxis::atLeft)->range();
    std::vector<std::pair<double, double>> placed;  // labelled points, as shares of the axis ranges
    for (std::size_t o : over) {
        const double x = rows_.number[o], y = value[static_cast<Eigen::Index>(o)];
        // Beside the marker (the side: placeRowLabels), under it when another label is close by.
        const double sx = (x - xr.lower) / xr.size(), sy = (y - yr.lower) / yr.size();
        bool crowded = false;
        for (const auto& [px, py] : placed) crowded = crowded || (std::abs(px - sx) < 0.1 && std::abs(py - sy) < 0.12);
        placed.emplace_back(sx, sy);
        QCPItemText* t = label(plot_, p.rect, rowLabel(o), x, y, Qt::AlignLeft | Qt::AlignVCenter, smallFont());
        t->setBrush(Qt::NoBrush);
        t->setObjectName(QString::fromLatin1(kSmallTextName));  // smaller than the figure's text in an export
        p.labels.emplace_back(t, crowded);
        p.labelled.push_back(o);
    }
    placeRowLabels();
}

void DiagnosticPlot::placeRowLabels() {
    for (const Panel& p : panels_) {
        const QRect r = p.rect->rect();
        if (r.width() <= 0) continue;
        for (const auto& [t, crowded] : p.labels) {
            const QFontMetricsF fm(t->font());
            const double w = fm.horizontalAdvance(t->text()) + 9, h = fm.height() + 5;
            const QPointF at = t->position->pixelPosition();
            // Right of the marker when it fits, else left of it (whichever has more room if neither does).
            const bool left = at.x() + w > r.right() && at.x() - r.left() > r.right() - at.x();
            // Beside the marker; under it when another label is close by; over or under it at an edge.
            bool under = crowded;
            if (!under && at.y() - 0.5 * fm.height() < r.top()) under = true;
            if (under && at.y() + h > r.bottom()) under = false;
            const bool over = !under && at.y() + 0.5 * fm.height() > r.bottom();
            const Qt::Alignment v = under ? Qt::AlignTop : over ? Qt::AlignBottom : Qt::AlignVCenter;
            t->setPositionAlignment((left ? Qt::AlignRight : Qt::AlignLeft) | v);
            // A panel too short for a label beside its point (a small figure) labels no rows.
            t->setVisible(r.height() >= 2.5 * h);
            // Clear of the marker (and, under it, of the label beside it).
            t->setPadding(QMargins(left ? 2 : 7, under ? 5 : 0, left ? 7 : 2, over ? 5 : 0));
        }
    }
}

// A compact figure: no title row, the rows closer together, and panels
// that may be shorter than QCustomPlot's default minimum (50 units), so the
// layout is not squeezed below the height of its text.
void DiagnosticPlot::setCompactLayout(bool compact) {
    QCPLayoutGrid* layout = plot_->plotLayout();
    if (compact) {
        layout->take(title_);
        layout->simplify();
    } else {
        layout->insertRow(0);
        layout->addElement(0, 0, title_);
    }
    title_->setVisible(!compact);
    layout->setRowSpacing(compact ? 1 : 5);
    for (std::size_t k = 0; k < panels_.size(); ++k) {
        panels_[k].rect->setMinimumSize(50, compact ? 20 : 50);
        // Short panels: fewer values on their axes, so the tick labels do not overlap.
        panels_[k].rect->axis(QCPAxis::atLeft)->ticker()->setTickCount(compact ? 2 : 5);
        if (k > 0) panels_[k].caption->setMargins(QMargins(0, compact ? 2 : 6, 0, 0));
    }
}

void DiagnosticPlot::setExportSize(double /*widthIn*/, double heightIn) { exportHeightIn_ = heightIn; }

void DiagnosticPlot::setExportLook(bool exporting, bool /*markSlider*/) {
    exporting_ = exporting;
    const bool compact = exporting && kind_ == Influence && exportHeightIn_ < kCompactFigureHeightIn;
    if (compact != compact_) {
        compact_ = compact;
        setCompactLayout(compact);
        if (d_ && points_) redraw();
    }
    for (Panel& p : panels_)
        if (p.caption && !p.ruleWords.isEmpty()) p.caption->setText(exporting ? p.ruleShort : p.ruleWords);
}

QString DiagnosticPlot::rowLabel(std::size_t observation) const {
    // Written as the file or the grid numbers it (no thousands separator).
    return rows_.word + QLatin1Char(' ') + QString::number(static_cast<qulonglong>(rows_.number[observation]));
}

}  // namespace moderato::ui
