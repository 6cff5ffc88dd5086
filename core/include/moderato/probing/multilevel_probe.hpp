// What probing a multilevel fit adds: the spread of the groups' own slopes
// around the conditional effect, and the notes and cautions its readers
// need (a typical group's effect, the df used, few groups).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"

namespace moderato {

// None unless the fit is multilevel with a random slope for `focal`.
std::optional<GroupSlopeSpread> group_slope_spread(const FitResult& fit, const std::string& focal);

// Notes on the df a multilevel probe uses (appended to `r.notes`).
void add_multilevel_notes(const FitResult& fit, ProbeResult& r);

// The cautions of a multilevel probe (none for a single-level fit).
std::vector<std::string> multilevel_cautions(const FitResult& fit, const ProbeResult& r);

}  // namespace moderato
