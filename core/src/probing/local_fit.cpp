#include "probing/local_fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "support/parallel.hpp"

namespace moderato::detail {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr int kMaxNewton = 100;

// The local design row of row i at z0.
void local_row(const LocalData& L, Eigen::Index i, double z0, Eigen::VectorXd& x) {
    const double u = (L.z[i] - z0) / L.scale;
    x[0] = 1;
    x[1] = L.d[i];
    x[2] = u;
    x[3] = L.d[i] * u;
    for (Eigen::Index c = 0; c < L.controls.cols(); ++c) x[4 + c] = L.controls(i, c);
}

double kernel(const LocalData& L, Eigen::Index i, double z0, double h) {
    const double u = (L.z[i] - z0) / h;
    return std::exp(-0.5 * u * u) * L.w[i];
}

// Solves A b = g for symmetric positive definite A (lower triangle filled);
// NaN when A is singular to working precision.
Eigen::VectorXd solve_spd(Eigen::MatrixXd& A, const Eigen::VectorXd& g) {
    A.triangularView<Eigen::StrictlyUpper>() = A.transpose().triangularView<Eigen::StrictlyUpper>();
    const Eigen::LDLT<Eigen::MatrixXd> ldlt(A);
    const auto D = ldlt.vectorD();
    if (ldlt.info() != Eigen::Success || !(D.minCoeff() > 1e-12 * D.maxCoeff()))
        return Eigen::VectorXd::Constant(g.size(), kNaN);
    return ldlt.solve(g);
}

Eigen::VectorXd linear_fit(const LocalData& L, double z0, double h, const RowSet& rows) {
    const Eigen::Index p = L.p();
    Eigen::MatrixXd A = Eigen::MatrixXd::Zero(p, p);
    Eigen::VectorXd g = Eigen::VectorXd::Zero(p), x(p);
    for (std::size_t k = 0; k < rows.rows.size(); ++k) {
        const Eigen::Index i = rows.rows[k];
        const double w = kernel(L, i, z0, h) * rows.times[k];
        if (w == 0) continue;
        local_row(L, i, z0, x);
        for (Eigen::Index a = 0; a < p; ++a) {
            const double wx = w * x[a];
            for (Eigen::Index c = 0; c <= a; ++c) A(a, c) += wx * x[c];
            g[a] += wx * L.y[i];
        }
    }
    return solve_spd(A, g);
}

struct NewtonStep {
    double loglik = 0;
    Eigen::MatrixXd A;
    Eigen::VectorXd g;
};

NewtonStep logistic_pass(const LocalData& L, double z0, double h, const RowSet& rows, const Eigen::VectorXd& beta) {
    const Eigen::Index p = L.p();
    NewtonStep s{0, Eigen::MatrixXd::Zero(p, p), Eigen::VectorXd::Zero(p)};
    Eigen::VectorXd x(p);
    for (std::size_t k = 0; k < rows.rows.size(); ++k) {
        const Eigen::Index i = rows.rows[k];
        const double w = kernel(L, i, z0, h) * rows.times[k];
        if (w == 0) continue;
        local_row(L, i, z0, x);
        const double eta = x.dot(beta);
        const double mu = 1.0 / (1.0 + std::exp(-eta));
        // log(1 + e^eta) without overflow
        const double softplus = eta > 0 ? eta + std::log1p(std::exp(-eta)) : std::log1p(std::exp(eta));
        s.loglik += w * (L.y[i] * eta - softplus);
        const double v = w * mu * (1 - mu);
        for (Eigen::Index a = 0; a < p; ++a) {
            for (Eigen::Index c = 0; c <= a; ++c) s.A(a, c) += v * x[a] * x[c];
            s.g[a] += w * (L.y[i] - mu) * x[a];
        }
    }
    return s;
}

// Newton's method with step halving when the log-likelihood falls.
Eigen::VectorXd logistic_fit(const LocalData& L, double z0, double h, const RowSet& rows) {
    const Eigen::Index p = L.p();
    Eigen::VectorXd beta = Eigen::VectorXd::Zero(p), previous = beta;
    double best = -std::numeric_limits<double>::infinity();
    for (int it = 0, halvings = 0; it < kMaxNewton; ++it) {
        NewtonStep s = logistic_pass(L, z0, h, rows, beta);
        if (s.loglik < best - 1e-12 * std::abs(best) && halvings < 30) {
            beta = (beta + previous) / 2;
            ++halvings;
            continue;
        }
        best = s.loglik;
        halvings = 0;
        const Eigen::VectorXd step = solve_spd(s.A, s.g);
        if (!step.allFinite() || beta.cwiseAbs().maxCoeff() > 1e6) break;
        previous = beta;
        beta += step;
        if (step.cwiseAbs().maxCoeff() <= 1e-10 * (1 + beta.cwiseAbs().maxCoeff())) return beta;
    }
    return Eigen::VectorXd::Constant(p, kNaN);
}

constexpr Eigen::Index kRowBlock = 2048;

// Row i's cross-product entries at z0: x_j x_l for j <= l (column-major
// lower triangle), then x_j y.
void product_row(const LocalData& L, Eigen::Index i, double z0, Eigen::VectorXd& x, double* out) {
    local_row(L, i, z0, x);
    const Eigen::Index p = x.size();
    Eigen::Index q = 0;
    for (Eigen::Index l = 0; l < p; ++l)
        for (Eigen::Index j = l; j < p; ++j) out[q++] = x[j] * x[l];
    for (Eigen::Index j = 0; j < p; ++j) out[q++] = x[j] * L.y[i];
}

// The p × R coefficients at one grid point from the summed products S (R × q).
Eigen::MatrixXd solve_products(const Eigen::MatrixXd& S, Eigen::Index p) {
    Eigen::MatrixXd out(p, S.rows());
    Eigen::MatrixXd A(p, p);
    Eigen::VectorXd g(p);
    for (Eigen::Index r = 0; r < S.rows(); ++r) {
        Eigen::Index q = 0;
        for (Eigen::Index l = 0; l < p; ++l)
            for (Eigen::Index j = l; j < p; ++j) A(j, l) = S(r, q++);
        for (Eigen::Index j = 0; j < p; ++j) g[j] = S(r, q++);
        out.col(r) = solve_spd(A, g);
    }
    return out;
}

// The distinct bandwidths and each column's index among them.
std::vector<double> distinct(const std::vector<double>& h, std::vector<std::size_t>& index) {
    std::vector<double> d;
    for (double v : h) {
        auto it = std::find(d.begin(), d.end(), v);
        index.push_back(static_cast<std::size_t>(it - d.begin()));
        if (it == d.end()) d.push_back(v);
    }
    return d;
}

Eigen::MatrixXd batch_at(const LocalData& L, double z0, const std::vector<double>& bandwidths,
                         const Eigen::MatrixXd& times) {
    const Eigen::Index n = L.z.size(), p = L.p(), q = p * (p + 1) / 2 + p, R = times.cols();
    std::vector<std::size_t> which;
    const auto hs = distinct(bandwidths, which);
    Eigen::MatrixXd S = Eigen::MatrixXd::Zero(R, q), W(kRowBlock, R);
    Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> P(kRowBlock, q);
    Eigen::VectorXd x(p), k(static_cast<Eigen::Index>(hs.size()));
    for (Eigen::Index start = 0; start < n; start += kRowBlock) {
        const Eigen::Index len = std::min(kRowBlock, n - start);
        for (Eigen::Index r = 0; r < len; ++r) {
            const Eigen::Index i = start + r;
            product_row(L, i, z0, x, P.row(r).data());
            for (std::size_t b = 0; b < hs.size(); ++b) k[static_cast<Eigen::Index>(b)] = kernel(L, i, z0, hs[b]);
            for (Eigen::Index c = 0; c < R; ++c) W(r, c) = times(i, c) * k[static_cast<Eigen::Index>(which[c])];
        }
        S.noalias() += W.topRows(len).transpose() * P.topRows(len);
    }
    return solve_products(S, p);
}

// Newton's method for every weighting at once, started from the full
// sample's local fit at its bandwidth: per block of rows, the weights
// t k μ(1 − μ) meet the rows' products in one matrix product (the
// information), t k (y − μ) the rows (the score). A weighting that has not
// converged after kMaxBatchNewton steps gets NaN.
constexpr int kMaxBatchNewton = 30;

struct BatchSums {
    Eigen::MatrixXd info, score;  // R × q' (products x_j x_l), R × p
};

// The multiplicities times the kernel weights of each weighting's bandwidth.
Eigen::MatrixXd kernel_times(const LocalData& L, double z0, const std::vector<double>& hs,
                             const std::vector<std::size_t>& which, const Eigen::MatrixXd& times) {
    Eigen::MatrixXd kt(times.rows(), times.cols());
    Eigen::VectorXd k(static_cast<Eigen::Index>(hs.size()));
    for (Eigen::Index i = 0; i < times.rows(); ++i) {
        for (std::size_t b = 0; b < hs.size(); ++b) k[static_cast<Eigen::Index>(b)] = kernel(L, i, z0, hs[b]);
        for (Eigen::Index c = 0; c < times.cols(); ++c)
            kt(i, c) = times(i, c) * k[static_cast<Eigen::Index>(which[static_cast<std::size_t>(c)])];
    }
    return kt;
}

BatchSums logistic_sums(const LocalData& L, double z0, const Eigen::MatrixXd& kt, const Eigen::MatrixXd& B) {
    const Eigen::Index n = L.z.size(), p = L.p(), q = p * (p + 1) / 2, R = kt.cols();
    BatchSums s{Eigen::MatrixXd::Zero(R, q), Eigen::MatrixXd::Zero(R, p)};
    Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> P(kRowBlock, q + p), X(kRowBlock, p);
    Eigen::VectorXd x(p);
    for (Eigen::Index start = 0; start < n; start += kRowBlock) {
        const Eigen::Index len = std::min(kRowBlock, n - start);
        for (Eigen::Index r = 0; r < len; ++r) {
            product_row(L, start + r, z0, x, P.row(r).data());
            X.row(r) = x.transpose();
        }
        const Eigen::ArrayXXd mu = (1.0 + (-(X.topRows(len) * B).array()).exp()).inverse();
        const auto w = kt.middleRows(start, len).array();
        const Eigen::MatrixXd W = (w * mu * (1.0 - mu)).matrix();
        const Eigen::ArrayXXd residual = (-mu).colwise() + L.y.segment(start, len).array();
        const Eigen::MatrixXd V = (w * residual).matrix();
        s.info.noalias() += W.transpose() * P.topRows(len).leftCols(q);
        s.score.noalias() += V.transpose() * X.topRows(len);
    }
    return s;
}

Eigen::MatrixXd logistic_batch_at(const LocalData& L, double z0, const std::vector<double>& bandwidths,
                                  const Eigen::MatrixXd& times) {
    const Eigen::Index p = L.p(), R = times.cols();
    std::vector<std::size_t> which;
    const auto hs = distinct(bandwidths, which);
    const RowSet all = RowSet::all(static_cast<std::size_t>(L.z.size()));
    std::vector<Eigen::VectorXd> starts;
    for (double h : hs) {
        Eigen::VectorXd b = logistic_fit(L, z0, h, all);
        starts.push_back(b.allFinite() ? b : Eigen::VectorXd::Zero(p));
    }
    Eigen::MatrixXd B(p, R);
    for (Eigen::Index c = 0; c < R; ++c) B.col(c) = starts[which[static_cast<std::size_t>(c)]];
    std::vector<bool> done(static_cast<std::size_t>(R), false);
    Eigen::MatrixXd A(p, p);
    const Eigen::MatrixXd kt = kernel_times(L, z0, hs, which, times);
    for (int it = 0; it < kMaxBatchNewton; ++it) {
        const BatchSums s = logistic_sums(L, z0, kt, B);
        bool all_done = true;
        for (Eigen::Index c = 0; c < R; ++c) {
            if (done[static_cast<std::size_t>(c)]) continue;
            Eigen::Index q = 0;
            for (Eigen::Index l = 0; l < p; ++l)
                for (Eigen::Index j = l; j < p; ++j) A(j, l) = s.info(c, q++);
            const Eigen::VectorXd step = solve_spd(A, s.score.row(c).transpose());
            B.col(c) += step;
            const bool finite = step.allFinite() && B.col(c).cwiseAbs().maxCoeff() < 1e6;
            if (!finite) B.col(c).setConstant(kNaN);
            done[static_cast<std::size_t>(c)] =
                !finite || step.cwiseAbs().maxCoeff() <= 1e-10 * (1 + B.col(c).cwiseAbs().maxCoeff());
            all_done = all_done && done[static_cast<std::size_t>(c)];
        }
        if (all_done) return B;
    }
    for (Eigen::Index c = 0; c < R; ++c)
        if (!done[static_cast<std::size_t>(c)]) B.col(c).setConstant(kNaN);
    return B;
}

}  // namespace

