#include "common/number_text.hpp"

#include <QLocale>
#include <algorithm>
#include <cmath>

namespace moderato::ui {

QString numberText(double v, int significant) {
    if (std::isnan(v)) return QStringLiteral("—");
    if (std::isinf(v)) return v > 0 ? QStringLiteral("∞") : QStringLiteral("−∞");
    if (v == 0) return QStringLiteral("0");
    const double a = std::abs(v);
    if (a >= 1e7 || a < 1e-5) return QLocale::c().toString(v, 'g', significant);
    const int magnitude = static_cast<int>(std::floor(std::log10(a)));
    const int decimals = std::clamp(significant - 1 - magnitude, 0, 8);
    return QLocale::c().toString(v, 'f', decimals);
}

QString pValueText(double p) {
    if (std::isnan(p)) return QStringLiteral("—");
    if (p < 0.001) return QStringLiteral("< 0.001");
    return QLocale::c().toString(p, 'f', 3);
}

QString countText(double n) {
    if (std::isnan(n)) return QStringLiteral("—");
    return QLocale(QLocale::English).toString(static_cast<qlonglong>(std::llround(n)));
}

}  // namespace moderato::ui
