#include "moderato/estimation/mixed_df.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace moderato {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// (row, column) of each free entry of T in theta's order.
std::vector<std::pair<Eigen::Index, Eigen::Index>> free_entries(Eigen::Index q, RandomCovariance shape) {
    std::vector<std::pair<Eigen::Index, Eigen::Index>> out;
    for (Eigen::Index j = 0; j < q; ++j)
        for (Eigen::Index i = j; i < q; ++i)
            if (shape == RandomCovariance::Full || i == j) out.emplace_back(i, j);
    return out;
}

Eigen::MatrixXd covariance_from(const Eigen::VectorXd& theta, Eigen::Index q, RandomCovariance shape) {
    Eigen::MatrixXd T = Eigen::MatrixXd::Zero(q, q);
    const auto entries = free_entries(q, shape);
    for (std::size_t k = 0; k < entries.size(); ++k) {
        const auto [i, j] = entries[k];
        T(i, j) = T(j, i) = theta[static_cast<Eigen::Index>(k)];
    }
    return T;
}

// A typical size for each parameter's difference step: variances their own
// size, a covariance the geometric mean of its two variances.
Eigen::VectorXd step_sizes(const Eigen::VectorXd& theta, Eigen::Index q, RandomCovariance shape) {
    const Eigen::MatrixXd T = covariance_from(theta, q, shape);
    const auto entries = free_entries(q, shape);
    Eigen::VectorXd h(theta.size());
    for (std::size_t k = 0; k < entries.size(); ++k) {
        const auto [i, j] = entries[k];
        h[static_cast<Eigen::Index>(k)] = 1e-3 * std::sqrt(T(i, i) * T(j, j));
    }
    h[theta.size() - 1] = 1e-3 * theta[theta.size() - 1];
    return h;
}

// The Hessian of the criterion at theta by central differences.
Eigen::MatrixXd criterion_hessian(const MixedCrossproducts& data, const Eigen::VectorXd& theta, RandomCovariance shape,
                                  MixedEstimation estimation) {
    const Eigen::Index m = theta.size(), q = data.random_columns();
    const Eigen::VectorXd h = step_sizes(theta, q, shape);
    const auto f = [&](Eigen::Index a, double da, Eigen::Index b, double db) {
        Eigen::VectorXd t = theta;
        t[a] += da * h[a];
        t[b] += db * h[b];
        return mixed_loglik(data, t, shape, estimation);
    };
    const double f0 = mixed_loglik(data, theta, shape, estimation);
    Eigen::MatrixXd H(m, m);
    for (Eigen::Index a = 0; a < m; ++a) {
        H(a, a) = (f(a, 1, a, 1) - 2 * f0 + f(a, -1, a, -1)) / (4 * h[a] * h[a]);
        for (Eigen::Index b = 0; b < a; ++b)
            H(a, b) = H(b, a) = (f(a, 1, b, 1) - f(a, 1, b, -1) - f(a, -1, b, 1) + f(a, -1, b, -1)) / (4 * h[a] * h[b]);
    }
    return H;
}

// G_k for every variance parameter, from each group's cross-products; with
// K = L (I + L' Z'Z L)^-1 L' (Psi = L L' = T / sigma2),
//   Z' V^-1 X = (Z'X - Z'Z K Z'X) / sigma2,
//   X' V^-2 X = (X'X - 2 X'Z K Z'X + X'Z K Z'Z K Z'X) / sigma2^2.
std::vector<Eigen::MatrixXd> g_matrices(const MixedCrossproducts& data, const Eigen::MatrixXd& T, double sigma2,
                                        RandomCovariance shape) {
    const Eigen::Index p = data.fixed_columns(), q = data.random_columns();
    const auto entries = free_entries(q, shape);
    std::vector<Eigen::MatrixXd> G(entries.size() + 1, Eigen::MatrixXd::Zero(p, p));
    const Eigen::MatrixXd L = Eigen::LLT<Eigen::MatrixXd>(T / sigma2).matrixL();
    for (const auto& b : data.blocks()) {
        Eigen::MatrixXd M = Eigen::MatrixXd::Identity(q, q) + L.transpose() * b.ZtZ * L;
        const Eigen::MatrixXd K = L * M.llt().solve(L.transpose());
        const Eigen::MatrixXd KZX = K * b.ZtX;
        const Eigen::MatrixXd B = (b.ZtX - b.ZtZ * KZX) / sigma2;
        for (std::size_t k = 0; k < entries.size(); ++k) {
            const auto [i, j] = entries[k];
            const Eigen::MatrixXd outer = B.row(i).transpose() * B.row(j);
            G[k] += i == j ? outer : Eigen::MatrixXd(outer + outer.transpose());
        }
        const Eigen::MatrixXd XZKZX = b.ZtX.transpose() * KZX;
        G.back() += (b.XtX - 2 * XZKZX + KZX.transpose() * b.ZtZ * KZX) / (sigma2 * sigma2);
    }
    return G;
}

}  // namespace

