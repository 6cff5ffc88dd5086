// The memo's words for a multilevel analysis (private to reporting): the
// random part in sentences, the test of the interaction with the model's
// own standard errors, and the cautions such a fit needs. Nothing here
// mentions R²: a multilevel fit reports none.
#pragma once

#include <string>
#include <vector>

#include "moderato/project/analysis_run.hpp"

namespace moderato::detail {

// The groups and their sizes, the variances (SDs, correlations) between and
// within groups, the intraclass correlation where it is defined, each random
// slope's likelihood-ratio test and the degrees of freedom of the tests.
void multilevel_sentences(const AnalysisRun& run, std::vector<std::string>& out);
// "With the multilevel model's standard errors the test of the interaction
// term is a Wald test: F(1, 27.19) = 88.61, p < 0.001."
std::string multilevel_comparison_sentence(const AnalysisRun& run);
// Adds, unless `out` says them already: effects are those of a typical
// group; few groups (under 30); a singular fit; extrapolation to other groups.
void multilevel_cautions(const AnalysisRun& run, std::vector<std::string>& out);

}  // namespace moderato::detail
