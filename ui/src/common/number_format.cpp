#include "common/number_format.hpp"

#include <QChar>
#include <QLocale>
#include <algorithm>
#include <cmath>

namespace moderato::ui {

namespace {
const QChar kMinus(0x2212);
const QString kDash = QStringLiteral("\u2014");

QString typographicMinus(QString s) {
    if (s.startsWith(QLatin1Char('-'))) s.replace(0, 1, kMinus);
    s.replace(QStringLiteral("e-"), QStringLiteral("e") + kMinus);
    return s;
}
}  // namespace

QString formatNumber(double v, int digits) {
    if (std::isnan(v)) return kDash;
    if (std::isinf(v)) return v > 0 ? QStringLiteral("\u221e") : QString(kMinus) + QStringLiteral("\u221e");
    if (v == 0) return QStringLiteral("0");
    const double a = std::fabs(v);
    if (a >= 1e-4 && a < 1e6) {
        const int magnitude = static_cast<int>(std::floor(std::log10(a)));
        const int decimals = std::max(0, digits - 1 - magnitude);
        QString s = QString::number(v, 'f', decimals);
        if (s == QStringLiteral("-0") || s.toDouble() == 0) s = QString::number(v, 'e', digits - 1);
        return typographicMinus(s);
    }
    return typographicMinus(QString::number(v, 'e', digits - 1));
}

QString formatFixed(double v, int decimals) {
    if (std::isnan(v)) return kDash;
    return typographicMinus(QString::number(v, 'f', decimals));
}

QString formatP(double p) {
    if (std::isnan(p)) return kDash;
    if (p < 0.001) return QStringLiteral("< 0.001");
    return QString::number(p, 'f', 3);
}

QString pClause(double p) {
    if (std::isnan(p)) return QStringLiteral("p ") + kDash;
    if (p < 0.001) return QStringLiteral("p < 0.001");
    return QStringLiteral("p = ") + formatP(p);
}

QString fullPrecision(double v) {
    if (std::isnan(v)) return QString();
    return QString::number(v, 'g', QLocale::FloatingPointShortest);
}

QString levelPercent(double level) { return QString::number(level * 100.0, 'g', 6) + QStringLiteral(" %"); }

QString subscript(int n) {
    const QString digits = QString::number(n);
    QString out;
    for (const QChar c : digits) out += c == QLatin1Char('-') ? QChar(0x208B) : QChar(0x2080 + (c.unicode() - '0'));
    return out;
}

}  // namespace moderato::ui
