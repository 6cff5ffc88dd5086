// How numbers are written in tables and sentences: a few significant digits
// on screen, tiny p-values as "< 0.001", and every digit where a reader asks
// for it (tooltips, copied text).
#pragma once

#include <QString>

namespace moderato::ui {

// `digits` significant digits, fixed notation between 1e-4 and 1e6 (whole
// part always written out), else scientific; a typographic minus; "—" for NaN.
QString formatNumber(double v, int digits = 4);
// A test statistic or R²-like figure with `decimals` places.
QString formatFixed(double v, int decimals);
// "< 0.001" below 0.001, else three decimals; "—" for NaN.
QString formatP(double p);
// "p < 0.001" or "p = 0.046".
QString pClause(double p);
// Every digit: the shortest text that reads back as the same double.
QString fullPrecision(double v);
// "95 %" for 0.95, "99.9 %" for 0.999.
QString levelPercent(double level);
// Unicode subscript digits: 12 -> "₁₂".
QString subscript(int n);

}  // namespace moderato::ui
