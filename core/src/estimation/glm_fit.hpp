// Maximum likelihood for the generalized families (private to core): Newton's
// method with step halving for logistic, probit and Poisson models. The start
// is a weighted least-squares solve by QR (which columns are estimable); the
// steps solve with the Cholesky factor of X'WX (QR when that is too
// ill-conditioned); the covariance factor at the estimate is a QR again, so
// the standard errors never depend on X'WX. The negative
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

// Where Newton's method may start instead of the QR start: coefficients for
// every column of X (0 for the aliased ones) and the estimable columns.
struct GlmStart {
    Eigen::VectorXd beta;
    std::vector<int> kept;
};

// Fits `family` (not Linear) to the columns X with the design's outcome,
// weights and offset. Without `covariance_factor` the QR at the estimate is
// skipped (factor holds only the kept columns; the negative binomial always
// has it): for fits whose likelihood alone is wanted. A `start` skips the QR
// of the start (not for the negative binomial).
GlmFit fit_glm(const Design& d, const Eigen::MatrixXd& X, Family family, int max_iterations,
               const LeastSquaresOptions& lso, bool covariance_factor = true, const GlmStart* start = nullptr);

}  // namespace moderato::detail
