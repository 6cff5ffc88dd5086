// House styling of a QCustomPlot: white background, ink axes and text, thin
// Estuary grid, the UI font; shared by every plot so figures look alike.
#pragma once

#include <QFont>
#include <QSharedPointer>
#include <QString>

class QCustomPlot;
class QCPAxis;
class QCPAxisRect;
class QCPAxisTicker;

namespace moderato::ui {

// Applies the house look to the plot's axes, grid, legend and background;
// every axis gets a numberTicker().
void stylePlot(QCustomPlot* plot, const QFont& font = QFont());
// The house look for the axes and grid of one axis rect (stylePlot does the
// plot's own; a plot with more panels styles each further rect).
void styleAxisRect(QCPAxisRect* rect, const QFont& font);
// A ticker that writes its labels with the one number formatter
// (common/number_text.hpp: tickText): the decimals of the tick step, the
// minus sign and powers of ten as in the tables and the memo.
QSharedPointer<QCPAxisTicker> numberTicker();
// Axis title with the variable name (and unit when known: "discount_pct (%)").
void setAxisTitle(QCPAxis* axis, const QString& title);

}  // namespace moderato::ui
