#include "estimation/glm_fit.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "estimation/glm_family.hpp"
#include "moderato/estimation/distributions.hpp"
#include "support/parallel.hpp"

namespace moderato::detail {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

double prior(const Design& d, Eigen::Index i) { return d.weights.size() ? d.weights[i] : 1.0; }

// Row loops run over fixed blocks of rows on all threads; sums add the
// blocks' sums in block order, so a result does not depend on the thread count.
constexpr Eigen::Index kRowBlock = 32768;

std::size_t row_blocks(Eigen::Index n) { return static_cast<std::size_t>((n + kRowBlock - 1) / kRowBlock); }

template <class Fn>
void for_row_blocks(Eigen::Index n, Fn&& fn) {
    parallel_for(row_blocks(n), 0, [&](std::size_t b) {
        const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kRowBlock;
        fn(r0, std::min(n, r0 + kRowBlock) - r0);
    });
}

Eigen::VectorXd linear_predictor(const Design& d, const Eigen::MatrixXd& X, const Eigen::VectorXd& beta) {
    Eigen::VectorXd eta(X.rows());
    for_row_blocks(X.rows(), [&](Eigen::Index r0, Eigen::Index rows) {
        eta.segment(r0, rows).noalias() = X.middleRows(r0, rows) * beta;
        if (d.offset.size()) eta.segment(r0, rows) += d.offset.segment(r0, rows);
    });
    return eta;
}

double total_loglik(const Design& d, Family f, const Eigen::VectorXd& eta, double alpha) {
    long double ll = 0;
    map_reduce_ordered<long double>(
        row_blocks(eta.size()), 0,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kRowBlock, r1 = std::min(eta.size(), r0 + kRowBlock);
            long double part = 0;
            for (Eigen::Index i = r0; i < r1; ++i) part += prior(d, i) * row_loglik(f, d.y[i], eta[i], alpha);
            return part;
        },
        [&](std::size_t, long double&& part) { ll += part; });
    return static_cast<double>(ll);
}

bool is_kept(const std::vector<int>& kept, Eigen::Index j) {
    return std::binary_search(kept.begin(), kept.end(), static_cast<int>(j));
}

// Starting values: one weighted least-squares step on the usual working
// values ((y + 1/2) / 2 for a 0/1 outcome, y + 1/2 for a count); its QR
// decides which columns are estimable (aliased ones start and stay at 0).
LeastSquaresResult start_fit(const Design& d, const Eigen::MatrixXd& X, Family f, const LeastSquaresOptions& lso) {
    const Eigen::Index n = X.rows();
    Eigen::VectorXd z(n), v(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        if (binary_outcome(f)) {
            const double mu = (d.y[i] + 0.5) / 2.0;
            z[i] = f == Family::Probit ? dist::normal_quantile(mu) : std::log(mu / (1 - mu));
            v[i] = prior(d, i) * mu * (1 - mu);
        } else {
            const double mu = d.y[i] + 0.5;
            z[i] = std::log(mu) - (d.offset.size() ? d.offset[i] : 0.0);
            v[i] = prior(d, i) * mu;
        }
    }
    LeastSquaresResult ls = least_squares(X, z, v, lso);
    for (Eigen::Index j = 0; j < ls.coef.size(); ++j)
        if (std::isnan(ls.coef[j])) ls.coef[j] = 0;
    return ls;
}

struct State {
    Eigen::VectorXd beta, eta;
    double loglik = 0;
    std::vector<int> kept;  // the estimable columns, from the QR of the start
};

struct Weights {
    Eigen::VectorXd v, r;  // prior x observed information weight, prior x score
    Eigen::VectorXd mu;    // the mean
};

Weights weights_at(const Design& d, Family f, const Eigen::VectorXd& eta, double alpha) {
    const Eigen::Index n = eta.size();
    Weights w{Eigen::VectorXd(n), Eigen::VectorXd(n), Eigen::VectorXd(n)};
    for_row_blocks(n, [&](Eigen::Index r0, Eigen::Index rows) {
        for (Eigen::Index i = r0; i < r0 + rows; ++i) {
            const RowTerms t = row_terms(f, d.y[i], eta[i], alpha);
            w.v[i] = prior(d, i) * t.weight;
            w.r[i] = prior(d, i) * t.score;
            w.mu[i] = t.mu;
        }
    });
    return w;
}

