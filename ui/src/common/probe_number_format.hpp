// How the Probe section writes numbers: four significant digits (no
// exponent for ordinary magnitudes), p-values to three decimals with
// "< 0.001" below that, and the names of the test statistic. (The names
// differ from estimates/number_format.hpp on purpose: two inline and
// out-of-line functions with one name would break the one-definition rule.)
#pragma once

#include <QLocale>
#include <QString>
#include <cmath>

namespace moderato::ui {

inline QString probeNumber(double v, int digits = 4) {
    if (std::isnan(v)) return QStringLiteral("—");
    if (std::isinf(v)) return v > 0 ? QStringLiteral("∞") : QStringLiteral("−∞");
    QString s = QLocale::c().toString(v, 'g', digits);
    if (s.startsWith(QLatin1Char('-'))) s.replace(0, 1, QChar(0x2212));  // a real minus sign
    return s;
}

inline QString probePValue(double p) {
    if (std::isnan(p)) return QStringLiteral("—");
    if (p < 0.001) return QStringLiteral("< 0.001");
    return QLocale::c().toString(p, 'f', 3);
}

// "t(196)" for a t reference distribution, "z" for the normal one.
inline QString statisticName(double df) {
    if (!std::isfinite(df)) return QStringLiteral("z");
    return QStringLiteral("t(%1)").arg(QLocale::c().toString(df, 'g', 6));
}

}  // namespace moderato::ui
