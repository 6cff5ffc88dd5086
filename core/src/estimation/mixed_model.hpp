// A multilevel (linear mixed) fit of a design whose specification names
// groups: the random part, the fit, the chosen degrees of freedom, the
// random slopes' tests and the groups' conditional modes, as a FitResult.
#pragma once

#include "moderato/estimation/fit.hpp"

namespace moderato::detail {

FitResult fit_mixed_design(const Design& d, const ModelSpec& spec);

// The parts of a result every fit starts from (fit.cpp).
FitResult start_result(const Design& d, const ModelSpec& spec);

// The warnings every fit's reader must see about its columns and standard
// errors (fit.cpp): aliased columns, fewer than 30 clusters, and rows of
// leverage 1 under HC2-HC4 (linear fits).
void add_column_warnings(const ModelSpec& spec, int n_clusters, FitResult& f);

}  // namespace moderato::detail