// The log-likelihood at eta and the weights there, in one pass over the rows
// (a Poisson row's exp(eta) serves both). The sum is the one total_loglik
// makes, in the same block order.
struct Evaluation {
    double loglik = 0;
    Weights w;
};

Evaluation evaluate(const Design& d, Family f, const Eigen::VectorXd& eta, double alpha) {
    const Eigen::Index n = eta.size();
    Evaluation e{0, Weights{Eigen::VectorXd(n), Eigen::VectorXd(n), Eigen::VectorXd(n)}};
    long double ll = 0;
    map_reduce_ordered<long double>(
        row_blocks(n), 0,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kRowBlock, r1 = std::min(n, r0 + kRowBlock);
            long double part = 0;
            for (Eigen::Index i = r0; i < r1; ++i) {
                const double y = d.y[i], p = prior(d, i);
                const RowTerms t = row_terms(f, y, eta[i], alpha);
                e.w.v[i] = p * t.weight;
                e.w.r[i] = p * t.score;
                e.w.mu[i] = t.mu;
                const double l =
                    f == Family::Poisson ? y * eta[i] - t.mu - log_factorial(y) : row_loglik(f, y, eta[i], alpha);
                part += p * l;
            }
            return part;
        },
        [&](std::size_t, long double&& part) { ll += part; });
    e.loglik = static_cast<double>(ll);
    return e;
}

// X_K' diag(v) X_K (into the lower triangle) and X_K' r, in one pass over
// blocks of rows in parallel.
struct CrossProducts {
    Eigen::MatrixXd M;
    Eigen::VectorXd g;
};

CrossProducts weighted_cross_products(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Weights& w,
                                      unsigned threads) {
    constexpr Eigen::Index kBlock = 8192;
    const Eigen::Index n = X.rows(), k = static_cast<Eigen::Index>(kept.size());
    CrossProducts out{Eigen::MatrixXd::Zero(k, k), Eigen::VectorXd::Zero(k)};
    map_reduce_ordered<CrossProducts>(
        static_cast<std::size_t>((n + kBlock - 1) / kBlock), threads,
        [&](std::size_t b) {
            const Eigen::Index r0 = static_cast<Eigen::Index>(b) * kBlock, rows = std::min(n, r0 + kBlock) - r0;
            Eigen::MatrixXd S(rows, k);
            for (Eigen::Index c = 0; c < k; ++c) S.col(c) = X.col(kept[static_cast<std::size_t>(c)]).segment(r0, rows);
            CrossProducts part{Eigen::MatrixXd::Zero(k, k), S.transpose() * w.r.segment(r0, rows)};
            S = S.array().colwise() * w.v.segment(r0, rows).array().sqrt();
            part.M.selfadjointView<Eigen::Lower>().rankUpdate(S.transpose());
            return part;
        },
        [&](std::size_t, CrossProducts&& part) {
            out.M += part.M;
            out.g += part.g;
        });
    return out;
}

// The Newton step on the kept columns, (X_K' V X_K)^{-1} X_K' r: by the
// Cholesky factor of the cross-products (fast; the step's own rounding does
// not move the estimate, which is where the score is zero), or by QR when the
// cross-products are too ill-conditioned for it. Empty when the rank of
// V^{1/2} X_K fell (weights collapsing under separation).
Eigen::VectorXd newton_step(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Weights& w,
                            const LeastSquaresOptions& lso) {
    const Eigen::Index k = static_cast<Eigen::Index>(kept.size());
    const CrossProducts cp = weighted_cross_products(X, kept, w, detail::resolve_threads(lso.threads));
    const Eigen::VectorXd& g = cp.g;
    const Eigen::MatrixXd M = cp.M.selfadjointView<Eigen::Lower>();
    const Eigen::LLT<Eigen::MatrixXd> llt(M);
    if (llt.info() == Eigen::Success) {
        const Eigen::VectorXd d = llt.matrixL().toDenseMatrix().diagonal();
        if (d.minCoeff() > 1e-7 * d.maxCoeff()) return llt.solve(g);
    }
    Eigen::MatrixXd XK(X.rows(), k);
    for (Eigen::Index c = 0; c < k; ++c) XK.col(c) = X.col(kept[static_cast<std::size_t>(c)]);
    const auto ls = least_squares(XK, Eigen::VectorXd::Zero(X.rows()), w.v, lso);
    if (static_cast<Eigen::Index>(ls.kept.size()) != k) return {};
    return ls.inverse_factor * (ls.inverse_factor.transpose() * g);
}

