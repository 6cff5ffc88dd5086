// A categorical moderator with several levels: every pairwise difference of
// the focal predictor's effect between two levels, with its standard error
// from the fit's covariance and p-values adjusted for the number of pairs;
// and the joint Wald test that the focal predictor's effect is the same at
// every level (all its product terms with the moderator are zero).
#pragma once

#include <Eigen/Dense>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/inference.hpp"
#include "moderato/probing/multiplicity.hpp"

namespace moderato {

// The effect at one level as a smooth function of the coefficients: its
// value and its gradient over b (for a model-scale effect, the contrast
// vector itself; on the probability scale, the delta method's gradient).
struct LevelEffect {
    std::string level;
    double value = 0;
    Eigen::VectorXd gradient;
};

// The effect at level `second` minus the effect at level `first`.
struct SlopeContrast : Inference {
    std::string first, second;
    double p_adjusted = 0;
};

// Every pair (i < j, in the order given): effect j minus effect i, tested
// with the fit's reference distribution; p_adjusted by `adjustment` over all
// the pairs. Aliased coefficients count as zero.
std::vector<SlopeContrast> slope_contrasts(const std::vector<LevelEffect>& effects, const FitResult& fit,
                                           Adjustment adjustment);

// The product terms of the design that hold both `focal` and `moderator`
// (a three-way product too), by their labels.
std::vector<std::string> interaction_terms(const Design& design, const std::string& focal,
                                           const std::string& moderator);

// The joint Wald test of those terms with the fit's covariance (F form for
// linear fits, chi-square for logistic ones); nullopt when there are none or
// one of them is aliased.
std::optional<WaldTest> interaction_test(const Design& design, const FitResult& fit, const std::string& focal,
                                         const std::string& moderator);

}  // namespace moderato
