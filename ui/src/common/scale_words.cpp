#include "common/scale_words.hpp"

#include <QCoreApplication>

namespace moderato::ui {

namespace {

QString tr(const char* text) { return QCoreApplication::translate("ScaleWords", text); }

}  // namespace

ScaleWords scaleWords(Family family, const std::string& exposure, const QString& outcome) {
    const QString per = QString::fromStdString(exposure);
    ScaleWords w{QString(), QString(), outcome, outcome, QString(), QString()};
    switch (family) {
        case Family::Logistic:
            w = {tr("log-odds"),
                 tr("probability"),
                 tr("log-odds of %1").arg(outcome),
                 tr("P(%1 = 1)").arg(outcome),
                 {},
                 {}};
            break;
        case Family::Probit:
            w = {tr("probit"),
                 tr("probability"),
                 tr("probit of P(%1 = 1)").arg(outcome),
                 tr("P(%1 = 1)").arg(outcome),
                 {},
                 {}};
            break;
        case Family::Poisson:
        case Family::NegativeBinomial:
            if (per.isEmpty()) {
                w = {tr("log expected count"),
                     tr("expected count"),
                     tr("log expected %1").arg(outcome),
                     tr("expected %1").arg(outcome),
                     {},
                     {}};
                w.modelSwitch = tr("log count");
            } else {
                w = {tr("log rate"),
                     tr("rate per %1").arg(per),
                     tr("log rate of %1").arg(outcome),
                     tr("%1 per %2").arg(outcome, per),
                     {},
                     {}};
                w.outcomeSwitch = tr("rate");
            }
            break;
        case Family::Linear:
            break;
    }
    if (w.modelSwitch.isEmpty()) w.modelSwitch = w.modelScale;
    if (w.outcomeSwitch.isEmpty()) w.outcomeSwitch = w.outcomeScale;
    return w;
}

QString familyTitle(Family family) {
    switch (family) {
        case Family::Logistic:
            return tr("Logistic");
        case Family::Probit:
            return tr("Probit");
        case Family::Poisson:
            return tr("Poisson");
        case Family::NegativeBinomial:
            return tr("Negative binomial");
        case Family::Linear:
            break;
    }
    return tr("Linear");
}

}  // namespace moderato::ui