// Newton's method for beta at a fixed alpha, from s.beta, with step halving.
// Returns the iterations used and whether the last step was negligible; the
// weights at the final s.eta go to `at_end` when given.
std::pair<int, bool> newton_beta(const Design& d, const Eigen::MatrixXd& X, Family f, double alpha, int max_iterations,
                                 const LeastSquaresOptions& lso, State& s, Weights* at_end = nullptr) {
    const Eigen::Index p = X.cols();
    Weights w = weights_at(d, f, s.eta, alpha);
    const auto done = [&](int it, bool converged) {
        if (at_end) *at_end = std::move(w);
        return std::pair<int, bool>{it, converged};
    };
    for (int it = 1; it <= max_iterations; ++it) {
        const Eigen::VectorXd stepK = newton_step(X, s.kept, w, lso);
        if (stepK.size() == 0) return done(it, false);  // the rank fell while iterating: separation territory
        const Eigen::Index k = static_cast<Eigen::Index>(s.kept.size());
        Eigen::VectorXd step = Eigen::VectorXd::Zero(p);
        for (Eigen::Index c = 0; c < k; ++c) step[s.kept[static_cast<std::size_t>(c)]] = stepK[c];
        double t = 1.0;
        Eigen::VectorXd beta_new, eta_new;
        Evaluation e;
        for (int halving = 0; halving < 30; ++halving, t *= 0.5) {
            beta_new = s.beta + t * step;
            eta_new = linear_predictor(d, X, beta_new);
            e = evaluate(d, f, eta_new, alpha);
            if (e.loglik >= s.loglik - 1e-12 * (1 + std::abs(s.loglik))) break;
        }
        bool small = true;
        for (Eigen::Index j = 0; j < p; ++j)
            if (std::abs(t * step[j]) > 1e-10 * (1 + std::abs(s.beta[j]))) small = false;
        s.beta = std::move(beta_new);
        s.eta = std::move(eta_new);
        s.loglik = e.loglik;
        w = std::move(e.w);
        if (small) return done(it, true);
    }
    return done(max_iterations, false);
}

// The mean, the scores and the information factor at the estimate; the
// factor decides which columns are estimable (under separation the weights
// can collapse the rank).
GlmFit finish(const Design& d, const Eigen::MatrixXd& X, Family f, double alpha, const LeastSquaresOptions& lso,
              const State& s, bool factor = true, Weights w = {}) {
    GlmFit out;
    const Eigen::Index n = X.rows();
    if (w.v.size() != n) w = weights_at(d, f, s.eta, alpha);
    if (factor) {
        out.factor = least_squares(X, Eigen::VectorXd::Zero(n), w.v, lso);
    } else {
        out.factor.kept = s.kept;
        out.factor.rank = static_cast<int>(s.kept.size());
    }
    out.beta = s.beta;
    for (Eigen::Index j = 0; j < out.beta.size(); ++j)
        if (!is_kept(out.factor.kept, j)) out.beta[j] = kNaN;
    out.eta = s.eta;
    out.mu = std::move(w.mu);
    out.score = std::move(w.r);
    out.loglik = s.loglik;
    out.alpha = alpha;
    return out;
}

