// What a multilevel (linear mixed) fit adds to a fit's result: the random
// effects' covariance and the residual variance, the groups, the tests of
// the random slopes, each group's conditional modes, and what the chosen
// degrees of freedom need for combinations of the fixed effects.
#pragma once

#include <Eigen/Dense>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/mixed_df.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato {

// The likelihood-ratio test of one random slope: the model with it against
// the model without it, a 50:50 chi-square mixture (mixed_fit.hpp).
struct RandomSlopeTest {
    std::string term;
    double statistic = 0, p_value = 1;
    int df_low = 0, df_high = 1;
};

// A group's conditional modes (best linear unbiased predictions) of its
// random effects, in the order of `terms`, with their conditional
// covariance given the estimated variance parameters.
struct GroupEffect {
    std::string group;
    std::size_t rows = 0;
    Eigen::VectorXd mode;
    Eigen::MatrixXd covariance;
};

struct MultilevelResult {
    std::string groups;  // the grouping column
    MixedEstimation estimation = MixedEstimation::Reml;
    RandomCovariance structure = RandomCovariance::Full;
    FixedEffectDf df = FixedEffectDf::Satterthwaite;
    std::size_t groups_count = 0, size_min = 0, size_max = 0;
    double size_median = 0;
    std::vector<std::string> terms;  // "intercept", then the random slopes' columns
    std::vector<int> term_columns;   // the fixed-effect column of each (-1: none)
    Eigen::MatrixXd covariance;      // T, in `terms` order
    double residual_variance = 0;
    double icc = std::numeric_limits<double>::quiet_NaN();  // random-intercept models only
    bool singular = false, converged = true;
    int evaluations = 0;
    std::vector<RandomSlopeTest> slope_tests;
    std::vector<GroupEffect> group_effects;  // every group, in order of first appearance
    bool report_group_effects = false;
    std::optional<SatterthwaiteDf> satterthwaite;  // df for any combination (Satterthwaite df)
    std::vector<int> kept_columns;                 // the estimable fixed-effect columns (Satterthwaite's order)

    // The df of a combination c of the fixed effects under the chosen rule
    // (`fallback` where it has no answer of its own).
    double df_of(const Eigen::VectorXd& c, double fallback) const;
    // The rule the df came from: `df`, except between–within where
    // Satterthwaite's df had no answer (a variance at its boundary).
    FixedEffectDf df_used() const {
        return df == FixedEffectDf::Satterthwaite && !satterthwaite ? FixedEffectDf::BetweenWithin : df;
    }
};

}  // namespace moderato
