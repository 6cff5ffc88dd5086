#include "moderato/estimation/mixed_criterion.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>

#include "support/parallel.hpp"

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
    xtx_ = Eigen::MatrixXd::Zero(p_, p_);
    xty_ = Eigen::VectorXd::Zero(p_);
    for (const Block& b : blocks_) {
        xtx_ += b.XtX;
        xty_ += b.Xty;
        yty_ += b.yty;
    }
}

namespace {

// Over a range of groups: S = sum of B'B with B = R^-1 L' [Z'X Z'y] and
// R R' = M = I + L' Z'Z L, so that (Woodbury, V^-1 = I - Z L M^-1 L' Z')
//   [X y]' V^-1 [X y] = sum [X y]'[X y] - S,
// and log|V| = sum log|M|. Q: the number of random effects when it is
// small and known at compile time (no allocation per group), else Dynamic.
struct GroupSums {
    Eigen::MatrixXd S;  // (p + 1) x (p + 1)
    double logdet = 0;
};

template <int Q>
GroupSums group_sums(const MixedCrossproducts& data, const Eigen::MatrixXd& L_, std::size_t from, std::size_t to) {
    const Eigen::Index p = data.fixed_columns(), q = data.random_columns();
    using Square = Eigen::Matrix<double, Q, Q>;
    using Wide = Eigen::Matrix<double, Q, Eigen::Dynamic>;
    GroupSums s{Eigen::MatrixXd::Zero(p + 1, p + 1)};
    const Square L = L_, Lt = L_.transpose();
    Square M(q, q);
    Wide W(q, p + 1);
    Eigen::LLT<Square> chol(q);
    for (std::size_t g = from; g < to; ++g) {
        const MixedCrossproducts::Block& b = data.blocks()[g];
        M.noalias() = Lt * (b.ZtZ * L);
        M.diagonal().array() += 1;
        chol.compute(M);  // M >= I: always positive definite
        W.leftCols(p).noalias() = Lt * b.ZtX;
        W.col(p).noalias() = Lt * b.Zty;
        chol.matrixL().solveInPlace(W);
        s.S.noalias() += W.transpose() * W;
        s.logdet += 2 * chol.matrixLLT().diagonal().array().log().sum();
    }
    return s;
}

GroupSums group_sums_any(const MixedCrossproducts& data, const Eigen::MatrixXd& L, std::size_t from, std::size_t to) {
    switch (data.random_columns()) {
        case 1:
            return group_sums<1>(data, L, from, to);
        case 2:
            return group_sums<2>(data, L, from, to);
        case 3:
            return group_sums<3>(data, L, from, to);
        default:
            return group_sums<Eigen::Dynamic>(data, L, from, to);
    }
}

// The sums over all groups, in fixed blocks reduced in order: the same
// numbers on any number of threads.
GroupSums all_group_sums(const MixedCrossproducts& data, const Eigen::MatrixXd& L) {
    constexpr std::size_t kBlock = 2048;
    const std::size_t G = data.groups(), blocks = (G + kBlock - 1) / kBlock;
    if (blocks <= 1) return group_sums_any(data, L, 0, G);
    const Eigen::Index k = data.fixed_columns() + 1;
    GroupSums total{Eigen::MatrixXd::Zero(k, k)};
    detail::map_reduce_ordered<GroupSums>(
        blocks, data.threads,
        [&](std::size_t i) { return group_sums_any(data, L, i * kBlock, std::min(G, (i + 1) * kBlock)); },
        [&](std::size_t, GroupSums s) {
            total.S += s.S;
            total.logdet += s.logdet;
        });
    return total;
}

}  // namespace

MixedCriterion mixed_criterion(const MixedCrossproducts& data, const Eigen::MatrixXd& L, MixedEstimation estimation) {
    const Eigen::Index p = data.fixed_columns(), q = data.random_columns();
    if (L.rows() != q || L.cols() != q) throw std::invalid_argument("mixed model: L is not q x q");
    const GroupSums sums = all_group_sums(data, L);
    const Eigen::MatrixXd xvx = data.xtx() - sums.S.topLeftCorner(p, p);
    const Eigen::VectorXd xvy = data.xty() - sums.S.col(p).head(p);
    const double yvy = data.yty() - sums.S(p, p), logdet = sums.logdet;
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
