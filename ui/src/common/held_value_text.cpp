#include "common/held_value_text.hpp"

#include <QObject>
#include <algorithm>
#include <cmath>

#include "common/number_text.hpp"

namespace moderato::ui {

namespace {
bool near(double a, double b, double scale) { return std::abs(a - b) <= 1e-9 * std::max(1.0, std::abs(scale)); }
}  // namespace

QString heldValueLabel(double value, double mean, double sd, const QStringList& levels, bool zeroOne) {
    if (zeroOne) {
        if (std::isnan(value)) return QObject::tr("%1 (mean)").arg(numberText(mean));
        return numberText(value);
    }
    if (!levels.isEmpty()) {
        const long k = std::isnan(value) ? 0 : std::lround(value);
        const QString level = k >= 0 && k < levels.size() ? levels[static_cast<int>(k)] : numberText(value);
        return k == 0 ? QObject::tr("'%1' (reference level)").arg(level) : QStringLiteral("'%1'").arg(level);
    }
    const double v = std::isnan(value) ? mean : value;
    QString tag;
    if (std::isnan(value) || near(v, mean, sd)) tag = QObject::tr("mean");
    else if (sd > 0 && near(v, mean - sd, sd)) tag = QObject::tr("mean − 1 SD");
    else if (sd > 0 && near(v, mean + sd, sd)) tag = QObject::tr("mean + 1 SD");
    return tag.isEmpty() ? numberText(v) : QStringLiteral("%1 (%2)").arg(numberText(v), tag);
}

QString heldValueText(const Analysis& a, const Design& d) {
    const std::string& second = a.roles.second_moderator;
    if (second.empty()) return {};
    const double v = a.probe.second_value;
    QString value;
    if (const CategoricalInfo* cat = d.categorical(second)) {
        QStringList levels;
        for (const auto& l : cat->levels) levels << QString::fromStdString(l);
        value = heldValueLabel(v, 0, 0, levels);
    } else {
        const auto it = d.summaries.find(second);
        if (it == d.summaries.end()) return {};
        value = heldValueLabel(v, it->second.mean, it->second.sd, {}, d.is_binary(second));
    }
    return QObject::tr("%1 held at %2").arg(QString::fromStdString(second), value);
}

}  // namespace moderato::ui
