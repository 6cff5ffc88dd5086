// The criterion a linear mixed model is fitted by: the profiled
// log-likelihood (ML) or restricted log-likelihood (REML) of
//
//   y = X beta + Z_g u_g + e,   u_g ~ N(0, sigma2 Psi),   e ~ N(0, sigma2 I),
//
// one grouping factor g, as a function of the relative covariance
// Psi = L L' of the random effects alone: beta (generalised least squares)
// and sigma2 are profiled out. The data enter once, as each group's small
// cross-products; an evaluation then works group by group with q x q blocks
// (the Woodbury identity; q random-effect columns), so its cost does not grow
// with the number of rows: O(G (q^3 + q^2 p + q p^2) + p^3) for G groups and
// p fixed-effect columns.
//
// The textbook forms (Harville 1977; Laird and Ware 1982), with
// V = I + Z Psi Z' per group and qf = (y - X beta)' V^-1 (y - X beta):
//   ML:   -1/2 log|V| - n/2 (log(2 pi qf / n) + 1)
//   REML: -1/2 log|V| - 1/2 log|X' V^-1 X| - (n-p)/2 (log(2 pi qf / (n-p)) + 1)
#pragma once

#include <Eigen/Dense>
#include <cstddef>
#include <vector>

#include "moderato/estimation/model.hpp"

namespace moderato {

// Each group's cross-products of [X Z y], made once from the rows.
class MixedCrossproducts {
public:
    // `group` numbers each row's group 0..G-1 (rows need not be sorted).
    // X is n x p, Z is n x q, y has n entries.
    MixedCrossproducts(const Eigen::MatrixXd& X, const Eigen::MatrixXd& Z, const Eigen::VectorXd& y,
                       const std::vector<std::size_t>& group);

    std::size_t rows() const { return n_; }
    Eigen::Index fixed_columns() const { return p_; }
    Eigen::Index random_columns() const { return q_; }
    std::size_t groups() const { return blocks_.size(); }

    struct Block {
        Eigen::MatrixXd ZtZ, ZtX, XtX;
        Eigen::VectorXd Zty, Xty;
        double yty = 0;
    };
    const std::vector<Block>& blocks() const { return blocks_; }
    // The sums over all groups: X'X, X'y, y'y.
    const Eigen::MatrixXd& xtx() const { return xtx_; }
    const Eigen::VectorXd& xty() const { return xty_; }
    double yty() const { return yty_; }

    // Threads for an evaluation (0: all hardware threads); groups are summed
    // in fixed blocks in order, so the numbers do not depend on it.
    unsigned threads = 0;

private:
    std::size_t n_ = 0;
    Eigen::Index p_ = 0, q_ = 0;
    std::vector<Block> blocks_;
    Eigen::MatrixXd xtx_;
    Eigen::VectorXd xty_;
    double yty_ = 0;
};

struct MixedCriterion {
    double value = 0;                 // the maximised quantity (log-likelihood or restricted log-likelihood)
    Eigen::VectorXd beta;             // the GLS fixed effects at this Psi
    double sigma2 = 0;                // the profiled residual variance: qf / n (ML) or qf / (n - p) (REML)
    Eigen::MatrixXd beta_covariance;  // sigma2 (X' V^-1 X)^-1
};

// The criterion at Psi = L L' (L: q x q, lower triangular, any diagonal
// signs; a zero column is a random effect with no variance). Throws
// std::domain_error when X' V^-1 X is singular or no residual degree of
// freedom is left.
MixedCriterion mixed_criterion(const MixedCrossproducts& data, const Eigen::MatrixXd& L, MixedEstimation estimation);

}  // namespace moderato
