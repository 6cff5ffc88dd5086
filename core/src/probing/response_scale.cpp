#include "moderato/probing/response_scale.hpp"

#include <algorithm>
#include <boost/math/tools/roots.hpp>
#include <cmath>
#include <functional>
#include <limits>

#include "estimation/glm_family.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::quoted;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The mean as a function of the linear predictor (without any offset: a
// count model with an exposure is read per unit of exposure) and its first
// two derivatives.
struct InverseLink {
    double (*mean)(double);
    double (*d1)(double);
    double (*d2)(double);
};

double logit_d1(double eta) {
    const double p = detail::expit(eta);
    return p * (1 - p);
}
double logit_d2(double eta) {
    const double p = detail::expit(eta);
    return p * (1 - p) * (1 - 2 * p);
}
double probit_d2(double eta) { return -eta * detail::normal_density(eta); }
double exp_of(double eta) { return std::exp(eta); }

InverseLink inverse_link(Family f) {
    switch (link_of(f)) {
        case Link::Logit:
            return {&detail::expit, &logit_d1, &logit_d2};
        case Link::Probit:
            return {&detail::normal_probability, &detail::normal_density, &probit_d2};
        case Link::Log:
            return {&exp_of, &exp_of, &exp_of};
        case Link::Identity:
            break;
    }
    throw InputError("the outcome scale applies to logistic, probit, poisson and negative-binomial models");
}

int main_column(const Design& d, const std::string& column) { return d.main_column(column); }

int dummy_column(const Design& d, const std::string& column, const std::string& level) {
    for (std::size_t j = 0; j < d.columns.size(); ++j)
        if (d.columns[j].atoms.size() == 1 && d.columns[j].atoms[0] == Atom{column, level, 1})
            return static_cast<int>(j);
    return -1;
}

// Design rows with some columns overridden by constants and, optionally,
// differentiated with respect to one or two numeric columns. rows = 1 when
// every model column is overridden (a single profile), else one row per
// observation with the others at their observed values.
Eigen::MatrixXd rows_at(const Design& d, const std::map<std::string, double>& overrides,
                        const std::vector<std::string>& deriv, Eigen::Index rows) {
    const Eigen::Index p = static_cast<Eigen::Index>(d.columns.size());
    Eigen::MatrixXd M(rows, p);
    for (Eigen::Index j = 0; j < p; ++j) {
        auto col = M.col(j);
        col.setOnes();
        std::size_t found = 0;
        for (const auto& a : d.columns[static_cast<std::size_t>(j)].atoms) {
            auto ov = overrides.find(a.column);
            if (!a.level.empty()) {
                if (ov != overrides.end()) {
                    if (ov->second != d.level_index(a.column, a.level)) col.setZero();
                } else {
                    col.array() *= d.X.col(dummy_column(d, a.column, a.level)).array();
                }
                continue;
            }
            const bool differentiate = std::find(deriv.begin(), deriv.end(), a.column) != deriv.end();
            if (differentiate) ++found;
            const int k = differentiate ? a.power - 1 : a.power;
            const double factor = differentiate ? a.power : 1.0;
            if (ov != overrides.end()) {
                col *= factor * std::pow(ov->second, k);
            } else {
                const auto raw = d.X.col(main_column(d, a.column));
                if (k == 1) col.array() *= factor * raw.array();
                else if (k != 0) col.array() *= factor * raw.array().pow(k);
                else col *= factor;
            }
        }
        if (found != deriv.size()) col.setZero();
    }
    return M;
}

Eigen::VectorXd finite(const Eigen::VectorXd& b) {
    return b.unaryExpr([](double v) { return std::isnan(v) ? 0.0 : v; });
}

double delta_se(const Eigen::VectorXd& grad, const Eigen::MatrixXd& cov) {
    const Eigen::MatrixXd V = cov.unaryExpr([](double v) { return std::isnan(v) ? 0.0 : v; });
    return std::sqrt(grad.dot(V * grad));
}

