// The small triangular factor of the scaled, weighted [X | y] from the
// cross-products (private to core): a faster road to the factor that
// least_squares otherwise gets by a tall-skinny Householder QR, taken only
// where the cross-products keep the digits the QR would.
#pragma once

#include <Eigen/Dense>
#include <optional>
#include <vector>

#include "estimation/qr_steps.hpp"

namespace moderato::detail {

// The factor of the cross-products of X and y (weighted when `weights` is not
// empty), with X's columns scaled to unit norm, and those scales.
struct GramFactor {
    MatL Raug;                  // (p + 1) x (p + 1), upper triangular
    std::vector<double> scale;  // X's weighted column norms
};

// Builds the weighted cross-products of [X | y] in one pass over fixed row
// blocks (all threads, blocks summed in long double in block order, so the
// result does not depend on the thread count) and takes the Cholesky factor
// of X's part scaled to unit diagonal. None when a pivot of that factor is
// below kGramPivot (a column with less than that share of its norm outside
// the span of the columns before it: near-aliasing, where forming X'X loses
// digits) or a column is zero; the caller then uses the QR.
std::optional<GramFactor> gram_factor(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                      const Eigen::VectorXd& weights, unsigned threads);

// The smallest pivot (of a unit-diagonal factor) the Gram road accepts: 1e-2
// means each column keeps at least 1e-4 of its squared norm outside the span
// of the earlier columns, so the scaled cross-products' condition number
// stays below about p * 1e4 and the factor keeps 11 or more digits.
inline constexpr double kGramPivot = 1e-2;

}  // namespace moderato::detail
