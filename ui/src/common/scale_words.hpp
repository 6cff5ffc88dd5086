// The workbench's words for the two scales of a generalized model (logistic,
// probit, Poisson, negative binomial): the scale its coefficients live on and
// the outcome's own scale, for the scale switch, axis titles, readouts and
// captions. A linear model has one scale, its outcome's: the model words are
// then empty and the outcome words are the outcome's name.
#pragma once

#include <QString>
#include <string>

#include "moderato/estimation/model.hpp"

namespace moderato::ui {

struct ScaleWords {
    QString modelScale;    // "log-odds", "probit", "log expected count", "log rate"; "" for linear
    QString outcomeScale;  // "probability", "expected count", "rate per hours"; "" for linear
    QString modelOf;       // "log-odds of y", "probit of P(y = 1)", "log expected y", "log rate of y"; y for linear
    QString outcomeOf;     // "P(y = 1)", "expected y", "y per hours"; y for linear
    // The scale switch's short entries: modelScale, but "log count" for
    // "log expected count"; outcomeScale, but "rate" for "rate per hours".
    QString modelSwitch, outcomeSwitch;
};

// `exposure`: a count model's exposure column, or empty.
ScaleWords scaleWords(Family family, const std::string& exposure, const QString& outcome);

// "Linear", "Logistic", "Probit", "Poisson", "Negative binomial".
QString familyTitle(Family family);

}  // namespace moderato::ui
