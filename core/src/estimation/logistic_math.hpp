// The logistic function and friends, written to neither overflow nor lose
// digits far in the tails (private to core).
#pragma once

#include <cmath>

namespace moderato::detail {

// 1 / (1 + exp(-x))
inline double expit(double x) { return x >= 0 ? 1.0 / (1.0 + std::exp(-x)) : std::exp(x) / (1.0 + std::exp(x)); }
// log(1 + exp(x))
inline double log1pexp(double x) { return x > 0 ? x + std::log1p(std::exp(-x)) : std::log1p(std::exp(x)); }

}  // namespace moderato::detail
