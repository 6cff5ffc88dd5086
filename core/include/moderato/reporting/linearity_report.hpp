// The binned and smooth estimates and common support as JSON (output_version
// 2; every field in docs/cli-output.md) and as readable text.
#pragma once

#include <string>

#include "moderato/probing/binned_effects.hpp"
#include "moderato/probing/common_support.hpp"
#include "moderato/probing/smooth_effects.hpp"
#include "moderato/reporting/json_writer.hpp"

namespace moderato {

void write_binned(JsonWriter& w, const BinnedEffects& binned);
void write_smooth(JsonWriter& w, const SmoothEffects& smooth);
void write_common_support(JsonWriter& w, const CommonSupport& support);

std::string binned_to_text(const BinnedEffects& binned);
// Every `step`-th grid point (and the last).
std::string smooth_to_text(const SmoothEffects& smooth, std::size_t step = 7);
std::string common_support_to_text(const CommonSupport& support);

}  // namespace moderato
