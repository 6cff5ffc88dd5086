// The Estimates section's words for a multilevel fit, as rich text: what the
// coefficient table is, the fit statistics (no R²: variance at two levels
// gives it no single reading) and the test of the interaction terms, with
// the degrees of freedom as format_df writes them.
#pragma once

#include <QString>

#include "moderato/estimation/fit.hpp"

namespace moderato::ui {

// "<b>Coefficients</b> of score · multilevel linear model in groups of team …".
QString multilevelHeader(const std::string& outcome, const FitResult& fit);
// Table rows: n, groups, residual SD, the Wald test of all terms, the
// criterion, AIC, BIC.
QString multilevelFitRows(const FitResult& fit);
// The Wald test of the product terms with the model's covariance.
QString multilevelComparison(const FitResult& fit);
// "F(1, 27.19) = 88.61, p < 0.001" or "χ²(1) = 88.61, p < 0.001" (escaped).
QString waldText(const WaldTest& w);

}  // namespace moderato::ui
