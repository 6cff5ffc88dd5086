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

// A group's own fitted line along the focal predictor: the fixed part at the
// group's moderator value (its mean over the group's rows: the value itself
// for a group-level moderator), shifted by the group's conditional modes
// (intercept, and slope when the focal predictor has a random slope).
struct GroupLine {
    std::string group;
    double moderator = 0;
    double intercept_shift = 0, slope_shift = 0;
};

// Up to `most` groups, spread evenly over the groups ordered by their
// moderator value (every group when there are no more); none for a
// single-level fit or a categorical moderator.
std::vector<GroupLine> group_lines(const Design& d, const FitResult& fit, const std::string& focal,
                                   const std::string& moderator, std::size_t most);

// Notes on the df a multilevel probe uses (appended to `r.notes`).
void add_multilevel_notes(const FitResult& fit, ProbeResult& r);

// The cautions of a multilevel probe (none for a single-level fit).
std::vector<std::string> multilevel_cautions(const FitResult& fit, const ProbeResult& r);

}  // namespace moderato
