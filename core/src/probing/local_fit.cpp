#include "probing/local_fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

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

}  // namespace

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
                               const std::vector<Eigen::VectorXd>& fits, Eigen::Index i) {
    const double z = L.z[i];
    const auto upper = std::upper_bound(grid.begin(), grid.end(), z);
    const std::size_t k =
        std::clamp<std::size_t>(static_cast<std::size_t>(upper - grid.begin()), 1, grid.size() - 1) - 1;
    const double t = std::clamp((z - grid[k]) / (grid[k + 1] - grid[k]), 0.0, 1.0);
    Eigen::VectorXd x(L.p());
    auto predict = [&](std::size_t g) {
        local_row(L, i, grid[g], x);
        const double eta = x.dot(fits[g]);
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
