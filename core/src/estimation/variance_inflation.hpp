// Variance inflation factors of a model with an intercept:
// VIF_j = [(X'WX)^{-1}]_jj * sum_i w_i (x_ij - mean_w(x_j))^2 over the kept
// columns, with the prior weights W only (for every family). By the block
// inverse this is [C^{-1}]_jj C_jj, C the weighted centred cross-products of
// the kept columns other than the intercept (the usual 1 / (1 - R_j^2)).
#pragma once

#include <Eigen/Dense>
#include <optional>
#include <vector>

#include "moderato/estimation/design.hpp"

namespace moderato::detail {

// From A with A A' = (X_K' W X_K)^{-1} (a linear fit's own inverse factor).
// NaN for the intercept, aliased columns and models without an intercept.
std::vector<double> variance_inflation(const Design& d, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                                       unsigned threads);

// The same from the centred cross-products, for fits whose factor carries
// other weights (generalized families): one pass over the rows in parallel
// blocks instead of another QR. Empty when C is too ill-conditioned for its
// Cholesky factor (then use the inverse factor of a least-squares fit).
std::optional<std::vector<double>> variance_inflation_by_cross_products(const Design& d, const std::vector<int>& kept,
                                                                        unsigned threads);

}  // namespace moderato::detail
