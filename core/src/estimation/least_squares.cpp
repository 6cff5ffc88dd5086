#include "moderato/estimation/least_squares.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

#include "estimation/gram_factor.hpp"
#include "estimation/qr_steps.hpp"
#include "support/parallel.hpp"

namespace moderato {

namespace {

using LD = long double;
using MatL = Eigen::Matrix<LD, Eigen::Dynamic, Eigen::Dynamic>;
using VecL = Eigen::Matrix<LD, Eigen::Dynamic, 1>;

constexpr Eigen::Index kBlockRows = 16384;

using detail::decide_rank;
using detail::solve_kept;
using detail::triangular_factor;

// sqrt(w_i), or 1 without weights.
struct RootWeight {
    const Eigen::VectorXd& weights;
    double operator()(Eigen::Index i) const { return weights.size() > 0 ? std::sqrt(weights[i]) : 1.0; }
};

std::size_t block_count(Eigen::Index n) { return static_cast<std::size_t>((n + kBlockRows - 1) / kBlockRows); }

// Unit-norm column scaling of the (weighted) design; one column per task,
// each summed in row order (the same numbers on any number of threads).
std::vector<double> column_scales(const Eigen::MatrixXd& X, const Eigen::VectorXd& weights, unsigned threads) {
    const Eigen::Index n = X.rows(), p = X.cols();
    const bool weighted = weights.size() > 0;
    std::vector<double> scale(static_cast<std::size_t>(p), 1.0);
    detail::parallel_for(static_cast<std::size_t>(p), threads, [&](std::size_t column) {
        const auto j = static_cast<Eigen::Index>(column);
        LD ss = 0;
        for (Eigen::Index i = 0; i < n; ++i) {
            const LD v = static_cast<LD>(X(i, j)) * (weighted ? static_cast<LD>(weights[i]) : 1.0L) * X(i, j);
            ss += v;
        }
        const double s = static_cast<double>(std::sqrt(ss));
        scale[column] = s > 0 ? s : 1.0;
    });
    return scale;
}

// R of the scaled, weighted [X | y] by one Householder QR in long double.
MatL extended_factor(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& weights,
                     const std::vector<double>& scale) {
    const Eigen::Index n = X.rows(), p = X.cols();
    const RootWeight sqrt_w{weights};
    MatL A(n, p + 1);
    for (Eigen::Index j = 0; j < p; ++j)
        for (Eigen::Index i = 0; i < n; ++i)
            A(i, j) = static_cast<LD>(X(i, j)) * static_cast<LD>(sqrt_w(i)) / scale[static_cast<std::size_t>(j)];
    for (Eigen::Index i = 0; i < n; ++i) A(i, p) = static_cast<LD>(y[i]) * static_cast<LD>(sqrt_w(i));
    return triangular_factor(A);
}

// The same by a tall-skinny QR: fixed row blocks factored in double on all
// threads, their factors merged in long double in block order.
MatL blocked_factor(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& weights,
                    const std::vector<double>& scale, unsigned threads) {
    const Eigen::Index n = X.rows(), p = X.cols();
    const RootWeight sqrt_w{weights};
    MatL Raug;
    detail::map_reduce_ordered<Eigen::MatrixXd>(
        block_count(n), threads,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows;
            const Eigen::Index rows = std::min(kBlockRows, n - r0);
            Eigen::MatrixXd B(rows, p + 1);
            for (Eigen::Index j = 0; j < p; ++j) {
                const double inv = 1.0 / scale[static_cast<std::size_t>(j)];
                for (Eigen::Index i = 0; i < rows; ++i) B(i, j) = X(r0 + i, j) * sqrt_w(r0 + i) * inv;
            }
            for (Eigen::Index i = 0; i < rows; ++i) B(i, p) = y[r0 + i] * sqrt_w(r0 + i);
            return triangular_factor(B);
        },
        [&](std::size_t, Eigen::MatrixXd&& Rb) {
            if (Raug.size() == 0) {
                Raug = Rb.cast<LD>();
                return;
            }
            MatL S(Raug.rows() + Rb.rows(), p + 1);
            S << Raug, Rb.cast<LD>();
            Raug = triangular_factor(S);
        });
    return Raug;
}

// Residuals and the weighted residual sum of squares, accumulated in long
// double over fixed row blocks (reduced in block order). All-zero
// coefficients (a zero y: callers that want only the factor) leave y itself.
void residuals(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& weights, const VecL& coefL,
               unsigned threads, LeastSquaresResult& out) {
    const Eigen::Index n = X.rows();
    const bool weighted = weights.size() > 0;
    const std::vector<int>& kept = out.kept;
    if (y.isZero(0.0) && std::all_of(kept.begin(), kept.end(), [&](int j) { return coefL[j] == 0; })) {
        out.residuals = y;
        out.rss = 0;
        return;
    }
    out.residuals.resize(n);
    LD rss = 0;
    detail::map_reduce_ordered<LD>(
        block_count(n), threads,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows;
            const Eigen::Index r1 = std::min(n, r0 + kBlockRows);
            LD part = 0;
            for (Eigen::Index i = r0; i < r1; ++i) {
                LD fit = 0;
                for (int j : kept) fit += static_cast<LD>(X(i, j)) * coefL[j];
                const LD e = static_cast<LD>(y[i]) - fit;
                out.residuals[i] = static_cast<double>(e);
                part += (weighted ? static_cast<LD>(weights[i]) : 1.0L) * e * e;
            }
            return part;
        },
        [&](std::size_t, LD&& part) { rss += part; });
    out.rss = static_cast<double>(rss);
}

}  // namespace

