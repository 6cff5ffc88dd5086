// The random part of a multilevel fit in JSON (`estimation`, `df_method`,
// `random_effects`: docs/cli-output.md) and as readable text.
#pragma once

#include <string>

#include "moderato/estimation/fit.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

// Writes "estimation", "df_method" and "random_effects" into an opened object.
void write_multilevel_fields(JsonWriter& w, const FitResult& fit);
// The random part: variances, SDs and correlations, the ICC, the groups,
// the random slopes' tests, each group's modes when asked for.
std::string multilevel_text(const FitResult& fit);

}  // namespace moderato