double SatterthwaiteDf::df(const Eigen::VectorXd& c) const {
    const Eigen::VectorXd u = phi * c;
    Eigen::VectorXd grad(static_cast<Eigen::Index>(g.size()));
    for (std::size_t k = 0; k < g.size(); ++k) grad[static_cast<Eigen::Index>(k)] = u.dot(g[k] * u);
    const double variance = c.dot(u), spread = grad.dot(parameter_covariance * grad);
    return spread > 0 ? 2 * variance * variance / spread : std::numeric_limits<double>::infinity();
}

Eigen::VectorXd variance_parameters(const MixedFit& fit, RandomCovariance shape) {
    const Eigen::Index q = fit.random_covariance.rows();
    const auto entries = free_entries(q, shape);
    Eigen::VectorXd theta(static_cast<Eigen::Index>(entries.size()) + 1);
    for (std::size_t k = 0; k < entries.size(); ++k)
        theta[static_cast<Eigen::Index>(k)] = fit.random_covariance(entries[k].first, entries[k].second);
    theta[theta.size() - 1] = fit.residual_variance;
    return theta;
}

double mixed_loglik(const MixedCrossproducts& data, const Eigen::VectorXd& theta, RandomCovariance shape,
                    MixedEstimation estimation) {
    const Eigen::Index q = data.random_columns();
    const double sigma2 = theta[theta.size() - 1];
    if (!(sigma2 > 0)) return kNaN;
    const Eigen::LLT<Eigen::MatrixXd> llt(covariance_from(theta, q, shape) / sigma2);
    if (llt.info() != Eigen::Success) return kNaN;
    try {
        const MixedCriterion c = mixed_criterion(data, llt.matrixL(), estimation);
        // The profiled criterion at Psi, moved from its own sigma2 to this one.
        const double m = static_cast<double>(data.rows()) -
                         (estimation == MixedEstimation::Reml ? static_cast<double>(data.fixed_columns()) : 0.0);
        const double r = c.sigma2 / sigma2;
        return c.value + 0.5 * m * (std::log(r) + 1 - r);
    } catch (const std::domain_error&) {
        return kNaN;
    }
}

std::optional<SatterthwaiteDf> satterthwaite(const MixedCrossproducts& data, const MixedFit& fit,
                                             const MixedFitOptions& options) {
    if (fit.singular) return std::nullopt;
    const Eigen::VectorXd theta = variance_parameters(fit, options.covariance);
    const Eigen::MatrixXd H = criterion_hessian(data, theta, options.covariance, options.estimation);
    if (!H.allFinite()) return std::nullopt;
    const Eigen::LLT<Eigen::MatrixXd> information(-H);
    if (information.info() != Eigen::Success) return std::nullopt;
    SatterthwaiteDf out;
    out.phi = fit.beta_covariance;
    out.g = g_matrices(data, fit.random_covariance, fit.residual_variance, options.covariance);
    out.parameter_covariance = information.solve(Eigen::MatrixXd::Identity(theta.size(), theta.size()));
    return out;
}

bool constant_within_groups(const Eigen::MatrixXd& X, Eigen::Index j, const std::vector<std::size_t>& group,
                            std::size_t groups) {
    std::vector<double> first(groups, kNaN);
    for (std::size_t i = 0; i < group.size(); ++i) {
        const double v = X(static_cast<Eigen::Index>(i), j);
        double& f = first[group[i]];
        if (f != f) f = v;
        else if (v != f) return false;
    }
    return true;
}

std::vector<double> between_within_df(const Eigen::MatrixXd& X, const std::vector<std::size_t>& group,
                                      std::size_t groups, const std::vector<std::vector<int>>& slope_members) {
    const Eigen::Index p = X.cols();
    const double G = static_cast<double>(groups), n = static_cast<double>(X.rows());
    std::vector<int> equation(static_cast<std::size_t>(p), -2);  // -2: level 1, -1: intercept's, k: slope k's
    for (std::size_t k = 0; k < slope_members.size(); ++k)
        for (int j : slope_members[k]) equation[static_cast<std::size_t>(j)] = static_cast<int>(k);
    double between = 0, within = 0;
    std::vector<double> per_slope(slope_members.size(), 0.0);
    for (Eigen::Index j = 0; j < p; ++j) {
        int& e = equation[static_cast<std::size_t>(j)];
        if (e < 0 && constant_within_groups(X, j, group, groups)) e = -1;
        if (e == -1) between += 1;
        else within += 1;
        if (e >= 0) per_slope[static_cast<std::size_t>(e)] += 1;
    }
    std::vector<double> df(static_cast<std::size_t>(p));
    for (Eigen::Index j = 0; j < p; ++j) {
        const int e = equation[static_cast<std::size_t>(j)];
        const double d = e == -1 ? G - between : e >= 0 ? G - per_slope[static_cast<std::size_t>(e)] : n - G - within;
        df[static_cast<std::size_t>(j)] = std::max(1.0, d);
    }
    return df;
}

}  // namespace moderato
