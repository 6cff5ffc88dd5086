// The house palette ("Estuary", see LOOK.md) and the series styles that keep
// figures readable in greyscale: colour, line style and end marker per series.
#pragma once

#include <QBrush>
#include <QColor>
#include <QPen>
#include <Qt>

namespace moderato::ui::estuary {

inline const QColor ink{0x1F, 0x2A, 0x44};
inline const QColor grid{0xE6, 0xE6, 0xE1};
inline const QColor beyond{0xF1, 0xF1, 0xEE};
inline const QColor notSignificant{0x9A, 0xA0, 0xA6};
inline constexpr double bandOpacity = 0.20;
inline constexpr double significanceOpacity = 0.14;
inline constexpr double notSignificantOpacity = 0.25;
inline constexpr int seriesCount = 6;

// Series colour k (wraps after six).
QColor series(int k);
// The same colour as a grey of equal luminance (for the greyscale export).
QColor toGrey(const QColor& c);
// Line style of series k: solid, dashed, dash-dot, dotted, then again.
Qt::PenStyle lineStyle(int k);
// Index into QCPScatterStyle::ScatterShape for the end marker of series k
// (circle, square, triangle, diamond, cross, plus).
int markerShape(int k);
// A series pen (colour k, its line style), greyscale when asked.
QPen seriesPen(int k, double width = 2.0, bool greyscale = false);
// The band fill: the series colour at 20 % opacity.
QBrush bandBrush(int k, bool greyscale = false);
// Region of significance: series 1 at 14 % opacity.
QBrush significanceBrush(bool greyscale = false);
// Not significant: grey, hatched, 25 % opacity.
QBrush notSignificantBrush();
QColor withAlpha(QColor c, double opacity);

}  // namespace moderato::ui::estuary
