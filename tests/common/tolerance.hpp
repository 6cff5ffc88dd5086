// The relative difference the tests compare against their tolerances
// ("1e-8 relative" and the like): one definition for every suite.
#pragma once

#include <algorithm>
#include <cmath>
#include <limits>

namespace moderato::test {

// |a - b| / |b|, `b` being the expected value. Equal values give 0 (two
// zeros, or the same infinity); otherwise the division is by |b| but never by
// less than the smallest normal double, so an expected 0 gives a huge ratio
// rather than inf or NaN. A NaN on either side gives NaN, which fails every
// comparison with a tolerance.
inline double rel(double a, double b) {
    if (a == b) return 0;
    return std::abs(a - b) / std::max(std::abs(b), std::numeric_limits<double>::min());
}

}  // namespace moderato::test
