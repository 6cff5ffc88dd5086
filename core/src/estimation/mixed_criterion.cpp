#include "moderato/estimation/mixed_criterion.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>

namespace moderato {

MixedCrossproducts::MixedCrossproducts(const Eigen::MatrixXd& X, const Eigen::MatrixXd& Z, const Eigen::VectorXd& y,
                                       const std::vector<std::size_t>& group)
    : n_(static_cast<std::size_t>(y.size())), p_(X.cols()), q_(Z.cols()) {
    if (X.rows() != y.size() || Z.rows() != y.size() || group.size() != n_)
        throw std::invalid_argument("mixed model: X, Z, y and the groups differ in their number of rows");
    std::size_t count = 0;
    for (std::size_t g : group) count = std::max(count, g + 1);
    blocks_.assign(count,
                   Block{Eigen::MatrixXd::Zero(q_, q_), Eigen::MatrixXd::Zero(q_, p_), Eigen::MatrixXd::Zero(p_, p_),
                         Eigen::VectorXd::Zero(q_), Eigen::VectorXd::Zero(p_), 0});
    for (std::size_t i = 0; i < n_; ++i) {
        Block& b = blocks_[group[i]];
        const auto r = static_cast<Eigen::Index>(i);
        const auto x = X.row(r).transpose();
        const auto z = Z.row(r).transpose();
        b.ZtZ.noalias() += z * z.transpose();
        b.ZtX.noalias() += z * x.transpose();
        b.XtX.noalias() += x * x.transpose();
        b.Zty += z * y[r];
        b.Xty += x * y[r];
        b.yty += y[r] * y[r];
    }
}

MixedCriterion mixed_criterion(const MixedCrossproducts& data, const Eigen::MatrixXd& L, MixedEstimation estimation) {
    const Eigen::Index p = data.fixed_columns(), q = data.random_columns();
    if (L.rows() != q || L.cols() != q) throw std::invalid_argument("mixed model: L is not q x q");
    // Per group, with M = I + L' Z'Z L: V^-1 = I - Z L M^-1 L' Z' and log|V| = log|M|.
    Eigen::MatrixXd xvx = Eigen::MatrixXd::Zero(p, p);
    Eigen::VectorXd xvy = Eigen::VectorXd::Zero(p);
    double yvy = 0, logdet = 0;
    const Eigen::MatrixXd Lt = L.transpose();
    for (const MixedCrossproducts::Block& b : data.blocks()) {
        Eigen::MatrixXd M = Eigen::MatrixXd::Identity(q, q);
        M.noalias() += Lt * b.ZtZ * L;
        const Eigen::LLT<Eigen::MatrixXd> chol(M);  // M >= I: always positive definite
        const Eigen::MatrixXd A = Lt * b.ZtX;       // q x p
        const Eigen::VectorXd c = Lt * b.Zty;       // q
        const Eigen::MatrixXd MA = chol.solve(A);
        const Eigen::VectorXd Mc = chol.solve(c);
        xvx += b.XtX - A.transpose() * MA;
        xvy += b.Xty - A.transpose() * Mc;
        yvy += b.yty - c.dot(Mc);
        logdet += 2 * chol.matrixLLT().diagonal().array().log().sum();
    }
    // Columns scaled to a unit diagonal first, so a column's units (dollars or thousands of
    // dollars) change neither the collinearity check nor the accuracy.
    const Eigen::VectorXd s = xvx.diagonal().cwiseMax(0).cwiseSqrt().cwiseInverse();
    if (!s.allFinite()) throw std::domain_error("mixed model: a fixed-effect column is all zero");
    const Eigen::LDLT<Eigen::MatrixXd> scaled(s.asDiagonal() * xvx * s.asDiagonal());
    const Eigen::VectorXd d = scaled.vectorD();
    if (scaled.info() != Eigen::Success || !(d.minCoeff() > 1e-12))
        throw std::domain_error("mixed model: the fixed-effect columns are collinear");
    MixedCriterion out;
    out.beta = s.cwiseProduct(scaled.solve(s.cwiseProduct(xvy)));
    const double qf = yvy - out.beta.dot(xvy);
    const bool reml = estimation == MixedEstimation::Reml;
    const double m = static_cast<double>(data.rows()) - (reml ? static_cast<double>(p) : 0.0);
    if (!(m > 0) || !(qf > 0)) throw std::domain_error("mixed model: no residual variation is left");
    out.sigma2 = qf / m;
    out.value = -0.5 * logdet - 0.5 * m * (std::log(2 * std::numbers::pi * out.sigma2) + 1);
    // log|X'V^-1X| = log|S X'V^-1X S| - 2 sum log s.
    if (reml) out.value -= 0.5 * (d.array().log().sum() - 2 * s.array().log().sum());
    const Eigen::MatrixXd inverse = scaled.solve(Eigen::MatrixXd::Identity(p, p));
    out.beta_covariance = out.sigma2 * s.asDiagonal() * inverse * s.asDiagonal();
    return out;
}

}  // namespace moderato
