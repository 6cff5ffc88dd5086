// Where two groups (or the lines at two moderator values) differ, in plain
// words against the observed range of the focal predictor: the
// Johnson–Neyman technique applied to the group gap (core's
// Crossover::gap_regions), stated as a reader would say it.
#pragma once

#include <QString>
#include <utility>
#include <vector>

#include "moderato/probing/probe.hpp"

namespace moderato::ui {

struct GapStatement {
    QString text;
    // The pieces of the observed focal range where the gap differs from zero, left to right.
    std::vector<std::pair<double, double>> differ;
    // Region boundaries (core's) inside the observed range, and those beyond it.
    std::vector<double> inside, beyond;
};

// `subject` names what is compared ("The two groups' predicted weekly_spend"),
// `focal` the focal predictor, `range` its observed range and `level` the
// interval's name ("95%"). E.g. "The two groups' predicted weekly_spend differ
// (95% pointwise) for discount_pct below 13.1 and above 18.9; between these
// values they cannot be told apart."
GapStatement describeGap(const SignificanceRegions& regions, const QString& subject, const QString& focal,
                         std::pair<double, double> range, const QString& level);

}  // namespace moderato::ui
