// The steps of least squares on the small triangular factor of the scaled,
// weighted [X | y], shared by least_squares and the streamed fit (private to
// core): the factor of a block, the rank decision and the solve.
#pragma once

#include <Eigen/Dense>
#include <algorithm>
#include <vector>

#include "moderato/estimation/least_squares.hpp"

namespace moderato::detail {

using MatL = Eigen::Matrix<long double, Eigen::Dynamic, Eigen::Dynamic>;
using VecL = Eigen::Matrix<long double, Eigen::Dynamic, 1>;

// Upper-triangular R (at most p1 rows) of a Householder QR of M.
template <class Mat>
Mat triangular_factor(const Mat& M) {
    Eigen::HouseholderQR<Mat> qr(M);
    const Eigen::Index rows = std::min(M.rows(), M.cols());
    Mat R = qr.matrixQR().topRows(rows);
    R.template triangularView<Eigen::StrictlyLower>().setZero();
    return R;
}

// Numerical rank from a pivoted QR of the small factor: the kept columns
// (ascending), the aliased ones and the rank go into `out`.
void decide_rank(const MatL& Raug, Eigen::Index p, double tolerance, LeastSquaresResult& out);

// Solves the full-rank problem on the kept columns: the coefficients (NaN for
// aliased columns) and the inverse factor go into `out`; the coefficients are
// also returned in long double (0 for aliased columns) for the residuals.
VecL solve_kept(const MatL& Raug, const std::vector<double>& scale, LeastSquaresResult& out);

}  // namespace moderato::detail