LeastSquaresResult least_squares(const Eigen::MatrixXd& X, const Eigen::VectorXd& y, const Eigen::VectorXd& weights,
                                 const LeastSquaresOptions& options) {
    const Eigen::Index n = X.rows();
    const Eigen::Index p = X.cols();
    const unsigned threads = detail::resolve_threads(options.threads);

    LeastSquaresResult out;
    out.extended_precision =
        static_cast<double>(n) * static_cast<double>(p + 1) * static_cast<double>(p + 1) <= options.extended_budget;

    // 1. R of the scaled, weighted [X | y]: for a large problem from the
    //    cross-products when they are well enough conditioned, else by QR.
    std::vector<double> scale;
    MatL Raug;
    if (auto gram = out.extended_precision ? std::nullopt : detail::gram_factor(X, y, weights, threads)) {
        scale = std::move(gram->scale);
        Raug = std::move(gram->Raug);
    } else {
        scale = column_scales(X, weights, threads);
        Raug = out.extended_precision ? extended_factor(X, y, weights, scale)
                                      : blocked_factor(X, y, weights, scale, threads);
    }
    if (Raug.rows() < p + 1) {  // fewer rows than columns + 1: pad with zeros
        MatL padded = MatL::Zero(p + 1, p + 1);
        padded.topRows(Raug.rows()) = Raug;
        Raug = padded;
    }
    out.qty = Raug.col(p).head(p).cast<double>();

    // 2. Numerical rank. In double, exactly collinear columns leave pivots of
    //    a few sqrt(n) * eps.
    const double tolerance = out.extended_precision
                                 ? options.rank_tolerance
                                 : std::max(options.rank_tolerance, 16.0 * std::sqrt(static_cast<double>(n)) *
                                                                        std::numeric_limits<double>::epsilon());
    decide_rank(Raug, p, tolerance, out);

    // 3. Solve the full-rank problem on the kept columns.
    const VecL coefL = solve_kept(Raug, scale, out);

    // 4. Residuals and weighted residual sum of squares, accumulated in long double.
    residuals(X, y, weights, coefL, threads, out);
    return out;
}

}  // namespace moderato
