// Fits a linear mixed model with one grouping factor: maximises the
// profiled REML or ML criterion (mixed_criterion.hpp) over the Cholesky
// factor L of the relative random-effects covariance Psi = L L' (full:
// every entry of the lower triangle; diagonal: its diagonal only), with the
// derivative-free Nelder–Mead simplex, restarted from its best point until a
// restart no longer improves it. L's diagonal may take either sign (Psi is
// the same), so the search has no bounds; a variance at zero or a
// correlation at ±1 shows as a zero on L's diagonal and is reported as a
// singular (boundary) fit.
#pragma once

#include <Eigen/Dense>

#include "moderato/estimation/mixed_criterion.hpp"

namespace moderato {

struct MixedFitOptions {
    MixedEstimation estimation = MixedEstimation::Reml;
    RandomCovariance covariance = RandomCovariance::Full;
};

struct MixedFit {
    double criterion = 0;               // the maximised REML or ML log-likelihood
    Eigen::VectorXd beta;               // fixed effects
    Eigen::MatrixXd beta_covariance;    // sigma2 (X' V^-1 X)^-1
    double residual_variance = 0;       // sigma2
    Eigen::MatrixXd random_covariance;  // sigma2 Psi, in the order of Z's columns
    bool singular = false;              // a variance at zero or a correlation at ±1
    bool converged = false;
    int evaluations = 0;
};

MixedFit fit_mixed(const MixedCrossproducts& data, const MixedFitOptions& options = {});

// The likelihood-ratio test of one more random effect (a random slope) in a
// model with `before` random effects and a full covariance: the statistic
// 2 (l_with − l_without), both fits REML (same fixed effects) or both ML.
// Its variance lies on the boundary of the null, so the reference is the
// 50:50 mixture of chi-square(before) and chi-square(before + 1) (Self and
// Liang 1987; Stram and Lee 1994): p = (P(X_before > s) + P(X_before+1 > s)) / 2.
struct RandomEffectTest {
    double statistic = 0;  // negative differences (an optimiser's noise) count as 0
    double p_value = 1;
    Eigen::Index df_low = 0, df_high = 1;  // the mixture's two degrees of freedom
};
RandomEffectTest added_random_effect_test(const MixedFit& without, const MixedFit& with, Eigen::Index before);

}  // namespace moderato
