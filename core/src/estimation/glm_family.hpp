// One row's part of a generalized linear model's log-likelihood, its mean and
// its first two derivatives with respect to the linear predictor eta (which
// includes any offset), written to keep their digits far in the tails
// (private to core). The negative binomial (NB2) also has alpha's parts.
#pragma once

#include <array>
#include <boost/math/special_functions/digamma.hpp>
#include <boost/math/special_functions/trigamma.hpp>
#include <cmath>
#include <numbers>

#include "estimation/logistic_math.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato::detail {

struct RowTerms {
    double mu = 0;      // the mean at eta
    double score = 0;   // d loglik / d eta
    double weight = 0;  // -d2 loglik / d eta2 (observed information; > 0)
};

inline double normal_density(double t) { return std::exp(-0.5 * t * t) / std::sqrt(2 * std::numbers::pi); }

// Phi(t), the standard normal distribution function, without cancellation.
inline double normal_probability(double t) { return 0.5 * std::erfc(-t / std::numbers::sqrt2); }

// phi(t) / Phi(t) (the inverse Mills ratio of -t): direct while Phi(t) keeps
// its digits, else Laplace's continued fraction for the lower tail,
// Phi(-u) = phi(u) / (u + 1/(u + 2/(u + 3/(u + ...)))).
inline double mills_ratio(double t) {
    if (t > -8) return normal_density(t) / normal_probability(t);
    const double u = -t;
    double cf = u;
    for (int k = 60; k >= 1; --k) cf = u + k / cf;
    return cf;
}

// log Phi(t).
inline double log_normal_probability(double t) {
    if (t > 0) return std::log1p(-0.5 * std::erfc(t / std::numbers::sqrt2));
    if (t > -8) return std::log(normal_probability(t));
    return -0.5 * t * t - 0.5 * std::log(2 * std::numbers::pi) - std::log(mills_ratio(t));
}

// log(y!) = lgamma(y + 1): from a table for small whole counts (the common
// case, evaluated on every row at every likelihood evaluation), else lgamma.
inline double log_factorial(double y) {
    static const auto table = [] {
        std::array<double, 256> t{};
        for (std::size_t k = 1; k < t.size(); ++k) t[k] = t[k - 1] + std::log(static_cast<double>(k));
        return t;
    }();
    if (y >= 0 && y < 256 && y == std::floor(y)) return table[static_cast<std::size_t>(y)];
    return std::lgamma(y + 1);
}

// lgamma(y + r) - lgamma(r), by a sum of logs for small whole y (where the
// two lgammas would cancel for a large r).
inline double log_rising(double r, double y) {
    if (y == std::floor(y) && y <= 64) {
        double s = 0;
        for (int k = 0; k < static_cast<int>(y); ++k) s += std::log(r + k);
        return s;
    }
    return std::lgamma(y + r) - std::lgamma(r);
}

// Family Logistic, Probit or Poisson (alpha unused), or NegativeBinomial.
inline RowTerms row_terms(Family f, double y, double eta, double alpha) {
    RowTerms t;
    switch (f) {
        case Family::Logistic:
            t.mu = expit(eta);
            t.score = y - t.mu;
            t.weight = t.mu * (1 - t.mu);
            break;
        case Family::Probit: {
            const double q = 2 * y - 1, lambda = q * mills_ratio(q * eta);
            t.mu = normal_probability(eta);
            t.score = lambda;
            t.weight = lambda * (lambda + eta);
            break;
        }
        case Family::Poisson:
            t.mu = std::exp(eta);
            t.score = y - t.mu;
            t.weight = t.mu;
            break;
        case Family::NegativeBinomial: {
            t.mu = std::exp(eta);
            const double s = 1 + alpha * t.mu;
            t.score = (y - t.mu) / s;
            t.weight = t.mu * (1 + alpha * y) / (s * s);
            break;
        }
        case Family::Linear:
            t.mu = eta;
            t.score = y - eta;
            t.weight = 1;
            break;
    }
    return t;
}

// One row's log-likelihood (without a prior weight).
inline double row_loglik(Family f, double y, double eta, double alpha) {
    switch (f) {
        case Family::Logistic:
            return y == 1.0 ? -log1pexp(-eta) : -log1pexp(eta);
        case Family::Probit:
            return log_normal_probability((2 * y - 1) * eta);
        case Family::Poisson:
            return y * eta - std::exp(eta) - log_factorial(y);
        case Family::NegativeBinomial: {
            const double r = 1 / alpha, mu = std::exp(eta);
            // log(1 + alpha mu) without overflow for a large eta
            const double l1 = std::log1p(alpha * mu);
            return log_rising(r, y) - log_factorial(y) - r * l1 + y * (std::log(alpha) + eta - l1);
        }
        case Family::Linear:
            break;
    }
    return 0;
}

// alpha's parts of one NB2 row's log-likelihood (without a prior weight).
struct AlphaTerms {
    double score = 0;      // d loglik / d alpha
    double curvature = 0;  // d2 loglik / d alpha2
    double cross = 0;      // d2 loglik / d eta d alpha
};

inline AlphaTerms alpha_terms(double y, double eta, double alpha) {
    const double r = 1 / alpha, mu = std::exp(eta), s = 1 + alpha * mu, l1 = std::log1p(alpha * mu);
    double d1 = 0, d2 = 0;  // digamma(y + r) - digamma(r), trigamma(y + r) - trigamma(r)
    if (y == std::floor(y) && y <= 64) {
        for (int k = 0; k < static_cast<int>(y); ++k) {
            d1 += 1 / (r + k);
            d2 -= 1 / ((r + k) * (r + k));
        }
    } else {
        d1 = boost::math::digamma(y + r) - boost::math::digamma(r);
        d2 = boost::math::trigamma(y + r) - boost::math::trigamma(r);
    }
    const double a2 = alpha * alpha;
    AlphaTerms t;
    t.score = (l1 - d1) / a2 + (y - mu) / (alpha * s);
    t.curvature =
        -2 * (l1 - d1) / (a2 * alpha) + mu / (a2 * s) + d2 / (a2 * a2) - (y - mu) * (1 + 2 * alpha * mu) / (a2 * s * s);
    t.cross = -(y - mu) * mu / (s * s);
    return t;
}

}  // namespace moderato::detail