struct Profile {
    std::map<std::string, double> overrides;
    Eigen::Index rows;
};

Profile profile(const Design& d, const ScaleRequest& r) {
    if (r.averaging == Averaging::AtValues) return {typical_values(d, r.values), 1};
    return {r.values, d.X.rows()};
}

void check_request(const Design& d, const FitResult& fit, const ScaleRequest& r) {
    if (!generalized(fit.family))
        throw InputError(
            "the outcome scale applies to logistic, probit, poisson and negative-binomial models; "
            "this is a linear model");
    if (main_column(d, r.focal) < 0)
        throw InputError("focal predictor " + quoted(r.focal) + " is not a numeric main effect of the model");
    if (!r.moderator.empty() && main_column(d, r.moderator) < 0 && !d.categorical(r.moderator))
        throw InputError("moderator " + quoted(r.moderator) + " is not in the model");
}

}  // namespace

std::string outcome_scale_words(const FitResult& fit, const std::string& outcome) {
    if (binary_outcome(fit.family)) return "P(" + outcome + " = 1)";
    if (fit.exposure.empty()) return "the expected count of " + outcome;
    return "the rate of " + outcome + " per unit of " + fit.exposure;
}

LevelEffect probability_effect_gradient(const Design& d, const FitResult& fit, const ScaleRequest& request, double m) {
    check_request(d, fit, request);
    Profile pr = profile(d, request);
    pr.overrides[request.moderator] = m;
    const Eigen::VectorXd b = finite(fit.beta);
    const double rows = static_cast<double>(pr.rows);
    const InverseLink g = inverse_link(fit.family);
    double me = 0;
    Eigen::VectorXd grad = Eigen::VectorXd::Zero(b.size());
    if (d.is_binary(request.focal)) {  // discrete change from 0 to 1
        auto o1 = pr.overrides, o0 = pr.overrides;
        o1[request.focal] = 1;
        o0[request.focal] = 0;
        const Eigen::MatrixXd X1 = rows_at(d, o1, {}, pr.rows), X0 = rows_at(d, o0, {}, pr.rows);
        const Eigen::VectorXd e1 = X1 * b, e0 = X0 * b;
        me = (e1.unaryExpr(g.mean) - e0.unaryExpr(g.mean)).sum() / rows;
        grad = (X1.transpose() * e1.unaryExpr(g.d1) - X0.transpose() * e0.unaryExpr(g.d1)) / rows;
    } else {  // derivative dmu/dF = mu'(eta) * deta/dF
        const Eigen::MatrixXd X = rows_at(d, pr.overrides, {}, pr.rows);
        const Eigen::MatrixXd G = rows_at(d, pr.overrides, {request.focal}, pr.rows);
        const Eigen::VectorXd eta = X * b, slope = G * b;
        me = (eta.unaryExpr(g.d1).array() * slope.array()).sum() / rows;
        grad = (X.transpose() * (eta.unaryExpr(g.d2).array() * slope.array()).matrix() +
                G.transpose() * eta.unaryExpr(g.d1)) /
               rows;
    }
    return {"", me, grad};
}

EffectPoint probability_effect(const Design& d, const FitResult& fit, const ScaleRequest& request, double m) {
    const LevelEffect e = probability_effect_gradient(d, fit, request, m);
    return effect_point(m, infer(e.value, delta_se(e.gradient, fit.covariance), fit));
}

