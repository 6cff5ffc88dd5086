// The tables of a multilevel analysis (private to reporting): its variance
// components, the likelihood-ratio tests of its random slopes and its fit
// statistics (no R²: variance at two levels gives it no single reading).
// Display text follows support/report_text.hpp; the CSV column carries
// the exact doubles.
#pragma once

#include <optional>
#include <string>

#include "moderato/estimation/fit.hpp"
#include "moderato/reporting/table_export.hpp"

namespace moderato::detail {

// "REML" or "ML".
std::string estimation_name(MixedEstimation e);
// What a random-part row is called: "intercept", "slope of hours", "residual".
std::string random_term_name(const std::string& term);

// One row per random effect and the residual: variance, SD, and (full
// covariance, several terms) the correlations with the terms above it; the
// groups, the estimation and the intraclass correlation as notes.
ExportTable variance_components_table(const MultilevelResult& m);
// One row per random slope: the likelihood ratio, the mixture it is
// referred to and p. None without random slopes.
std::optional<ExportTable> slope_tests_table(const MultilevelResult& m);
// Observations, groups, residual SD, the Wald test of all terms, the
// criterion, AIC and BIC.
ExportTable multilevel_fit_table(const FitResult& fit);
// The estimates table's note on the degrees of freedom of a multilevel fit.
std::string df_note(const FitResult& fit);

}  // namespace moderato::detail
