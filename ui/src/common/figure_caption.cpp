#include "common/figure_caption.hpp"

#include <QStringList>

#include "common/held_value_text.hpp"
#include "common/number_text.hpp"
#include "common/scale_words.hpp"
#include "moderato/reporting/analysis_tables.hpp"

namespace moderato::ui {

QString seDescription(const Analysis& a, const AnalysisRun& run) {
    return QString::fromStdString(se_description(run.fit, a.roles.clusters));
}

QString figureCaption(const Analysis& a, const AnalysisRun& run) {
    const QString family = run.fit.multilevel ? QStringLiteral("Multilevel linear") : familyTitle(a.family);
    QString terms =
        QString::fromStdString(a.roles.focal) + QStringLiteral(" × ") + QString::fromStdString(a.roles.moderator);
    if (!a.roles.second_moderator.empty())
        terms += QStringLiteral(" × ") + QString::fromStdString(a.roles.second_moderator);
    QString text = QStringLiteral("%1 model of %2 on %3").arg(family, QString::fromStdString(a.roles.outcome), terms);
    if (!a.roles.controls.empty())
        text += a.roles.controls.size() == 1 ? QStringLiteral(" (+1 control)")
                                             : QStringLiteral(" (+%1 controls)").arg(a.roles.controls.size());
    if (!a.roles.weights.empty())
        text += QStringLiteral(", weighted by %1").arg(QString::fromStdString(a.roles.weights));
    if (!run.fit.exposure.empty())
        text += QStringLiteral(", per unit of %1 (exposure)").arg(QString::fromStdString(run.fit.exposure));
    if (run.fit.multilevel)
        text += QStringLiteral(", %1 groups of %2")
                    .arg(countText(static_cast<long long>(run.fit.multilevel->groups_count)),
                         QString::fromStdString(run.fit.multilevel->groups));
    // A three-way model's figures hold the second moderator at one value: say which.
    const QString held = heldValueText(a, run.design);
    if (!held.isEmpty()) text += QStringLiteral(", ") + held;
    // No-break spaces keep "n = 1,200" on one line when the caption wraps.
    text += QStringLiteral(" · %1 SEs · %2 intervals · n\u00A0=\u00A0%3")
                .arg(seDescription(a, run))
                .arg(levelText(a.level))
                .arg(countText(static_cast<long long>(run.fit.n)));
    return text;
}

QString figureCaption(const Analysis& a, const AnalysisRun& run, FigurePlot plot) {
    QString text = figureCaption(a, run);
    const bool binned = a.probe.show_binned && run.binned, smooth = a.probe.show_smooth && run.smooth;
    if (plot != FigurePlot::Effect || (!binned && !smooth)) return text;
    const QString model = scaleWords(a.family, run.fit.exposure, QString()).modelScale;
    if (generalized(a.family) && a.probe.scale == ProbeScale::Outcome)
        return text + QStringLiteral(" · straight-line check not drawn (%1 scale only)").arg(model);
    QStringList parts;
    if (binned) parts << QStringLiteral("binned estimates (%1 bins)").arg(run.binned->bins.size());
    if (smooth) parts << QStringLiteral("smooth curve (bandwidth %1)").arg(numberText(run.smooth->bandwidth));
    text += QStringLiteral(" · straight-line check: ") + parts.join(QStringLiteral(", "));
    if (generalized(a.family)) text += QStringLiteral(", %1 scale").arg(model);
    return text;
}

}  // namespace moderato::ui
