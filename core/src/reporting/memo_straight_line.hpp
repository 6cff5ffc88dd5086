// The memo's words for the straight-line check (private to reporting): the
// binned estimates bin by bin with the straight line's effect beside them,
// the linearity test, the smooth curve's bandwidth and band, where the data
// are thin, and the cautions the check needs. Nothing is said when neither
// part of the check is switched on.
#pragma once

#include <string>
#include <vector>

#include "moderato/project/analysis_run.hpp"

namespace moderato::detail {

// "Bin 1 of z (z from 0 to 3.2, 120 rows): at its median 1.5 the effect of x
// is 0.52 (95% CI 0.31 to 0.73); the straight line gives 0.49 there.", the
// linearity sentence, the smooth curve's bandwidth (and how it was chosen)
// and its band, and the thin stretches of the moderator.
void straight_line_sentences(const AnalysisRun& run, std::vector<std::string>& out);
// Adds, when the check is shown: the test's limited power ("not
// contradicted" is no proof of a straight line), thin data, the log-odds
// scale of a logistic model's check, and the check's own notes and cautions.
void straight_line_cautions(const AnalysisRun& run, std::vector<std::string>& out);

}  // namespace moderato::detail
