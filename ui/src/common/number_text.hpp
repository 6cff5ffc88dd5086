// Numbers as the tables show them: about four significant digits without
// exponent notation in the usual range, p-values as "< 0.001", and a dash
// for values that do not exist (NaN).
#pragma once

#include <QString>

namespace moderato::ui {

QString numberText(double v, int significant = 4);
QString pValueText(double p);
QString countText(double n);

}  // namespace moderato::ui
