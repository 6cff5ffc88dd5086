// How the value a second moderator is held at reads in captions, readouts
// and the held-value control: "32.5 (mean + 1 SD)", "'EU' (reference level)".
#pragma once

#include <QString>
#include <QStringList>

#include "moderato/estimation/design.hpp"
#include "moderato/project/project.hpp"

namespace moderato::ui {

// How the held value is described: "32.5 (mean + 1 SD)", "30.1 (mean)",
// "'EU'", "'APAC' (reference level)", "1", "0.43 (mean)". `value` NaN: the
// default (mean, or reference level).
QString heldValueLabel(double value, double mean, double sd, const QStringList& levels = {}, bool zeroOne = false);

// "slope_pct held at 32.5 (mean + 1 SD)" for an analysis with a second
// moderator (its held value described from the fitted design); empty without one.
QString heldValueText(const Analysis& analysis, const Design& design);

}  // namespace moderato::ui
