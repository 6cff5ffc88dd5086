// The small factor from the cross-products (gram_factor.hpp).
#include "estimation/gram_factor.hpp"

#include <cmath>

#include "support/parallel.hpp"

namespace moderato::detail {

namespace {

constexpr Eigen::Index kGramBlock = 8192;

// [X | y]' W [X | y] (lower triangle), summed over blocks in block order.
MatL cross_products(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& weights,
                    unsigned threads) {
    const Eigen::Index n = X.rows(), p = X.cols();
    MatL total = MatL::Zero(p + 1, p + 1);
    const auto blocks = static_cast<std::size_t>((n + kGramBlock - 1) / kGramBlock);
    map_reduce_ordered<Eigen::MatrixXd>(
        blocks, threads,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kGramBlock, rows = std::min(n, r0 + kGramBlock) - r0;
            Eigen::MatrixXd B(rows, p + 1);
            B.leftCols(p) = X.middleRows(r0, rows);
            B.col(p) = y.segment(r0, rows);
            if (weights.size()) B = B.array().colwise() * weights.segment(r0, rows).array().sqrt();
            Eigen::MatrixXd G = Eigen::MatrixXd::Zero(p + 1, p + 1);
            G.selfadjointView<Eigen::Lower>().rankUpdate(B.transpose());
            return G;
        },
        [&](std::size_t, Eigen::MatrixXd&& G) { total += G.cast<long double>(); });
    return total.selfadjointView<Eigen::Lower>();
}

}  // namespace

std::optional<GramFactor> gram_factor(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                      const Eigen::VectorXd& weights, unsigned threads) {
    const Eigen::Index p = X.cols();
    MatL M = cross_products(X, y, weights, threads);
    GramFactor out;
    out.scale.resize(static_cast<std::size_t>(p));
    for (Eigen::Index j = 0; j < p; ++j) {
        if (!(M(j, j) > 0) || !std::isfinite(static_cast<double>(M(j, j)))) return std::nullopt;
        out.scale[static_cast<std::size_t>(j)] = static_cast<double>(std::sqrt(M(j, j)));
    }
    // Scale X's rows and columns (y's column stays as it is, as in the QR).
    for (Eigen::Index a = 0; a <= p; ++a)
        for (Eigen::Index b = 0; b <= p; ++b) {
            if (a < p) M(a, b) /= out.scale[static_cast<std::size_t>(a)];
            if (b < p) M(a, b) /= out.scale[static_cast<std::size_t>(b)];
        }
    const Eigen::LLT<MatL> llt(M.topLeftCorner(p, p));
    if (llt.info() != Eigen::Success) return std::nullopt;
    const MatL U = llt.matrixU();
    for (Eigen::Index j = 0; j < p; ++j)
        if (!(U(j, j) >= static_cast<long double>(kGramPivot))) return std::nullopt;
    out.Raug = MatL::Zero(p + 1, p + 1);
    out.Raug.topLeftCorner(p, p) = U;
    // R's last column: U^{-T} X'W y, and the residual norm below it.
    const auto qty = U.transpose().triangularView<Eigen::Lower>().solve(M.col(p).head(p)).eval();
    out.Raug.col(p).head(p) = qty;
    out.Raug(p, p) = std::sqrt(std::max<long double>(0, M(p, p) - qty.squaredNorm()));
    return out;
}

}  // namespace moderato::detail
