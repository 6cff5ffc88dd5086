// The outcome's values checked against the model's family, and the exposure
// column of a count model turned into an offset (private to core).
#pragma once

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::detail {

// The exposure column, checked for kind and family; "" when the model has none.
// Throws InputError when it is named for a family without a log link.
void check_exposure_column(const Table& table, const ModelSpec& spec);

// Over the design's rows: 0 or 1 for logistic and probit outcomes; whole
// counts of at least 0 for Poisson and negative binomial ones (a value that
// is not whole is a warning, a negative one an error); an outcome with one
// value throughout is refused for every generalized family. Throws
// InputError naming the row and its value.
void check_outcome(const Table& table, const ModelSpec& spec, Design& d);

// d.offset = log(exposure) over the design's rows; every exposure must be
// positive and finite (InputError naming the row otherwise).
void fill_offset(const Table& table, const ModelSpec& spec, Design& d);

}  // namespace moderato::detail
