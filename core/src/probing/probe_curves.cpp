#include "moderato/probing/probe_curves.hpp"

#include <cmath>

#include "estimation/glm_family.hpp"

namespace moderato {

namespace {

// The mean at eta and its derivative d mean / d eta, by the family's link.
std::pair<double, double> mean_and_slope(Link link, double eta) {
    switch (link) {
        case Link::Logit: {
            const double p = detail::expit(eta);
            return {p, p * (1 - p)};
        }
        case Link::Probit:
            return {detail::normal_probability(eta), detail::normal_density(eta)};
        case Link::Log: {
            const double mu = std::exp(eta);
            return {mu, mu};
        }
        case Link::Identity:
            break;
    }
    return {eta, 1.0};
}

}  // namespace

std::vector<CurvePoint> prediction_line(const Design& design, const FitResult& fit, const std::string& focal,
                                        std::map<std::string, double> values, const std::vector<double>& xs,
                                        bool probability, double critical_value) {
    const double q = std::isnan(critical_value) ? fit.critical_value : critical_value;
    const Eigen::VectorXd b = fit.beta.unaryExpr([](double v) { return std::isnan(v) ? 0.0 : v; });
    const Eigen::MatrixXd V = fit.covariance.unaryExpr([](double v) { return std::isnan(v) ? 0.0 : v; });
    const Link link = link_of(fit.family);
    std::vector<CurvePoint> out;
    out.reserve(xs.size());
    for (const double x : xs) {
        values[focal] = x;
        const Eigen::VectorXd row = design_row(design, values);
        const double eta = row.dot(b);
        const double se = std::sqrt(std::max(0.0, row.dot(V * row)));
        CurvePoint c;
        c.x = x;
        if (probability) {
            const auto [mu, slope] = mean_and_slope(link, eta);
            c.estimate = mu;
            c.std_error = slope * se;
            c.lower = mean_and_slope(link, eta - q * se).first;
            c.upper = mean_and_slope(link, eta + q * se).first;
        } else {
            c.estimate = eta;
            c.std_error = se;
            c.lower = eta - q * se;
            c.upper = eta + q * se;
        }
        out.push_back(c);
    }
    return out;
}

std::vector<CurvePoint> effect_band(const EffectFunction& f, const std::vector<double>& ms, double critical_value) {
    std::vector<CurvePoint> out;
    out.reserve(ms.size());
    for (const double m : ms) {
        CurvePoint c;
        c.x = m;
        c.estimate = f.effect(m);
        c.std_error = std::sqrt(std::max(0.0, f.variance(m)));
        c.lower = c.estimate - critical_value * c.std_error;
        c.upper = c.estimate + critical_value * c.std_error;
        out.push_back(c);
    }
    return out;
}

EffectPoint effect_at(const EffectFunction& f, double m, const FitResult& fit, std::pair<double, double> observed) {
    EffectPoint e = effect_point(m, infer(f.effect(m), std::sqrt(std::max(0.0, f.variance(m))), fit));
    e.beyond_data = m < observed.first || m > observed.second;
    return e;
}

std::vector<double> even_grid(double lo, double hi, int n) {
    std::vector<double> out;
    if (n < 2) n = 2;
    out.reserve(static_cast<std::size_t>(n));
    for (int i = 0; i < n; ++i) out.push_back(i + 1 == n ? hi : lo + (hi - lo) * i / (n - 1));
    return out;
}

}  // namespace moderato
