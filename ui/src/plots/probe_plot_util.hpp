// Pieces shared by the Lines and Effect plots: the layer set-up (a shading
// layer under the grid and a buffered "moving" layer for what follows the
// moderator slider), the legend row above the axis rect, and bands.
#pragma once

#include <QBrush>
#include <QColor>
#include <QString>
#include <QVector>
#include <vector>

#include "moderato/probing/probe_curves.hpp"

class QCustomPlot;
class QCPGraph;
class QCPLayer;
class QCPAxis;

namespace moderato::ui {

inline const QString kShadingLayer = QStringLiteral("shading");
inline const QString kMovingLayer = QStringLiteral("moving");

// Adds the "shading" layer (below the grid) and the buffered "moving" layer
// (above the plottables, below the axes) to a styled plot, and moves the
// legend into a row of its own above the axis rect.
void setUpProbePlot(QCustomPlot* plot);

// Wraps the legend row into as many columns as fit the plot's width (or
// `width`, e.g. a figure's width when it is exported); returns whether the
// layout changed (the caller replots).
bool fitLegend(QCustomPlot* plot, int width = -1);

// A band between lower and upper (brush `fill`, no outline), drawn on the
// current layer; returns the upper graph (the one that carries the fill).
QCPGraph* addBand(QCustomPlot* plot, const std::vector<CurvePoint>& points, const QBrush& fill);
// Replaces a band's data (the graph returned by addBand).
void setBandData(QCPGraph* upper, const std::vector<CurvePoint>& points);
// A line through the estimates.
void setLineData(QCPGraph* graph, const std::vector<CurvePoint>& points);

// Graph keys / values of the points, for QCPGraph::setData.
void curveVectors(const std::vector<CurvePoint>& points, int which, QVector<double>& keys, QVector<double>& values);

}  // namespace moderato::ui