SignificanceRegions probability_regions(const Design& d, const FitResult& fit, const ScaleRequest& request, double q,
                                        double lo, double hi, int grid) {
    auto h = [&](double m) { return std::abs(probability_effect(d, fit, request, m).statistic) - q; };
    std::vector<double> ms, hs;
    for (int i = 0; i <= grid; ++i) {
        ms.push_back(lo + (hi - lo) * i / grid);
        hs.push_back(h(ms.back()));
    }
    SignificanceRegions s;
    s.critical_value = q;
    s.kind = RegionsKind::Scan;
    s.scan_from = lo;
    s.scan_to = hi;
    double start = hs[0] > 0 ? lo : kNaN;
    for (int i = 1; i <= grid; ++i) {
        if ((hs[static_cast<std::size_t>(i - 1)] > 0) == (hs[static_cast<std::size_t>(i)] > 0)) continue;
        std::uintmax_t iters = 100;
        const auto root =
            boost::math::tools::toms748_solve(h, ms[static_cast<std::size_t>(i - 1)], ms[static_cast<std::size_t>(i)],
                                              hs[static_cast<std::size_t>(i - 1)], hs[static_cast<std::size_t>(i)],
                                              boost::math::tools::eps_tolerance<double>(40), iters);
        const double r = 0.5 * (root.first + root.second);
        s.boundaries.push_back(r);
        if (hs[static_cast<std::size_t>(i)] > 0) start = r;
        else {
            s.significant.push_back({start, r});
            start = kNaN;
        }
    }
    if (!std::isnan(start)) s.significant.push_back({start, hi});
    return s;
}

InteractionEffect probability_interaction(const Design& d, const FitResult& fit, const ScaleRequest& request) {
    check_request(d, fit, request);
    if (request.moderator.empty() || main_column(d, request.moderator) < 0)
        throw InputError("the interaction effect on the outcome scale needs a numeric (or 0/1) moderator");
    const Profile pr = profile(d, request);
    const bool fb = d.is_binary(request.focal), mb = d.is_binary(request.moderator);
    const std::string& F = request.focal;
    const std::string& M = request.moderator;
    const double rows = static_cast<double>(pr.rows);
    const InverseLink g = inverse_link(fit.family);
    auto with = [&](std::initializer_list<std::pair<const std::string, double>> extra) {
        auto o = pr.overrides;
        for (const auto& [k, v] : extra) o[k] = v;
        return o;
    };
    std::function<double(const Eigen::VectorXd&)> s;
    InteractionEffect out;
    if (fb && mb) {
        out.kind = InteractionMeasure::DoubleDifference;
        const Eigen::MatrixXd X11 = rows_at(d, with({{F, 1}, {M, 1}}), {}, pr.rows),
                              X10 = rows_at(d, with({{F, 1}, {M, 0}}), {}, pr.rows),
                              X01 = rows_at(d, with({{F, 0}, {M, 1}}), {}, pr.rows),
                              X00 = rows_at(d, with({{F, 0}, {M, 0}}), {}, pr.rows);
        s = [=](const Eigen::VectorXd& b) {
            return ((X11 * b).unaryExpr(g.mean) - (X10 * b).unaryExpr(g.mean) - (X01 * b).unaryExpr(g.mean) +
                    (X00 * b).unaryExpr(g.mean))
                       .sum() /
                   rows;
        };
    } else if (fb || mb) {
        out.kind = InteractionMeasure::SlopeDifference;
        const std::string& B = fb ? F : M;  // the binary one
        const std::string& C = fb ? M : F;  // the continuous one
        const Eigen::MatrixXd X1 = rows_at(d, with({{B, 1}}), {}, pr.rows),
                              X0 = rows_at(d, with({{B, 0}}), {}, pr.rows),
                              G1 = rows_at(d, with({{B, 1}}), {C}, pr.rows),
                              G0 = rows_at(d, with({{B, 0}}), {C}, pr.rows);
        s = [=](const Eigen::VectorXd& b) {
            const Eigen::VectorXd e1 = X1 * b, e0 = X0 * b;
            return ((e1.unaryExpr(g.d1).array() * (G1 * b).array()) - (e0.unaryExpr(g.d1).array() * (G0 * b).array()))
                       .sum() /
                   rows;
        };
    } else {
        out.kind = InteractionMeasure::CrossPartial;
        const Eigen::MatrixXd X = rows_at(d, pr.overrides, {}, pr.rows), GF = rows_at(d, pr.overrides, {F}, pr.rows),
                              GM = rows_at(d, pr.overrides, {M}, pr.rows),
                              GFM = rows_at(d, pr.overrides, {F, M}, pr.rows);
        s = [=](const Eigen::VectorXd& b) {
            const Eigen::VectorXd eta = X * b;
            return (eta.unaryExpr(g.d2).array() * (GF * b).array() * (GM * b).array() +
                    eta.unaryExpr(g.d1).array() * (GFM * b).array())
                       .sum() /
                   rows;
        };
    }
    const Eigen::VectorXd b = finite(fit.beta);
    out.estimate = s(b);
    // Central differences with one Richardson step: error O(h^4).
    Eigen::VectorXd grad(b.size());
    for (Eigen::Index j = 0; j < b.size(); ++j) {
        if (std::isnan(fit.beta[j])) {
            grad[j] = 0;
            continue;
        }
        const double h = 1e-3 * std::max(1.0, std::abs(b[j]));
        auto D = [&](double step) {
            Eigen::VectorXd up = b, down = b;
            up[j] += step;
            down[j] -= step;
            return (s(up) - s(down)) / (2 * step);
        };
        grad[j] = (4 * D(h / 2) - D(h)) / 3;
    }
    static_cast<Inference&>(out) = infer(out.estimate, delta_se(grad, fit.covariance), fit);
    return out;
}

