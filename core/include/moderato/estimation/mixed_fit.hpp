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

enum class RandomCovariance { Full, Diagonal };

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

}  // namespace moderato
