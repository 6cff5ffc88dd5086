// Generalized models on the outcome's own scale (the probability of a 0/1
// outcome; the expected count, or the rate per unit of exposure, of a count):
// conditional marginal effects of
// the focal predictor at moderator values (averaged over the sample, or at
// chosen covariate values) and the interaction effect as a cross-partial
// derivative or double difference (Ai & Norton 2003), with delta-method
// standard errors. A product coefficient on the log-odds, probit or log scale
// is not the interaction on the outcome's scale; these are. (The names say
// "probability" for history; they serve every generalized family.)
#pragma once

#include <map>
#include <string>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/scale.hpp"

namespace moderato {

struct ScaleRequest {
    std::string focal, moderator;
    Averaging averaging = Averaging::Sample;
    std::map<std::string, double> values;  // held values (AtValues), and always any second moderator
};

// "P(y = 1)", "the expected count of y" or "the rate of y per unit of E".
std::string outcome_scale_words(const FitResult& fit, const std::string& outcome);
// The focal predictor's effect on the outcome's scale with the moderator at m: the
// derivative for a continuous focal, the discrete change from 0 to 1 for a
// 0/1 focal. Analytic delta-method standard error.
EffectPoint probability_effect(const Design& d, const FitResult& fit, const ScaleRequest& request, double m);
// The same effect's value and its gradient over the coefficients (the
// delta method's ingredients, e.g. for differences between levels).
LevelEffect probability_effect_gradient(const Design& d, const FitResult& fit, const ScaleRequest& request, double m);

// Where that effect differs from zero, scanning `lo`..`hi` and refining sign
// changes of |t| - q with a bracketing root finder.
SignificanceRegions probability_regions(const Design& d, const FitResult& fit, const ScaleRequest& request,
                                        double critical_value, double lo, double hi, int grid = 240);

// The interaction effect on the probability scale (Ai & Norton 2003):
// d2P/dF dM (both continuous), the change of dP/dM between F = 0 and 1 (one
// binary), or P11 - P10 - P01 + P00 (both binary). Delta-method SE from a
// Richardson-extrapolated numerical Jacobian.
InteractionEffect probability_interaction(const Design& d, const FitResult& fit, const ScaleRequest& request);

// The probe of a logistic fit on the probability scale: effects at the
// moderator values of `spec` (or its defaults), the region of significance
// by a scan over the observed range widened by a quarter on each side, the
// crossover points (where probability lines cross is where the log-odds
// lines cross, so they come from the link scale), and the interaction effect.
// No simultaneous band: the effect is not linear in the coefficients.
ProbeResult probe_response(const Design& d, const FitResult& fit, const ProbeSpec& spec, Averaging averaging);

}  // namespace moderato
