// The words for a model's family in the memo and the tables (private to
// reporting): the scale
// its coefficients live on, the outcome's own scale, a count model's rate
// ratios, and the cautions a logistic, probit, Poisson or negative binomial
// model needs. A linear model gets plain words and no cautions here.
#pragma once

#include <string>
#include <vector>

#include "estimation/family_words.hpp"
#include "moderato/project/analysis_run.hpp"

namespace moderato::detail {

// What a coefficient changes: "the log-odds of y = 1", "the probit of
// P(y = 1)", "the log expected count of y", "the log rate of y per unit of
// E"; the outcome's name for a linear model.
std::string model_scale_target(const FitResult& fit, const std::string& outcome);
// " on the log-odds scale", " on the log expected count scale"; "" for a
// linear model.
std::string model_scale_clause(const FitResult& fit);
// What an effect changes on the probe's scale: the outcome's own words on
// the outcome scale ("P(y = 1)", "the expected count of y"), else as
// model_scale_target.
std::string effect_target(const ProbeResult& p, const FitResult& fit);
// A count model's rate ratios in a sentence: "As rate ratios, one unit more
// of x multiplies the expected count of y by 1.2 (95% CI 1.1 to 1.3) at
// z = 2 (mean), ..."; nothing for other families.
void rate_ratio_sentence(const ProbeResult& p, const FitResult& fit, std::vector<std::string>& out);
// Adds the family's cautions not already said: the product coefficient on
// the model's scale gives neither the size nor the sign of the interaction on
// the outcome's scale; a Poisson model's overdispersion (pointing to the
// negative binomial); effects per unit of an exposure.
void family_cautions(const Analysis& a, const AnalysisRun& run, std::vector<std::string>& out);

}  // namespace moderato::detail