std::vector<Eigen::MatrixXd> local_fits(const LocalData& L, const std::vector<double>& grid,
                                        const std::vector<double>& bandwidths, const Eigen::MatrixXd& times,
                                        unsigned threads) {
    std::vector<Eigen::MatrixXd> out(grid.size());
    parallel_for(grid.size(), threads, [&](std::size_t g) {
        out[g] =
            L.logistic ? logistic_batch_at(L, grid[g], bandwidths, times) : batch_at(L, grid[g], bandwidths, times);
    });
    return out;
}

LocalData local_data(const Design& d, const LinearityInputs& in, bool logistic) {
    LocalData L;
    L.d = in.focal.array() - in.focal.mean();
    L.z = in.moderator;
    L.y = d.y;
    L.w = d.weights.size() ? d.weights : Eigen::VectorXd::Ones(static_cast<Eigen::Index>(d.n()));
    L.scale = in.moderator_sd > 0 ? in.moderator_sd : 1.0;
    L.logistic = logistic;
    L.binary = in.binary_focal;
    L.controls.resize(static_cast<Eigen::Index>(d.n()), static_cast<Eigen::Index>(in.controls.size()));
    for (std::size_t c = 0; c < in.controls.size(); ++c) {
        const auto col = d.X.col(in.controls[c]);
        const double mean = col.mean();
        const double sd = std::sqrt((col.array() - mean).square().mean());
        L.controls.col(static_cast<Eigen::Index>(c)) = (col.array() - mean) / (sd > 0 ? sd : 1.0);
    }
    return L;
}