State start_state(const Design& d, const Eigen::MatrixXd& X, Family f, double alpha, const LeastSquaresOptions& lso) {
    State s;
    LeastSquaresResult ls = start_fit(d, X, f, lso);
    s.beta = std::move(ls.coef);
    s.kept = std::move(ls.kept);
    s.eta = linear_predictor(d, X, s.beta);
    s.loglik = total_loglik(d, f, s.eta, alpha);
    return s;
}

// alpha's score and curvature summed over the rows; the cross derivatives
// X_K' (w * d2l/deta dalpha) when `cross` is given.
struct AlphaSums {
    double score = 0, curvature = 0;
    Eigen::VectorXd per_row;  // prior x d loglik_i / d alpha
    Eigen::VectorXd cross;    // prior x d2 loglik_i / d eta d alpha
};

AlphaSums alpha_sums(const Design& d, const Eigen::VectorXd& eta, double alpha) {
    const Eigen::Index n = eta.size();
    AlphaSums a{0, 0, Eigen::VectorXd(n), Eigen::VectorXd(n)};
    long double score = 0, curvature = 0;
    for (Eigen::Index i = 0; i < n; ++i) {
        const AlphaTerms t = alpha_terms(d.y[i], eta[i], alpha);
        a.per_row[i] = prior(d, i) * t.score;
        a.cross[i] = prior(d, i) * t.cross;
        score += a.per_row[i];
        curvature += prior(d, i) * t.curvature;
    }
    a.score = static_cast<double>(score);
    a.curvature = static_cast<double>(curvature);
    return a;
}

// One Newton step for log alpha at fixed beta, halved until the likelihood
// does not fall. Returns the change of log alpha.
double newton_log_alpha(const Design& d, double& alpha, State& s) {
    const AlphaSums a = alpha_sums(d, s.eta, alpha);
    const double g = alpha * a.score, h = alpha * alpha * a.curvature + alpha * a.score;  // in theta = log alpha
    double step = h < 0 ? -g / h : (g > 0 ? 1.0 : -1.0);
    step = std::clamp(step, -5.0, 5.0);
    for (int halving = 0; halving < 40; ++halving, step *= 0.5) {
        const double trial = alpha * std::exp(step);
        const double ll = total_loglik(d, Family::NegativeBinomial, s.eta, trial);
        if (ll >= s.loglik - 1e-12 * (1 + std::abs(s.loglik))) {
            alpha = trial;
            s.loglik = ll;
            return step;
        }
    }
    return 0;
}

// The inverse of the negative Hessian of (beta_K, alpha) from the factor of
// the beta block, (X_K' V X_K)^{-1} = A A', by the Schur complement of alpha.
Eigen::MatrixXd joint_inverse(const Eigen::MatrixXd& X, const std::vector<int>& kept, const Eigen::MatrixXd& A,
                              const AlphaSums& a) {
    const Eigen::Index k = static_cast<Eigen::Index>(kept.size());
    Eigen::VectorXd u(k);  // the negative cross block, -X_K' cross
    for (Eigen::Index c = 0; c < k; ++c) u[c] = -X.col(kept[static_cast<std::size_t>(c)]).dot(a.cross);
    const Eigen::VectorXd Bu = A * (A.transpose() * u);
    const double schur = -a.curvature - u.dot(Bu);
    Eigen::MatrixXd inv(k + 1, k + 1);
    inv.topLeftCorner(k, k) = A * A.transpose() + Bu * Bu.transpose() / schur;
    inv.topRightCorner(k, 1) = -Bu / schur;
    inv.bottomLeftCorner(1, k) = -Bu.transpose() / schur;
    inv(k, k) = 1 / schur;
    return inv;
}

