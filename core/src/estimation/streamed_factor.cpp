#include "estimation/streamed_factor.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "support/parallel.hpp"

namespace moderato::detail {

namespace {

using LD = long double;
constexpr Eigen::Index kBlockRows = 16384;  // least_squares' blocks

// Block b of the chunk: the rows times sqrt(w), unscaled, then y times sqrt(w).
template <class Mat>
Mat block_matrix(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& w, Eigen::Index r0,
                 Eigen::Index rows) {
    using S = typename Mat::Scalar;
    const Eigen::Index p = X.cols();
    Mat B(rows, p + 1);
    for (Eigen::Index i = 0; i < rows; ++i) {
        const S root = w.size() ? static_cast<S>(std::sqrt(w[r0 + i])) : S(1);
        for (Eigen::Index j = 0; j < p; ++j) B(i, j) = static_cast<S>(X(r0 + i, j)) * root;
        B(i, p) = static_cast<S>(y[r0 + i]) * root;
    }
    return B;
}

}  // namespace

StreamedFactor::StreamedFactor(Eigen::Index p, bool extended, unsigned threads)
    : p_(p), extended_(extended), threads_(threads), ss_(static_cast<std::size_t>(p), 0.0L) {}

void StreamedFactor::merge(MatL&& Rb) {
    if (R_.size() == 0) {
        R_ = std::move(Rb);
        return;
    }
    MatL S(R_.rows() + Rb.rows(), p_ + 1);
    S << R_, Rb;
    R_ = triangular_factor(S);
}

void StreamedFactor::add(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& w) {
    const Eigen::Index n = X.rows();
    for (Eigen::Index j = 0; j < p_; ++j) {  // least_squares' column_scales, in the same order
        LD ss = ss_[static_cast<std::size_t>(j)];
        for (Eigen::Index i = 0; i < n; ++i)
            ss += static_cast<LD>(X(i, j)) * (w.size() ? static_cast<LD>(w[i]) : 1.0L) * X(i, j);
        ss_[static_cast<std::size_t>(j)] = ss;
    }
    const std::size_t blocks = static_cast<std::size_t>((n + kBlockRows - 1) / kBlockRows);
    map_reduce_ordered<MatL>(
        blocks, threads_,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows;
            const Eigen::Index rows = std::min(kBlockRows, n - r0);
            if (extended_) return triangular_factor(block_matrix<MatL>(X, y, w, r0, rows));
            const Eigen::MatrixXd R = triangular_factor(block_matrix<Eigen::MatrixXd>(X, y, w, r0, rows));
            return MatL(R.cast<LD>());
        },
        [&](std::size_t, MatL&& Rb) { merge(std::move(Rb)); });
}

LeastSquaresResult StreamedFactor::finish(std::size_t n, const LeastSquaresOptions& options, VecL& coef_long) {
    const Eigen::Index p = p_;
    scale_.assign(static_cast<std::size_t>(p), 1.0);
    for (Eigen::Index j = 0; j < p; ++j) {
        const double s = static_cast<double>(std::sqrt(ss_[static_cast<std::size_t>(j)]));
        scale_[static_cast<std::size_t>(j)] = s > 0 ? s : 1.0;
    }
    if (R_.rows() < p + 1) {  // fewer rows than columns + 1: pad with zeros
        MatL padded = MatL::Zero(p + 1, p + 1);
        if (R_.size()) padded.topRows(R_.rows()) = R_;
        R_ = padded;
    }
    for (Eigen::Index j = 0; j < p; ++j) R_.col(j) /= static_cast<LD>(scale_[static_cast<std::size_t>(j)]);
    LeastSquaresResult out;
    out.extended_precision = extended_;
    out.qty = R_.col(p).head(p).cast<double>();
    const double tolerance = extended_ ? options.rank_tolerance
                                       : std::max(options.rank_tolerance, 16.0 * std::sqrt(static_cast<double>(n)) *
                                                                              std::numeric_limits<double>::epsilon());
    decide_rank(R_, p, tolerance, out);
    coef_long = solve_kept(R_, scale_, out);
    return out;
}

double factor_rss(const MatL& R, const std::vector<int>& cols) {
    const Eigen::Index p = R.cols() - 1, m = static_cast<Eigen::Index>(cols.size());
    MatL B(R.rows(), m + 1);
    for (Eigen::Index c = 0; c < m; ++c) B.col(c) = R.col(cols[static_cast<std::size_t>(c)]);
    B.col(m) = R.col(p);
    const MatL F = triangular_factor(B);
    LD rss = 0;
    for (Eigen::Index r = m; r < F.rows(); ++r) rss += F(r, m) * F(r, m);
    return static_cast<double>(rss);
}

}  // namespace moderato::detail
