// Is a count model's variance what it assumes? The Poisson overdispersion
// check, and the warnings a reader of a Poisson or negative binomial fit
// needs about it (private to core).
#pragma once

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"

namespace moderato::detail {

// Pearson's chi-square over its df and the Cameron & Trivedi (1990)
// auxiliary regression test, at the fitted means of a Poisson fit.
Overdispersion overdispersion(const Design& d, const FitResult& f);

// Adds to f.warnings: a Poisson fit whose counts vary more than it allows
// (its classical standard errors too small), and a negative binomial alpha
// at its lower limit (no sign of overdispersion).
void add_dispersion_warnings(FitResult& f);

}  // namespace moderato::detail
