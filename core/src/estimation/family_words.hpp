// A model family's name in running text (private to core; estimation's
// messages and reporting's sentences share it).
#pragma once

#include <string>

#include "moderato/estimation/model.hpp"

namespace moderato::detail {

// "linear", "logistic", "probit", "Poisson", "negative binomial".
std::string family_words(Family f);

}  // namespace moderato::detail
