#include "estimation/variance_inflation.hpp"

#include <algorithm>
#include <limits>

#include "support/parallel.hpp"

namespace moderato::detail {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The kept columns other than the intercept, their places among the kept,
// and their weighted means and centred sums of squares.
struct Slopes {
    std::vector<int> column, place;
    Eigen::VectorXd mean, ss;
};

void centred_sums(const Design& d, const std::vector<int>& cols, unsigned threads, Eigen::VectorXd& mean,
                  Eigen::VectorXd& ss);

std::optional<Slopes> slopes_of(const Design& d, const std::vector<int>& kept, unsigned threads) {
    if (!d.intercept || !std::binary_search(kept.begin(), kept.end(), 0)) return std::nullopt;
    Slopes s;
    for (std::size_t a = 0; a < kept.size(); ++a)
        if (kept[a] != 0) s.column.push_back(kept[a]), s.place.push_back(static_cast<int>(a));
    centred_sums(d, s.column, threads, s.mean, s.ss);
    return s;
}

// Weighted mean and centred sum of squares of each column, one column per
// task (each sum in long double, in row order: the same numbers whatever the
// thread count).
void centred_sums(const Design& d, const std::vector<int>& cols, unsigned threads, Eigen::VectorXd& mean,
                  Eigen::VectorXd& ss) {
    const Eigen::Index n = d.X.rows(), k = static_cast<Eigen::Index>(cols.size());
    const bool weighted = d.weights.size() > 0;
    double sw = 0;
    for (Eigen::Index i = 0; i < n; ++i) sw += weighted ? d.weights[i] : 1.0;
    mean.resize(k);
    ss.resize(k);
    parallel_for(static_cast<std::size_t>(k), threads, [&](std::size_t c) {
        const auto x = d.X.col(cols[c]);
        long double m = 0, s = 0;
        for (Eigen::Index i = 0; i < n; ++i) m += (weighted ? d.weights[i] : 1.0) * x[i];
        m /= sw;
        for (Eigen::Index i = 0; i < n; ++i) {
            const long double e = x[i] - m;
            s += (weighted ? d.weights[i] : 1.0) * e * e;
        }
        mean[static_cast<Eigen::Index>(c)] = static_cast<double>(m);
        ss[static_cast<Eigen::Index>(c)] = static_cast<double>(s);
    });
}

// C = sum_i w_i (x_i - mean)(x_i - mean)' over the columns, by row blocks.
Eigen::MatrixXd centred_cross_products(const Design& d, const std::vector<int>& cols, const Eigen::VectorXd& mean,
                                       unsigned threads) {
    constexpr Eigen::Index kBlock = 8192;
    const Eigen::Index n = d.X.rows(), k = static_cast<Eigen::Index>(cols.size());
    Eigen::MatrixXd C = Eigen::MatrixXd::Zero(k, k);
    map_reduce_ordered<Eigen::MatrixXd>(
        static_cast<std::size_t>((n + kBlock - 1) / kBlock), threads,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlock, rows = std::min(n, r0 + kBlock) - r0;
            Eigen::MatrixXd S(rows, k);
            for (Eigen::Index c = 0; c < k; ++c)
                S.col(c) = d.X.col(cols[static_cast<std::size_t>(c)]).segment(r0, rows).array() - mean[c];
            if (d.weights.size()) S = S.array().colwise() * d.weights.segment(r0, rows).array().sqrt();
            Eigen::MatrixXd part = Eigen::MatrixXd::Zero(k, k);
            part.selfadjointView<Eigen::Lower>().rankUpdate(S.transpose());
            return part;
        },
        [&](std::size_t, Eigen::MatrixXd&& part) { C += part; });
    return C.selfadjointView<Eigen::Lower>();
}

}  // namespace

std::vector<double> variance_inflation(const Design& d, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                                       unsigned threads) {
    std::vector<double> vif(d.p(), kNaN);
    const auto s = slopes_of(d, kept, threads);
    if (!s) return vif;
    for (std::size_t c = 0; c < s->column.size(); ++c)
        vif[static_cast<std::size_t>(s->column[c])] =
            A.row(s->place[c]).squaredNorm() * s->ss[static_cast<Eigen::Index>(c)];
    return vif;
}

std::optional<std::vector<double>> variance_inflation_by_cross_products(const Design& d, const std::vector<int>& kept,
                                                                        unsigned threads) {
    std::vector<double> vif(d.p(), kNaN);
    const auto s = slopes_of(d, kept, threads);
    if (!s) return vif;
    // The correlation matrix R = D^{-1/2} C D^{-1/2} (D = diag C): VIF_j = [R^{-1}]_jj.
    const Eigen::VectorXd scale = s->ss.cwiseSqrt().cwiseInverse();
    const Eigen::MatrixXd R =
        scale.asDiagonal() * centred_cross_products(d, s->column, s->mean, threads) * scale.asDiagonal();
    const Eigen::LLT<Eigen::MatrixXd> llt(R);
    if (llt.info() != Eigen::Success) return std::nullopt;
    // The smallest pivot of R's Cholesky factor squared bounds 1 / cond(R)
    // from above; below 1e-8 (a VIF near 10^8) R^{-1} would keep too few
    // correct digits: use the QR route then.
    const Eigen::VectorXd pivots = llt.matrixL().toDenseMatrix().diagonal();
    if (pivots.size() && pivots.minCoeff() < 1e-4) return std::nullopt;
    const Eigen::MatrixXd Rinv = llt.solve(Eigen::MatrixXd::Identity(R.rows(), R.cols()));
    for (std::size_t c = 0; c < s->column.size(); ++c)
        vif[static_cast<std::size_t>(s->column[c])] = Rinv(static_cast<Eigen::Index>(c), static_cast<Eigen::Index>(c));
    return vif;
}

}  // namespace moderato::detail
