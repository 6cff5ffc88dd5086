// Curves for the probing plots, from a fitted design: the predicted outcome
// along the focal predictor with its confidence band (one line of the Lines
// plot) and the conditional effect with its band along the moderator (the
// Effect plot). Each point costs O(p^2) on the cached coefficients and
// covariance, so a plot can be redrawn on every frame of a drag without
// refitting anything.
#pragma once

#include <limits>
#include <map>
#include <string>
#include <utility>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"

namespace moderato {

struct CurvePoint {
    double x = 0;          // focal value (a line) or moderator value (an effect curve)
    double estimate = 0;   // predicted outcome, probability or effect
    double std_error = 0;  // on the scale of `estimate`
    double lower = 0, upper = 0;
};

// The predicted outcome at each focal value in `xs` with every other column
// held at `values` (as design_row reads them; typical_values(design, {{moderator, m}})
// holds the rest at their means and reference levels).
//   Link scale: x'b, SE sqrt(x'Vx), interval x'b -+ q SE.
//   probability = true (generalized fits, the outcome's own scale): the mean
//   g^-1(x'b) by the family's link (expit, Phi, exp: a probability, or an
//   expected count per unit of any exposure, which x'b leaves out), the
//   interval the link-scale interval mapped through g^-1 (so it stays inside
//   0..1, or above 0), and the SE by the delta method, (g^-1)'(x'b) SE.
// q is `critical_value`, or the fit's (pointwise, at its level) when NaN.
// Aliased coefficients count as zero.
std::vector<CurvePoint> prediction_line(const Design& design, const FitResult& fit, const std::string& focal,
                                        std::map<std::string, double> values, const std::vector<double>& xs,
                                        bool probability = false,
                                        double critical_value = std::numeric_limits<double>::quiet_NaN());

// effect(m) -+ q sqrt(var(m)) at each m: q = fit.critical_value for the
// pointwise band, the simultaneous critical value for the simultaneous band.
std::vector<CurvePoint> effect_band(const EffectFunction& f, const std::vector<double>& ms, double critical_value);

// The effect at one moderator value with its test and interval at the fit's
// level (as probe() reports it); beyond_data when m lies outside `observed`.
EffectPoint effect_at(const EffectFunction& f, double m, const FitResult& fit, std::pair<double, double> observed);

// n evenly spaced values from lo to hi, both included (n >= 2).
std::vector<double> even_grid(double lo, double hi, int n);

}  // namespace moderato
