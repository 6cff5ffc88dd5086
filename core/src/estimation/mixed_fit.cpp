#include "moderato/estimation/mixed_fit.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <numeric>
#include <vector>

#include "moderato/estimation/distributions.hpp"

namespace moderato {

namespace {

// The free entries of L: the lower triangle column by column, or the diagonal.
Eigen::MatrixXd factor_from(const Eigen::VectorXd& theta, Eigen::Index q, RandomCovariance shape) {
    Eigen::MatrixXd L = Eigen::MatrixXd::Zero(q, q);
    Eigen::Index k = 0;
    for (Eigen::Index j = 0; j < q; ++j)
        for (Eigen::Index i = j; i < q; ++i)
            if (shape == RandomCovariance::Full || i == j) L(i, j) = theta[k++];
    return L;
}

Eigen::Index free_count(Eigen::Index q, RandomCovariance shape) {
    return shape == RandomCovariance::Full ? q * (q + 1) / 2 : q;
}

// The free entries of L = I.
Eigen::VectorXd identity_factor(Eigen::Index q, RandomCovariance shape) {
    if (shape == RandomCovariance::Diagonal) return Eigen::VectorXd::Ones(q);
    Eigen::VectorXd theta = Eigen::VectorXd::Zero(free_count(q, shape));
    for (Eigen::Index j = 0, k = 0; j < q; k += q - j, ++j) theta[k] = 1;  // column j starts at its diagonal
    return theta;
}

struct Simplex {
    std::vector<Eigen::VectorXd> points;
    std::vector<double> values;  // to be minimised
};

// One Nelder–Mead run (standard coefficients 1, 2, 0.5, 0.5) from `start`
// with initial steps `step`; stops when the values agree to `ftol` and the
// simplex is smaller than `xtol`, or after `budget` evaluations.
Eigen::VectorXd nelder_mead(const std::function<double(const Eigen::VectorXd&)>& f, const Eigen::VectorXd& start,
                            double step, int budget, int& used, double& best) {
    const Eigen::Index k = start.size();
    Simplex s;
    s.points.push_back(start);
    for (Eigen::Index i = 0; i < k; ++i) {
        Eigen::VectorXd v = start;
        v[i] += step;
        s.points.push_back(v);
    }
    for (const auto& p : s.points) s.values.push_back(f(p)), ++used;
    std::vector<std::size_t> order(s.points.size());
    while (used < budget) {
        std::iota(order.begin(), order.end(), 0);
        std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return s.values[a] < s.values[b]; });
        const std::size_t lo = order.front(), hi = order.back(), next = order[order.size() - 2];
        double size = 0;
        for (const auto& p : s.points) size = std::max(size, (p - s.points[lo]).cwiseAbs().maxCoeff());
        if (s.values[hi] - s.values[lo] <= 1e-12 * (1 + std::abs(s.values[lo])) && size <= 1e-9) break;
        Eigen::VectorXd centre = Eigen::VectorXd::Zero(k);
        for (std::size_t i : order)
            if (i != hi) centre += s.points[i];
        centre /= static_cast<double>(k);
        const auto at = [&](double t) { return Eigen::VectorXd(centre + t * (s.points[hi] - centre)); };
        const Eigen::VectorXd r = at(-1);
        const double fr = f(r);
        ++used;
        if (fr < s.values[lo]) {
            const Eigen::VectorXd e = at(-2);
            const double fe = f(e);
            ++used;
            s.points[hi] = fe < fr ? e : r;
            s.values[hi] = std::min(fe, fr);
        } else if (fr < s.values[next]) {
            s.points[hi] = r;
            s.values[hi] = fr;
        } else {
            const Eigen::VectorXd c = fr < s.values[hi] ? at(-0.5) : at(0.5);
            const double fc = f(c);
            ++used;
            if (fc < std::min(fr, s.values[hi])) {
                s.points[hi] = c;
                s.values[hi] = fc;
            } else {  // shrink towards the best point
                for (std::size_t i = 0; i < s.points.size(); ++i)
                    if (i != lo) {
                        s.points[i] = s.points[lo] + 0.5 * (s.points[i] - s.points[lo]);
                        s.values[i] = f(s.points[i]);
                        ++used;
                    }
            }
        }
    }
    const auto it = std::min_element(s.values.begin(), s.values.end());
    best = *it;
    return s.points[static_cast<std::size_t>(it - s.values.begin())];
}

}  // namespace

MixedFit fit_mixed(const MixedCrossproducts& data, const MixedFitOptions& options) {
    const Eigen::Index q = data.random_columns();
    // The search runs over the factor for Z's columns scaled to unit root mean square, so a
    // column's units do not set the simplex's scale: L = D^-1 L~ with D the columns' RMS.
    Eigen::VectorXd rms = Eigen::VectorXd::Zero(q);
    for (const auto& b : data.blocks()) rms += b.ZtZ.diagonal();
    rms = (rms / static_cast<double>(data.rows())).cwiseSqrt().cwiseMax(1e-300);
    const auto factor = [&](const Eigen::VectorXd& theta) {
        return Eigen::MatrixXd(rms.cwiseInverse().asDiagonal() * factor_from(theta, q, options.covariance));
    };
    const auto criterion = [&](const Eigen::VectorXd& theta) {
        return mixed_criterion(data, factor(theta), options.estimation);
    };
    const auto f = [&](const Eigen::VectorXd& theta) { return -criterion(theta).value; };
    // From L = I (Psi = I, as many fits start), restarted from the best point with
    // smaller steps until a restart gains nothing.
    Eigen::VectorXd theta = identity_factor(q, options.covariance);
    MixedFit out;
    const int budget = 4000 * static_cast<int>(theta.size() + 1);
    double best = f(theta), step = 0.5;
    ++out.evaluations;
    for (int restart = 0; restart < 20 && out.evaluations < budget; ++restart) {
        double value = 0;
        const Eigen::VectorXd next = nelder_mead(f, theta, step, budget, out.evaluations, value);
        const bool gained = value < best - 1e-13 * (1 + std::abs(best));
        if (value <= best) {
            theta = next;
            best = value;
        }
        if (!gained && restart > 0) {
            out.converged = true;
            break;
        }
        step = std::max(1e-3, 0.25 * step);
    }
    const MixedCriterion at = criterion(theta);
    const Eigen::MatrixXd L = factor(theta);
    out.criterion = at.value;
    out.beta = at.beta;
    out.beta_covariance = at.beta_covariance;
    out.residual_variance = at.sigma2;
    out.random_covariance = at.sigma2 * L * L.transpose();
    // Boundary (a zero variance, or a correlation at ±1): a diagonal entry of the scaled factor
    // (a random effect's part of the outcome's spread, relative to sigma) that is negligible.
    out.singular = factor_from(theta, q, options.covariance).diagonal().cwiseAbs().minCoeff() <= 1e-4;
    return out;
}

RandomEffectTest added_random_effect_test(const MixedFit& without, const MixedFit& with, Eigen::Index before) {
    RandomEffectTest t;
    t.df_low = before;
    t.df_high = before + 1;
    t.statistic = std::max(0.0, 2 * (with.criterion - without.criterion));
    // A chi-square with 0 degrees of freedom is 0: it exceeds no positive statistic.
    const auto upper = [&](Eigen::Index df) {
        return df == 0 ? (t.statistic > 0 ? 0.0 : 1.0) : dist::upper_p_chi2(t.statistic, static_cast<double>(df));
    };
    t.p_value = 0.5 * (upper(t.df_low) + upper(t.df_high));
    return t;
}

}  // namespace moderato
