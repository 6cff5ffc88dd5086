#include "estimation/covariance.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "support/parallel.hpp"

namespace moderato::detail {

namespace {
constexpr Eigen::Index kBlockRows = 8192;
}  // namespace

Eigen::MatrixXd projected_rows(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                               Eigen::Index r0, Eigen::Index r1) {
    const Eigen::Index k = static_cast<Eigen::Index>(kept.size());
    Eigen::MatrixXd Xb(r1 - r0, k);
    for (Eigen::Index c = 0; c < k; ++c) Xb.col(c) = X.col(kept[static_cast<std::size_t>(c)]).segment(r0, r1 - r0);
    return Xb * A;
}

void weigh_rows(Eigen::MatrixXd& W, const double* score, const double* leverage_weight, SeKind kind, double nd,
                double kd) {
    for (Eigen::Index i = 0; i < W.rows(); ++i) {
        const double r = score[i];
        double omega = r * r;
        if (kind == SeKind::HC2 || kind == SeKind::HC3 || kind == SeKind::HC4) {
            const double h = W.row(i).squaredNorm() * (leverage_weight ? leverage_weight[i] : 1.0);
            const double one_minus_h = 1.0 - h;
            if (kind == SeKind::HC2) omega /= one_minus_h;
            else if (kind == SeKind::HC3) omega /= one_minus_h * one_minus_h;
            else omega /= std::pow(one_minus_h, std::min(4.0, nd * h / kd));
        }
        W.row(i) *= std::sqrt(omega);
    }
}

Eigen::MatrixXd expand_covariance(const Eigen::MatrixXd& Vk, const std::vector<int>& kept, Eigen::Index p) {
    Eigen::MatrixXd V = Eigen::MatrixXd::Constant(p, p, std::numeric_limits<double>::quiet_NaN());
    for (std::size_t a = 0; a < kept.size(); ++a)
        for (std::size_t b = 0; b < kept.size(); ++b)
            V(kept[a], kept[b]) = Vk(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b));
    return V;
}

double sandwich_factor(SeKind kind, double nd, double kd, double clusters) {
    if (kind == SeKind::Cluster) return clusters / (clusters - 1.0) * (nd - 1.0) / (nd - kd);
    return kind == SeKind::HC1 ? nd / (nd - kd) : 1.0;
}

Eigen::MatrixXd sandwich_from_meat(const Eigen::MatrixXd& meat_lower, const Eigen::MatrixXd& A, double factor) {
    const Eigen::MatrixXd full = meat_lower.selfadjointView<Eigen::Lower>();
    Eigen::MatrixXd cov = A * full * A.transpose() * factor;
    return (cov + cov.transpose()) * 0.5;
}

Eigen::MatrixXd sandwich(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                         const Eigen::VectorXd& score, const Eigen::VectorXd& leverage_weight, SeKind kind,
                         const std::vector<int>& cluster, int n_clusters, unsigned threads) {
    const Eigen::Index n = X.rows();
    const Eigen::Index k = static_cast<Eigen::Index>(kept.size());
    const std::size_t blocks = static_cast<std::size_t>((n + kBlockRows - 1) / kBlockRows);
    const double nd = static_cast<double>(n), kd = static_cast<double>(k);
    Eigen::MatrixXd meat = Eigen::MatrixXd::Zero(k, k);
    double factor = 1.0;

    if (kind == SeKind::Cluster) {
        Eigen::MatrixXd U = Eigen::MatrixXd::Zero(n_clusters, k);  // per-cluster score sums
        map_reduce_ordered<Eigen::MatrixXd>(
            blocks, threads,
            [&](std::size_t b) {
                const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows, r1 = std::min(n, r0 + kBlockRows);
                Eigen::MatrixXd W = projected_rows(X, kept, A, r0, r1);
                for (Eigen::Index i = 0; i < W.rows(); ++i) W.row(i) *= score[r0 + i];
                return W;
            },
            [&](std::size_t b, Eigen::MatrixXd&& W) {
                const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows;
                for (Eigen::Index i = 0; i < W.rows(); ++i)
                    U.row(cluster[static_cast<std::size_t>(r0 + i)]) += W.row(i);
            });
        meat.selfadjointView<Eigen::Lower>().rankUpdate(U.transpose());
        factor = sandwich_factor(kind, nd, kd, n_clusters);
    } else {
        map_reduce_ordered<Eigen::MatrixXd>(
            blocks, threads,
            [&](std::size_t b) {
                const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows, r1 = std::min(n, r0 + kBlockRows);
                Eigen::MatrixXd W = projected_rows(X, kept, A, r0, r1);
                weigh_rows(W, score.data() + r0, leverage_weight.size() ? leverage_weight.data() + r0 : nullptr, kind,
                           nd, kd);
                Eigen::MatrixXd M = Eigen::MatrixXd::Zero(k, k);
                M.selfadjointView<Eigen::Lower>().rankUpdate(W.transpose());
                return M;
            },
            [&](std::size_t, Eigen::MatrixXd&& M) { meat += M; });
        factor = sandwich_factor(kind, nd, kd, n_clusters);
    }
    return sandwich_from_meat(meat, A, factor);
}

Eigen::MatrixXd sandwich_with_extra(const Eigen::MatrixXd& X, const std::vector<int>& kept,
                                    const Eigen::MatrixXd& bread, const Eigen::VectorXd& score,
                                    const Eigen::VectorXd& extra_score, SeKind kind, const std::vector<int>& cluster,
                                    int n_clusters, unsigned threads) {
    const Eigen::Index n = X.rows(), k = static_cast<Eigen::Index>(kept.size()), m = k + 1;
    const std::size_t blocks = static_cast<std::size_t>((n + kBlockRows - 1) / kBlockRows);
    const bool clustered = kind == SeKind::Cluster;
    Eigen::MatrixXd U = Eigen::MatrixXd::Zero(clustered ? n_clusters : 0, m);  // per-cluster score sums
    Eigen::MatrixXd meat = Eigen::MatrixXd::Zero(m, m);
    map_reduce_ordered<Eigen::MatrixXd>(
        blocks, threads,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows, r1 = std::min(n, r0 + kBlockRows);
            Eigen::MatrixXd S(r1 - r0, m);  // the rows' scores
            for (Eigen::Index c = 0; c < k; ++c)
                S.col(c) = X.col(kept[static_cast<std::size_t>(c)])
                               .segment(r0, r1 - r0)
                               .cwiseProduct(score.segment(r0, r1 - r0));
            S.col(k) = extra_score.segment(r0, r1 - r0);
            return S;
        },
        [&](std::size_t b, Eigen::MatrixXd&& S) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlockRows;
            if (!clustered) meat.selfadjointView<Eigen::Lower>().rankUpdate(S.transpose());
            else
                for (Eigen::Index i = 0; i < S.rows(); ++i)
                    U.row(cluster[static_cast<std::size_t>(r0 + i)]) += S.row(i);
        });
    if (clustered) meat.selfadjointView<Eigen::Lower>().rankUpdate(U.transpose());
    const double nd = static_cast<double>(n), md = static_cast<double>(m), G = n_clusters;
    const double factor = kind == SeKind::Cluster ? G / (G - 1.0) * (nd - 1.0) / (nd - md)
                          : kind == SeKind::HC1   ? nd / (nd - md)
                                                  : 1.0;
    const Eigen::MatrixXd full = meat.selfadjointView<Eigen::Lower>();
    Eigen::MatrixXd cov = bread * full * bread.transpose() * factor;
    return (cov + cov.transpose()) * 0.5;
}

}  // namespace moderato::detail
