// A fit as JSON (output_version 2: ARCHITECTURE.md's CLI contract, every
// field in docs/cli-output.md; 17 significant digits) and as a readable text
// table.
#pragma once

#include <string>

#include "moderato/estimation/fit.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

// Writes the fit's fields into an object that the caller has opened.
void write_fit_fields(JsonWriter& w, const FitResult& fit);
// A whole document: output_version, then the fit's fields.
std::string fit_to_json(const FitResult& fit);
std::string fit_to_text(const FitResult& fit, const std::string& outcome);

// A joint test as a reader sees it: "F(2, 440) = 5.310, p = 0.005", or
// "χ²(2) = …" for a normal reference.
std::string joint_test_text(const WaldTest& t);
// The standard errors as a reader sees them: "model-based", "HC3
// (heteroskedasticity-consistent)", "cluster-robust (CR1)".
const char* standard_errors_text(SeKind se);

}  // namespace moderato
