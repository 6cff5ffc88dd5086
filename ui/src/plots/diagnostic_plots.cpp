#include "plots/diagnostic_plots.hpp"

#include <qcustomplot.h>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

#include "plots/plot_style.hpp"
#include "plots/scatter_thinning.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

constexpr std::size_t kThinAbove = 20000;

QColor shade(const QColor& c, bool grey) { return grey ? estuary::toGrey(c) : c; }

QCPItemText* label(QCustomPlot* plot, const QString& text, double x, double y, Qt::Alignment align, const QFont& font) {
    auto* t = new QCPItemText(plot);
    t->position->setType(QCPItemPosition::ptPlotCoords);
    t->position->setCoords(x, y);
    t->setPositionAlignment(align);
    t->setText(text);
    t->setFont(font);
    t->setColor(estuary::ink);
    t->setClipToAxisRect(true);
    t->setPadding(QMargins(2, 1, 2, 1));
    t->setBrush(QBrush(QColor(255, 255, 255, 200)));
    return t;
}

QCPRange padded(double lo, double hi, double share = 0.07) {
    if (!std::isfinite(lo) || !std::isfinite(hi)) return QCPRange(-1, 1);
    if (hi <= lo) return QCPRange(lo - 1, hi + 1);
    const double pad = share * (hi - lo);
    return QCPRange(lo - pad, hi + pad);
}

}  // namespace

