// A NIST StRD linear least-squares dataset's model as a specification.
#pragma once

#include "common/nist.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato::test {

// y on the predictors, or on x, x^2, ... x^d.
inline ModelSpec nist_spec(const NistCase& c) {
    ModelSpec s;
    s.outcome = "y";
    s.intercept = c.intercept;
    if (c.degree < 0) s.predictors = c.predictors;
    else s.polynomial["x"] = c.degree;
    return s;
}

}  // namespace moderato::test