// Joint Newton steps on (beta_K, alpha) from the alternating solution, for
// the last digits; stops when a step no longer raises the likelihood.
void polish(const Design& d, const Eigen::MatrixXd& X, const LeastSquaresOptions& lso, double& alpha, State& s) {
    for (int it = 0; it < 8; ++it) {
        const GlmFit at = finish(d, X, Family::NegativeBinomial, alpha, lso, s);
        const AlphaSums a = alpha_sums(d, s.eta, alpha);
        const std::vector<int>& kept = at.factor.kept;
        const Eigen::Index k = static_cast<Eigen::Index>(kept.size());
        Eigen::VectorXd g(k + 1);
        for (Eigen::Index c = 0; c < k; ++c) g[c] = X.col(kept[static_cast<std::size_t>(c)]).dot(at.score);
        g[k] = a.score;
        const Eigen::VectorXd step = joint_inverse(X, kept, at.factor.inverse_factor, a) * g;
        State trial = s;
        for (Eigen::Index c = 0; c < k; ++c) trial.beta[kept[static_cast<std::size_t>(c)]] += step[c];
        const double trial_alpha = alpha + step[k];
        if (!(trial_alpha > 0)) return;
        trial.eta = linear_predictor(d, X, trial.beta);
        trial.loglik = total_loglik(d, Family::NegativeBinomial, trial.eta, trial_alpha);
        if (!(trial.loglik >= s.loglik)) return;
        const bool small = std::abs(step[k]) <= 1e-13 * alpha;
        s = std::move(trial);
        alpha = trial_alpha;
        if (small) return;
    }
}

// From the Poisson fit and the moment estimate of alpha, alternate Newton for
// beta at fixed alpha and for log alpha at fixed beta until neither moves,
// then polish jointly. Iterations count the beta steps.
GlmFit fit_negative_binomial(const Design& d, const Eigen::MatrixXd& X, int max_iterations,
                             const LeastSquaresOptions& lso) {
    State s = start_state(d, X, Family::Poisson, kNaN, lso);
    auto [iterations, converged] = newton_beta(d, X, Family::Poisson, kNaN, max_iterations, lso, s);
    long double excess = 0, mu2 = 0;
    for (Eigen::Index i = 0; i < s.eta.size(); ++i) {
        const double mu = std::exp(s.eta[i]), e = d.y[i] - mu;
        excess += prior(d, i) * (e * e - d.y[i]);
        mu2 += prior(d, i) * mu * mu;
    }
    double alpha = std::clamp(static_cast<double>(excess / mu2), 1e-2, 1e2);
    s.loglik = total_loglik(d, Family::NegativeBinomial, s.eta, alpha);
    converged = false;
    for (int outer = 0; outer < max_iterations && !converged; ++outer) {
        const auto [it, beta_done] = newton_beta(d, X, Family::NegativeBinomial, alpha, max_iterations, lso, s);
        iterations += it;
        const double moved = newton_log_alpha(d, alpha, s);
        converged = beta_done && it == 1 && std::abs(moved) < 1e-10;
        if (alpha < 1e-10) break;  // at the boundary: no overdispersion
    }
    if (alpha >= 1e-10) polish(d, X, lso, alpha, s);
    GlmFit out = finish(d, X, Family::NegativeBinomial, alpha, lso, s);
    const AlphaSums a = alpha_sums(d, s.eta, alpha);
    out.joint_inverse = joint_inverse(X, out.factor.kept, out.factor.inverse_factor, a);
    out.alpha_score = a.per_row;
    out.iterations = iterations;
    out.converged = converged;
    return out;
}

}  // namespace

GlmFit fit_glm(const Design& d, const Eigen::MatrixXd& X, Family family, int max_iterations,
               const LeastSquaresOptions& lso, bool covariance_factor, const GlmStart* start) {
    if (family == Family::NegativeBinomial) return fit_negative_binomial(d, X, max_iterations, lso);
    State s;
    if (start) {
        s.beta = start->beta;
        s.kept = start->kept;
        s.eta = linear_predictor(d, X, s.beta);
        s.loglik = total_loglik(d, family, s.eta, kNaN);
    } else {
        s = start_state(d, X, family, kNaN, lso);
    }
    Weights at_end;
    const auto [iterations, converged] = newton_beta(d, X, family, kNaN, max_iterations, lso, s, &at_end);
    GlmFit out = finish(d, X, family, kNaN, lso, s, covariance_factor, std::move(at_end));
    out.iterations = iterations;
    out.converged = converged;
    return out;
}

}  // namespace moderato::detail
