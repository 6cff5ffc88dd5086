// The pieces every JSON document of moderato-cli shares (output_version 2;
// docs/cli-output.md lists every field): the version line, an estimate with
// its inference, the names of the standard errors, the test and the probe
// scale, and lists of intervals. The fit, probe, cell-table and bootstrap
// writers are built from these, so one name is spelled in one place.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/inference.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/scale.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

inline constexpr int kOutputVersion = 2;

// A writer with the document opened and "output_version" written first.
JsonWriter begin_document();

// `value_key` (default "value"), "se", "test_value", "p", "low", "high".
void write_inference(JsonWriter& w, const Inference& e, const char* value_key = "value");

// A joint Wald test of `terms`: "value" (its F form; chi-square / q for a
// normal reference), "df1", "df2" (null: chi-square reference),
// "chi_square", "p".
void write_joint_test(JsonWriter& w, const WaldTest& t);

// "model-based", "hc0" … "hc4", "cluster-robust".
const char* standard_errors_name(SeKind se);
// "t" for a finite reference df, "z" for the normal reference.
const char* test_name(double df);
// "model" (the coefficients' scale) or "outcome" (the outcome's own scale).
const char* scale_name(ProbeScale scale);
// "sample" (averaged over the rows) or "values" (one profile: covariates at their means or given values).
const char* averaging_name(Averaging averaging);

// key: [lo, hi], [lo, hi], … with null for an unbounded end.
void write_intervals(JsonWriter& w, const char* key, const std::vector<Region>& regions);
// key: [first, second].
void write_pair(JsonWriter& w, const char* key, const std::pair<double, double>& pair);
void write_numbers(JsonWriter& w, const char* key, const std::vector<double>& values);
void write_texts(JsonWriter& w, const char* key, const std::vector<std::string>& texts);

}  // namespace moderato
