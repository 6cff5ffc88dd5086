// Sandwich covariance estimators on a factored design (private to core).
#pragma once

#include <Eigen/Dense>
#include <vector>

#include "moderato/estimation/model.hpp"

namespace moderato::detail {

// Covariance of the kept coefficients for a robust kind (HC0..HC4, Cluster):
//   A * [ sum_i omega_i (A' x_i)(A' x_i)' ] * A' * factor,
// where (X_K' W X_K)^{-1} = A A', the score of row i is score[i] * x_i, and the
// leverage of row i is leverage_weight[i] * |A' x_i|^2 (empty: 1).
// Cluster sums the scores within clusters first (CR1 factor).
Eigen::MatrixXd sandwich(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                         const Eigen::VectorXd& score, const Eigen::VectorXd& leverage_weight, SeKind kind,
                         const std::vector<int>& cluster, int n_clusters, unsigned threads);

// The pieces of `sandwich`, shared with the streamed fit, which meets the rows
// chunk by chunk. Rows r0..r1 of X's kept columns times A (the rows A' x_i):
Eigen::MatrixXd projected_rows(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                               Eigen::Index r0, Eigen::Index r1);
// Each row of W = X_K A times sqrt(omega_i) for HC0..HC4 (score[i] the row's
// score, leverage_weight[i] or 1 (nullptr) its leverage weight; n rows and k
// kept columns in all), so that the meat is W'W.
void weigh_rows(Eigen::MatrixXd& W, const double* score, const double* leverage_weight, SeKind kind, double nd,
                double kd);
// The small-sample factor: n/(n-k) for HC1, G/(G-1)(n-1)/(n-k) for Cluster, else 1.
double sandwich_factor(SeKind kind, double nd, double kd, double clusters);
// A * meat * A' * factor, symmetrised (meat: its lower triangle).
Eigen::MatrixXd sandwich_from_meat(const Eigen::MatrixXd& meat_lower, const Eigen::MatrixXd& A, double factor);

// The full p x p covariance from the block of the kept columns, NaN in the
// rows and columns of aliased ones.
Eigen::MatrixXd expand_covariance(const Eigen::MatrixXd& Vk, const std::vector<int>& kept, Eigen::Index p);

// The same for a model with one parameter beyond the columns (the negative
// binomial's alpha): `bread` is the (k+1) x (k+1) inverse negative Hessian of
// (beta_K, extra), row i's score is (score[i] x_iK, extra_score[i]). Kinds
// HC0, HC1 and Cluster; the small-sample factors count k+1 parameters.
Eigen::MatrixXd sandwich_with_extra(const Eigen::MatrixXd& X, const std::vector<int>& kept,
                                    const Eigen::MatrixXd& bread, const Eigen::VectorXd& score,
                                    const Eigen::VectorXd& extra_score, SeKind kind, const std::vector<int>& cluster,
                                    int n_clusters, unsigned threads);

}  // namespace moderato::detail
