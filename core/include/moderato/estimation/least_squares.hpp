// Weighted least squares: the design is scaled to unit column norms and
// reduced to the triangular factor R of [X | y]: small problems by one
// Householder QR in 80-bit long double; large ones from the cross-products
// (blocks on all threads, summed in long double) when each column keeps 1e-4
// of its squared norm outside the earlier columns' span, else by a tall-skinny
// QR over fixed row blocks in double merged in long double. The rank is decided
// by a pivoted QR of R; columns beyond it are reported as aliased, never
// silently dropped; the kept columns are solved in long double.
#pragma once

#include <Eigen/Dense>
#include <vector>

namespace moderato {

struct LeastSquaresResult {
    int rank = 0;
    std::vector<int> kept;     // estimable columns, ascending
    std::vector<int> aliased;  // columns that are linear combinations of earlier ones
    Eigen::VectorXd coef;      // p entries; NaN for aliased columns
    // k x k factor A with (X_K' W X_K)^{-1} = A A' (K: kept columns). The rows
    // of X_K A give leverages and scores without forming X'X.
    Eigen::MatrixXd inverse_factor;
    Eigen::VectorXd residuals;  // y - X b (unweighted)
    double rss = 0;             // sum of w e^2
    // Q'y of the unpivoted factorisation of [X | y] in design column order:
    // qty[j]^2 is the drop in RSS from adding column j after columns 0..j-1
    // (sequential sums of squares), valid while the design has full rank.
    Eigen::VectorXd qty;
    bool extended_precision = false;
};

struct LeastSquaresOptions {
    unsigned threads = 0;  // 0: all hardware threads
    // Relative size of a pivot in R (of the unit-norm-scaled design) below
    // which a column counts as aliased.
    double rank_tolerance = 1e-13;
    // Problems with n * (p + 1)^2 at most this use one long double QR.
    double extended_budget = 2e7;
};

// weights: empty for OLS, else positive weights (WLS).
LeastSquaresResult least_squares(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                 const Eigen::VectorXd& weights = {}, const LeastSquaresOptions& options = {});

}  // namespace moderato