RowSet RowSet::all(std::size_t n) {
    RowSet r;
    r.rows.resize(n);
    r.times.assign(n, 1.0);
    for (std::size_t i = 0; i < n; ++i) r.rows[i] = static_cast<Eigen::Index>(i);
    return r;
}

Eigen::VectorXd local_fit(const LocalData& L, double z0, double h, const RowSet& rows) {
    return L.logistic ? logistic_fit(L, z0, h, rows) : linear_fit(L, z0, h, rows);
}

double interpolated_prediction(const LocalData& L, const std::vector<double>& grid,
                               const std::vector<Eigen::MatrixXd>& fits, Eigen::Index column, Eigen::Index i) {
    const double z = L.z[i];
    const auto upper = std::upper_bound(grid.begin(), grid.end(), z);
    const std::size_t k =
        std::clamp<std::size_t>(static_cast<std::size_t>(upper - grid.begin()), 1, grid.size() - 1) - 1;
    const double t = std::clamp((z - grid[k]) / (grid[k + 1] - grid[k]), 0.0, 1.0);
    Eigen::VectorXd x(L.p());
    auto predict = [&](std::size_t g) {
        local_row(L, i, grid[g], x);
        const double eta = x.dot(fits[g].col(column));
        return L.logistic ? 1.0 / (1.0 + std::exp(-eta)) : eta;
    };
    if (t == 0) return predict(k);
    if (t == 1) return predict(k + 1);
    return (1 - t) * predict(k) + t * predict(k + 1);
}

std::array<double, 3> effective_rows(const LocalData& L, double z0, double h) {
    std::array<double, 3> sum{0, 0, 0}, sum2{0, 0, 0};
    for (Eigen::Index i = 0; i < L.z.size(); ++i) {
        const double w = kernel(L, i, z0, h);
        sum[0] += w;
        sum2[0] += w * w;
        if (!L.binary) continue;
        const std::size_t group = L.d[i] > 0 ? 2 : 1;
        sum[group] += w;
        sum2[group] += w * w;
    }
    std::array<double, 3> out{0, 0, 0};
    for (std::size_t k = 0; k < 3; ++k) out[k] = sum2[k] > 0 ? sum[k] * sum[k] / sum2[k] : 0.0;
    return out;
}

}  // namespace moderato::detail
