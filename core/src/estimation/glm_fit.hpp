// Maximum likelihood for the generalized families (private to core): Newton's
// method with step halving for logistic, probit and Poisson models, each step
// a weighted least-squares solve by QR so X'WX is never formed; the negative
// binomial alternates Newton steps for beta at fixed alpha with Newton steps
// for log alpha, then polishes (beta, alpha) jointly.
#pragma once

#include <Eigen/Dense>
#include <limits>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato::detail {

struct GlmFit {
    Eigen::VectorXd beta;       // p; NaN for aliased columns
    LeastSquaresResult factor;  // at the estimate: (X' V X)^{-1} = A A', V the observed information weights
    Eigen::VectorXd eta;        // linear predictor, offset included
    Eigen::VectorXd mu;         // the mean
    Eigen::VectorXd score;      // prior weight x d loglik_i / d eta_i
    double loglik = 0;
    int iterations = 0;
    bool converged = false;
    // Negative binomial: alpha, and the inverse of the negative Hessian of
    // (beta_K, alpha) (kept columns, then alpha); alpha's per-row score.
    double alpha = std::numeric_limits<double>::quiet_NaN();
    Eigen::MatrixXd joint_inverse;
    Eigen::VectorXd alpha_score;
};

// Fits `family` (not Linear) to the columns X with the design's outcome,
// weights and offset.
GlmFit fit_glm(const Design& d, const Eigen::MatrixXd& X, Family family, int max_iterations,
               const LeastSquaresOptions& lso);

}  // namespace moderato::detail
