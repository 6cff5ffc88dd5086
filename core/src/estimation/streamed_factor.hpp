// The triangular factor of the weighted [X | y] built chunk by chunk, for
// the streamed fit (private to core), and what the fit reads off it.
//
// Each chunk's rows are cut into the blocks least_squares uses (16,384 rows),
// factored by Householder QR (in double, or in long double when the whole
// problem is small enough for least_squares' long double path) and merged
// into the running factor in long double in row order. The factor is of the
// unscaled columns; the column norms are summed in long double in row order,
// as least_squares sums them, and the factor is scaled by them at the end
// (Householder QR is column-wise backward stable, so scaling before or after
// gives the same factor to rounding). Then the same rank decision and solve.
#pragma once

#include <Eigen/Dense>
#include <vector>

#include "estimation/qr_steps.hpp"
#include "moderato/estimation/least_squares.hpp"

namespace moderato::detail {

class StreamedFactor {
public:
    // p design columns; extended: factor the blocks in long double.
    StreamedFactor(Eigen::Index p, bool extended, unsigned threads);
    // Rows of X with their outcome and weights (empty: 1).
    void add(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& w);
    // The scaled factor, the rank decision and the solve (coef, inverse
    // factor, qty; residuals and rss are left to the caller); `n` rows in all.
    LeastSquaresResult finish(std::size_t n, const LeastSquaresOptions& options, VecL& coef_long);
    // The factor of the scaled [X | y] (after finish).
    const MatL& factor() const { return R_; }
    const std::vector<double>& scales() const { return scale_; }

private:
    void merge(MatL&& Rb);
    Eigen::Index p_;
    bool extended_;
    unsigned threads_;
    MatL R_;
    std::vector<long double> ss_;  // column sums of w x^2
    std::vector<double> scale_;
};

// The weighted residual sum of squares of y on the columns `cols` of the
// scaled factor (y is its last column), by re-triangularising those columns.
double factor_rss(const MatL& R, const std::vector<int>& cols);

}  // namespace moderato::detail
