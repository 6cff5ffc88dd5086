#include "plots/probe_plot_util.hpp"

#include <qcustomplot.h>
#include <algorithm>

namespace moderato::ui {

void setUpProbePlot(QCustomPlot* plot) {
    if (!plot->layer(kShadingLayer))
        plot->addLayer(kShadingLayer, plot->layer(QStringLiteral("grid")), QCustomPlot::limBelow);
    if (!plot->layer(kMovingLayer)) {
        plot->addLayer(kMovingLayer, plot->layer(QStringLiteral("main")), QCustomPlot::limAbove);
        plot->layer(kMovingLayer)->setMode(QCPLayer::lmBuffered);
    }
    plot->setCurrentLayer(QStringLiteral("main"));
    // Legend in a row of its own above the axis rect, entries side by side.
    if (plot->axisRect()->insetLayout()->elements(false).contains(plot->legend)) {
        plot->axisRect()->insetLayout()->take(plot->legend);
        plot->plotLayout()->insertRow(0);
        plot->plotLayout()->addElement(0, 0, plot->legend);
        plot->plotLayout()->setRowStretchFactor(0, 0.001);
        plot->plotLayout()->setRowSpacing(0);
        plot->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
        plot->legend->setBorderPen(Qt::NoPen);
        plot->legend->setBrush(Qt::NoBrush);
        plot->legend->setMargins(QMargins(4, 2, 4, 0));
        plot->legend->setColumnSpacing(14);
        plot->legend->setIconSize(QSize(22, 12));
        plot->legend->setIconTextPadding(5);
        plot->legend->setLayer(QStringLiteral("legend"));
        plot->legend->setVisible(true);
    }
    plot->setPlottingHint(QCP::phCacheLabels, true);
}

bool fitLegend(QCustomPlot* plot, int width) {
    QCPLegend* legend = plot->legend;
    // A wrapped grid has empty cells: count the items that are there.
    std::vector<int> widths;
    for (int i = 0; i < legend->elementCount(); ++i)
        if (QCPAbstractLegendItem* item = legend->item(i)) {
            // Room below the text: an item clips to its rect, and underscores sit low.
            item->setMargins(QMargins(2, 1, 2, 3));
            widths.push_back(item->minimumOuterSizeHint().width());
        }
    const int n = static_cast<int>(widths.size());
    if (n == 0) return false;
    const int available =
        (width > 0 ? width : plot->width()) - legend->margins().left() - legend->margins().right() - 8;
    int best = 1;
    for (int k = n; k >= 1; --k) {
        int total = (k - 1) * legend->columnSpacing();
        for (int c = 0; c < k; ++c) {
            int widest = 0;
            for (int i = c; i < n; i += k) widest = std::max(widest, widths[static_cast<std::size_t>(i)]);
            total += widest;
        }
        if (total <= available) {
            best = k;
            break;
        }
    }
    if (legend->wrap() == best && legend->columnCount() == std::min(best, n)) return false;
    legend->setWrap(best);
    legend->setFillOrder(QCPLayoutGrid::foColumnsFirst, true);
    return true;
}

void curveVectors(const std::vector<CurvePoint>& points, int which, QVector<double>& keys, QVector<double>& values) {
    keys.resize(static_cast<qsizetype>(points.size()));
    values.resize(static_cast<qsizetype>(points.size()));
    for (std::size_t i = 0; i < points.size(); ++i) {
        keys[static_cast<qsizetype>(i)] = points[i].x;
        values[static_cast<qsizetype>(i)] = which == 0  ? points[i].estimate
                                            : which < 0 ? points[i].lower
                                                        : points[i].upper;
    }
}

QCPGraph* addBand(QCustomPlot* plot, const std::vector<CurvePoint>& points, const QBrush& fill) {
    QCPGraph* lower = plot->addGraph();
    QCPGraph* upper = plot->addGraph();
    for (QCPGraph* g : {lower, upper}) {
        g->setPen(Qt::NoPen);
        g->removeFromLegend();
        g->setSelectable(QCP::stNone);
    }
    upper->setBrush(fill);
    upper->setChannelFillGraph(lower);
    setBandData(upper, points);
    return upper;
}

void setBandData(QCPGraph* upper, const std::vector<CurvePoint>& points) {
    QVector<double> k, v;
    curveVectors(points, +1, k, v);
    upper->setData(k, v, true);
    if (QCPGraph* lower = upper->channelFillGraph()) {
        curveVectors(points, -1, k, v);
        lower->setData(k, v, true);
    }
}

void setLineData(QCPGraph* graph, const std::vector<CurvePoint>& points) {
    QVector<double> k, v;
    curveVectors(points, 0, k, v);
    graph->setData(k, v, true);
}

}  // namespace moderato::ui