DiagnosticPlot::DiagnosticPlot(Kind kind, QWidget* parent)
    : QWidget(parent), kind_(kind), plot_(new QCustomPlot(this)) {
    setObjectName(figureKey() + QStringLiteral("-plot"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
    stylePlot(plot_, font());
    plot_->plotLayout()->insertRow(0);
    QFont tf = font();
    tf.setBold(true);
    title_ = new QCPTextElement(plot_, figureName(), tf);
    title_->setTextColor(estuary::ink);
    plot_->plotLayout()->addElement(0, 0, title_);
    // The legend in a row under the plot, so it never hides points.
    auto* legendRow = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(2, 0, legendRow);
    legendRow->addElement(0, 0, plot_->legend);
    legendRow->setMargins(QMargins(0, 0, 0, 2));
    plot_->plotLayout()->setRowStretchFactor(2, 0.001);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(3);
    plot_->legend->setBorderPen(Qt::NoPen);
    plot_->legend->setRowSpacing(0);
    plot_->legend->setColumnSpacing(10);
    plot_->legend->setVisible(false);
    QFont lf = font();
    lf.setPointSizeF(lf.pointSizeF() * 0.9);
    plot_->legend->setFont(lf);
    setMinimumSize(220, 180);
    connect(plot_, &QCustomPlot::plottableClick, this, [this](QCPAbstractPlottable* p, int index, QMouseEvent*) {
        if (p != flaggedGraph_ || index < 0 || static_cast<std::size_t>(index) >= drawnFlagged_.size()) return;
        Q_EMIT observationClicked(drawnFlagged_[static_cast<std::size_t>(index)]);
    });
}

QString DiagnosticPlot::figureName() const {
    switch (kind_) {
        case Residuals:
            return tr("Residuals against fitted values");
        case Quantiles:
            return tr("Normal quantile plot");
        case Influence:
            return tr("Leverage and influence");
    }
    return {};
}

FigurePlot DiagnosticPlot::figureKind() const {
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

void DiagnosticPlot::setDiagnostics(std::shared_ptr<const Diagnostics> d) {
    d_ = std::move(d);
    highlighted_.clear();
    // The coordinates once per diagnostics (the quantile plot sorts every row).
    cx_.clear();
    cy_.clear();
    cobs_.clear();
    if (d_) coordinates(cx_, cy_, cobs_);
    redraw();
}

void DiagnosticPlot::setHighlighted(const std::vector<std::size_t>& observations) {
    highlighted_ = observations;
    drawHighlight();
    plot_->replot();
}

void DiagnosticPlot::setGreyscale(bool on) {
    greyscale_ = on;
    redraw();
}

void DiagnosticPlot::coordinates(std::vector<double>& x, std::vector<double>& y, std::vector<std::size_t>& obs) const {
    const Diagnostics& d = *d_;
    x.clear();
    y.clear();
    obs.clear();
    switch (kind_) {
        case Residuals:
        case Influence: {
            const Eigen::VectorXd& ex = kind_ == Residuals ? d.fitted : d.leverage;
            const Eigen::VectorXd& ey = kind_ == Residuals ? d.plot_residual() : d.standardised;
            x.assign(ex.data(), ex.data() + ex.size());
            y.assign(ey.data(), ey.data() + ey.size());
            obs.resize(x.size());
            for (std::size_t i = 0; i < obs.size(); ++i) obs[i] = i;
            break;
        }
        case Quantiles: {
            const QuantilePlot q = normal_quantile_plot(d.quantile_residual());
            x = q.theoretical;
            y = q.observed;
            obs = q.order;
            break;
        }
    }
}

void DiagnosticPlot::redraw() {
    plot_->clearPlottables();
    plot_->clearItems();
    points_ = flaggedGraph_ = highlight_ = nullptr;
    drawn_.clear();
    drawnFlagged_.clear();
    xs_.clear();
    ys_.clear();
    plot_->legend->setVisible(false);
    if (!d_) {
        plot_->xAxis->setLabel(QString());
        plot_->yAxis->setLabel(QString());
        plot_->replot();
        return;
    }
    const Diagnostics& d = *d_;
    std::vector<char> flagged(d.n, 0);
    for (const auto& r : d.flagged) flagged[r.observation] = 1;

    const std::vector<double>& x = cx_;
    const std::vector<double>& y = cy_;
    const std::vector<std::size_t>& obs = cobs_;
    xs_.assign(d.n, NAN);
    ys_.assign(d.n, NAN);
    for (std::size_t k = 0; k < obs.size(); ++k) {
        xs_[obs[k]] = x[k];
        ys_[obs[k]] = y[k];
    }
    const std::vector<std::size_t> keep =
        thinScatter(x, y, kThinAbove, 600, 400, [&](std::size_t k) { return flagged[obs[k]] != 0; });
    QVector<double> px, py, fx, fy;
    std::vector<std::size_t> flaggedAt;  // positions k of the flagged points
    double xlo = INFINITY, xhi = -INFINITY, ylo = INFINITY, yhi = -INFINITY;
    for (std::size_t k : keep) {
        xlo = std::min(xlo, x[k]);
        xhi = std::max(xhi, x[k]);
        ylo = std::min(ylo, y[k]);
        yhi = std::max(yhi, y[k]);
        if (flagged[obs[k]]) {
            flaggedAt.push_back(k);
        } else {
            px << x[k];
            py << y[k];
            drawn_.push_back(obs[k]);
        }
    }
    // QCPGraph keeps its data sorted by x: sort the flagged points the same
    // way so a clicked point's index names its observation.
    std::stable_sort(flaggedAt.begin(), flaggedAt.end(), [&](std::size_t a, std::size_t b) { return x[a] < x[b]; });
    for (std::size_t k : flaggedAt) {
        fx << x[k];
        fy << y[k];
        drawnFlagged_.push_back(obs[k]);
    }
    const bool dense = keep.size() < x.size() || x.size() > 3000;
    const QColor pointColour = estuary::withAlpha(shade(estuary::series(0), greyscale_), dense ? 0.35 : 0.55);
    const QColor flagColour = shade(estuary::series(1), greyscale_);

    // Reference lines first (under the points).
    QPen refPen(estuary::ink);
    refPen.setWidthF(1.0);
    QFont small = font();
    small.setPointSizeF(small.pointSizeF() * 0.85);
    QCPRange xr = padded(xlo, xhi), yr = padded(ylo, yhi);
    switch (kind_) {
        case Residuals: {
            auto* zero = new QCPItemStraightLine(plot_);
            QPen p = refPen;
            p.setStyle(Qt::DashLine);
            zero->setPen(p);
            zero->point1->setCoords(0, 0);
            zero->point2->setCoords(1, 0);
            setAxisTitle(plot_->xAxis, QString::fromStdString(d.fitted_name));
            setAxisTitle(plot_->yAxis, QString::fromStdString(d.plot_residual_name));
            if (d.family == Family::Logistic) xr = QCPRange(std::max(-0.02, xr.lower), std::min(1.02, xr.upper));
            break;
        }
        case Quantiles: {
            auto* ref = new QCPItemStraightLine(plot_);
            ref->setPen(refPen);
            ref->point1->setCoords(0, 0);
            ref->point2->setCoords(1, 1);
            setAxisTitle(plot_->xAxis, tr("normal quantile (Blom positions)"));
            setAxisTitle(plot_->yAxis, QString::fromStdString(d.quantile_residual_name));
            yr = padded(std::min(ylo, xlo), std::max(yhi, xhi));
            xr = padded(xlo, xhi);
            break;
        }
        case Influence: {
            xr = QCPRange(0, std::max(xhi, d.leverage_threshold) * 1.08);
            const double ymax = std::max({std::abs(ylo), std::abs(yhi), 3.0}) * 1.1;
            yr = QCPRange(-ymax, ymax);
            setAxisTitle(plot_->xAxis, tr("leverage"));
            setAxisTitle(plot_->yAxis, d.family == Family::Logistic ? tr("standardised Pearson residual")
                                                                    : tr("standardised residual"));
            // Cook's distance contours at 0.5 and 1 (common practice).
            const double hlo = std::max(xr.upper * 1e-3, 1e-6), hhi = std::min(xr.upper, 0.999);
            const Qt::PenStyle styles[] = {Qt::DashLine, Qt::DashDotLine};
            const double levels[] = {0.5, 1.0};
            // Does the lower contour (D = 0.5) enter the plotted area at all?
            const bool visible = cooks_contour(levels[0], d.p, hhi) <= ymax;
            for (int c = 0; c < 2 && visible; ++c) {
                QPen pen(shade(estuary::series(5), greyscale_));
                pen.setWidthF(1.1);
                pen.setStyle(styles[c]);
                for (int sign : {1, -1}) {
                    auto* curve = new QCPCurve(plot_->xAxis, plot_->yAxis);
                    curve->setPen(pen);
                    curve->setName(tr("Cook's distance %1").arg(levels[c]));
                    if (sign < 0) curve->removeFromLegend();
                    QVector<double> t, cx, cy;
                    for (int s = 0; s <= 200; ++s) {
                        const double h = hlo * std::pow(hhi / hlo, s / 200.0);
                        const double r = cooks_contour(levels[c], d.p, h);
                        if (!std::isfinite(r) || r > 4 * ymax) continue;
                        t << s;
                        cx << h;
                        cy << sign * r;
                    }
                    curve->setData(t, cx, cy, true);
                    curve->setSelectable(QCP::stNone);
                    if (sign > 0 && !cx.isEmpty()) {
                        // label where the contour meets the top of the plot, or at its right end
                        int at = static_cast<int>(cx.size()) - 1;
                        for (int s = 0; s < cx.size(); ++s)
                            if (cy[s] <= ymax * 0.92) {
                                at = s;
                                break;
                            }
                        label(plot_, tr("D = %1").arg(levels[c]), cx[at], cy[at], Qt::AlignLeft | Qt::AlignBottom,
                              small);
                    }
                }
            }
            if (!visible) {
                auto* t = label(plot_, tr("Cook's distance 0.5 and 1 lie beyond this range"), xr.upper, ymax * 0.97,
                                Qt::AlignRight | Qt::AlignTop, small);
                t->setColor(shade(estuary::series(5), greyscale_));
            }
            auto* lev = new QCPItemStraightLine(plot_);
            QPen lp(shade(estuary::notSignificant, greyscale_));
            lp.setStyle(Qt::DotLine);
            lp.setWidthF(1.2);
            lev->setPen(lp);
            lev->point1->setCoords(d.leverage_threshold, 0);
            lev->point2->setCoords(d.leverage_threshold, 1);
            label(plot_, tr("%1p/n").arg(d.rules.leverage_multiple), d.leverage_threshold, -ymax * 0.98,
                  Qt::AlignLeft | Qt::AlignBottom, small);
            break;
        }
    }

    points_ = new QCPGraph(plot_->xAxis, plot_->yAxis);
    points_->setName(tr("rows"));
    points_->setLineStyle(QCPGraph::lsNone);
    points_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssDisc, pointColour, pointColour, dense ? 3 : 4.5));
    points_->setData(px, py);
    points_->setSelectable(QCP::stNone);
    points_->setAdaptiveSampling(true);

    if (kind_ == Residuals) {
        // The mean residual in bins of the fitted value: where it leaves zero,
        // the model misses a pattern.
        const int bins = static_cast<int>(std::clamp<std::size_t>(d.n / 10, 2, 20));
        const BinnedResiduals b = binned_residuals(d.fitted, d.plot_residual(), bins);
        auto* line = new QCPGraph(plot_->xAxis, plot_->yAxis);
        line->setName(tr("mean residual in %1 bins of the fitted value").arg(b.count.size()));
        QPen pen(shade(estuary::ink, greyscale_));
        pen.setWidthF(1.6);
        line->setPen(pen);
        line->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssDisc, pen.color(), pen.color(), 4));
        line->setData(QVector<double>(b.fitted_mean.begin(), b.fitted_mean.end()),
                      QVector<double>(b.residual_mean.begin(), b.residual_mean.end()));
        line->setSelectable(QCP::stNone);
    }

    flaggedGraph_ = new QCPGraph(plot_->xAxis, plot_->yAxis);
    flaggedGraph_->setName(tr("flagged rows"));
    flaggedGraph_->setLineStyle(QCPGraph::lsNone);
    flaggedGraph_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssDiamond, QPen(flagColour, 1.2),
                                                   QBrush(estuary::withAlpha(flagColour, 0.75)), 7));
    flaggedGraph_->setData(fx, fy, true);  // sorted above
    flaggedGraph_->setSelectable(QCP::stSingleData);
    flaggedGraph_->setSelectionDecorator(nullptr);

    highlight_ = new QCPGraph(plot_->xAxis, plot_->yAxis);
    highlight_->setName(tr("selected in the list"));
    highlight_->setLineStyle(QCPGraph::lsNone);
    highlight_->setScatterStyle(
        QCPScatterStyle(QCPScatterStyle::ssCircle, QPen(shade(estuary::ink, greyscale_), 1.6), Qt::NoBrush, 13));
    highlight_->setSelectable(QCP::stNone);
    highlight_->removeFromLegend();
    drawHighlight();

    plot_->legend->setVisible(true);
    plot_->xAxis->setRange(xr);
    plot_->yAxis->setRange(yr);
    plot_->replot();
}

void DiagnosticPlot::drawHighlight() {
    if (!highlight_) return;
    QVector<double> hx, hy;
    for (std::size_t o : highlighted_)
        if (o < xs_.size() && std::isfinite(xs_[o]) && std::isfinite(ys_[o])) {
            hx << xs_[o];
            hy << ys_[o];
        }
    highlight_->setData(hx, hy);  // sorts by x
}

}  // namespace moderato::ui