ProbeResult probe_response(const Design& d, const FitResult& fit, const ProbeSpec& spec, Averaging averaging) {
    ProbeResult r = probe(d, fit, spec);  // validation, defaults, crossovers
    ScaleRequest req;
    req.focal = spec.focal;
    req.moderator = spec.moderator;
    req.averaging = averaging;
    // A second moderator at its chosen value, else its mean (numeric) or reference level (categorical).
    if (!spec.second_moderator.empty())
        req.values[spec.second_moderator] =
            std::isnan(spec.second_value) ? typical_values(d).at(spec.second_moderator) : spec.second_value;
    if (!std::isnan(spec.focal_value) && averaging == Averaging::AtValues) req.values[spec.focal] = spec.focal_value;
    r.scale = ProbeScale::Outcome;
    r.averaging = averaging;
    std::vector<LevelEffect> level_effects;
    for (auto& e : r.effects) {
        LevelEffect g = probability_effect_gradient(d, fit, req, e.moderator_value);
        EffectPoint p = effect_point(e.moderator_value, infer(g.value, delta_se(g.gradient, fit.covariance), fit));
        p.level = e.level;
        p.beyond_data = e.beyond_data;
        e = p;
        g.level = e.level;
        level_effects.push_back(std::move(g));
    }
    if (r.categorical_moderator) r.slope_contrasts = slope_contrasts(level_effects, fit, spec.adjustment);
    r.simultaneous.reset();
    r.effect_function = EffectFunction();
    if (!r.categorical_moderator) {
        const double lo = r.observed_range.first, hi = r.observed_range.second, pad = 0.25 * (hi - lo);
        r.johnson_neyman = probability_regions(d, fit, req, fit.critical_value, lo - pad, hi + pad);
        r.jn_beyond_data.clear();
        for (double b : r.johnson_neyman->boundaries) r.jn_beyond_data.push_back(b < lo || b > hi);
        r.interaction_effect = probability_interaction(d, fit, req);
    }
    r.notes.push_back("effects on " + outcome_scale_words(fit, d.outcome) + ", " +
                      (averaging == Averaging::Sample ? "averaged over the observations"
                                                      : "at the covariates' means and reference levels") +
                      "; " +
                      (d.is_binary(spec.focal) ? "discrete change of " + spec.focal + " from 0 to 1"
                                               : "derivative with respect to " + spec.focal));
    r.notes.push_back("no simultaneous band on the " + outcome_scale_text(fit.family, fit.exposure) +
                      " scale (the effect is not linear in the coefficients)");
    r.notes.push_back("crossover points are where the " + model_scale_text(fit.family, !fit.exposure.empty()) +
                      " lines cross, which is where the " + outcome_scale_text(fit.family, fit.exposure) +
                      " curves cross");
    refresh_cautions(r, fit);
    return r;
}

}  // namespace moderato
