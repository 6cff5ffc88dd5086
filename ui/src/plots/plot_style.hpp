// House styling of a QCustomPlot: white background, ink axes and text, thin
// Estuary grid, the UI font; shared by every plot so figures look alike.
#pragma once

#include <QFont>
#include <QSharedPointer>
#include <QString>

class QCustomPlot;
class QCPAxis;
class QCPAxisTicker;

namespace moderato::ui {

// Applies the house look to the plot's axes, grid, legend and background;
// every axis gets a numberTicker().
void stylePlot(QCustomPlot* plot, const QFont& font = QFont());
// A ticker that writes its labels with the one number formatter
// (common/number_text.hpp: tickText): the decimals of the tick step, the
// minus sign and powers of ten as in the tables and the memo.
QSharedPointer<QCPAxisTicker> numberTicker();
// Axis title with the variable name (and unit when known: "discount_pct (%)").
void setAxisTitle(QCPAxis* axis, const QString& title);

}  // namespace moderato::ui
