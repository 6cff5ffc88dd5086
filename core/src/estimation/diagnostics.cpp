#include "moderato/estimation/diagnostics.hpp"

#include "estimation/glm_family.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

#include "moderato/estimation/distributions.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Leverage at or above this counts as 1 (the row alone fixes a coefficient).
constexpr double kLeverageOne = 1.0 - 1e-10;

// y log(y / mu) with 0 log 0 = 0.
double ylogy(double y, double mu) { return y > 0 ? y * std::log(y / mu) : 0.0; }

std::string number(double v) { return format_sig(v); }

}  // namespace

namespace {

double weight(const Design& design, Eigen::Index i) { return design.weights.size() > 0 ? design.weights[i] : 1.0; }

// The estimable columns of the design (aliased ones add nothing to the column
// space); their indices go into `kept`.
Eigen::MatrixXd estimable_columns(const Design& design, const FitResult& fit, std::vector<int>& kept) {
    for (Eigen::Index j = 0; j < design.X.cols(); ++j)
        if (!std::isnan(fit.beta[j])) kept.push_back(static_cast<int>(j));
    Eigen::MatrixXd XK(design.X.rows(), static_cast<Eigen::Index>(kept.size()));
    for (std::size_t c = 0; c < kept.size(); ++c) XK.col(static_cast<Eigen::Index>(c)) = design.X.col(kept[c]);
    return XK;
}

// The variance function V(mu) and the working weight (dmu/deta)^2 / V(mu)
// of a generalized family at the mean mu (alpha: the negative binomial's).
std::pair<double, double> variance_and_weight(Family f, double mu, double alpha) {
    switch (f) {
        case Family::Logistic:
            return {mu * (1 - mu), mu * (1 - mu)};
        case Family::Probit: {
            const double phi = detail::normal_density(dist::normal_quantile(mu)), var = mu * (1 - mu);
            return {var, phi * phi / var};
        }
        case Family::Poisson:
            return {mu, mu};
        case Family::NegativeBinomial:
            return {mu + alpha * mu * mu, mu / (1 + alpha * mu)};
        case Family::Linear:
            break;
    }
    return {1, 1};
}

// Working weights v_i (returned) and Pearson residuals (into d).
Eigen::VectorXd working_weights(const Design& design, const FitResult& fit, Diagnostics& d) {
    const Eigen::Index n = design.X.rows();
    const bool glm = generalized(fit.family);
    const double alpha = fit.dispersion ? fit.dispersion->alpha : 0.0;
    Eigen::VectorXd v(n);
    d.pearson.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double w = weight(design, i);
        if (glm) {
            const auto [var, working] = variance_and_weight(fit.family, fit.fitted[i], alpha);
            v[i] = w * working;
            d.pearson[i] = std::sqrt(w) * (design.y[i] - fit.fitted[i]) / std::sqrt(var);
        } else {
            v[i] = w;
            d.pearson[i] = std::sqrt(w) * fit.residuals[i];
        }
    }
    return v;
}

// Leverage from the QR factor of V^{1/2} X_K: (X_K' V X_K)^{-1} = A A', so
// h_i = v_i |x_i' A|^2, without forming X'VX. Sets d.p (the rank).
void leverages(const Eigen::MatrixXd& XK, const Eigen::VectorXd& v, Diagnostics& d) {
    const Eigen::Index n = XK.rows();
    const LeastSquaresResult ls = least_squares(XK, Eigen::VectorXd::Zero(n), v);
    const Eigen::Index k = static_cast<Eigen::Index>(ls.kept.size());
    d.p = static_cast<int>(k);
    if (k < XK.cols())
        d.notes.push_back("the working weights of the fit leave only " + std::to_string(k) + " of " +
                          std::to_string(XK.cols()) + " estimable columns; leverages use those");
    Eigen::MatrixXd XKk(n, k);
    for (Eigen::Index c = 0; c < k; ++c) XKk.col(c) = XK.col(ls.kept[static_cast<std::size_t>(c)]);
    const Eigen::MatrixXd B = XKk * ls.inverse_factor;
    d.leverage.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) d.leverage[i] = std::min(1.0, v[i] * B.row(i).squaredNorm());
}

// The scale phi, the standardised Pearson residuals and Cook's distances.
void standardised_residuals(Diagnostics& d) {
    const Eigen::Index n = d.pearson.size();
    const double pd = static_cast<double>(d.p);
    const double df = static_cast<double>(n) - pd;
    if (generalized(d.family)) {
        d.scale = 1.0;
    } else {
        long double ss = 0;
        for (Eigen::Index i = 0; i < n; ++i) ss += static_cast<long double>(d.pearson[i]) * d.pearson[i];
        d.scale = df > 0 ? static_cast<double>(ss / df) : kNaN;
    }
    d.standardised.resize(n);
    d.cooks_distance.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double h = d.leverage[i];
        if (h >= kLeverageOne) {
            d.standardised[i] = kNaN;
            d.cooks_distance[i] = kNaN;
            continue;
        }
        d.standardised[i] = d.pearson[i] / std::sqrt(d.scale * (1 - h));
        d.cooks_distance[i] = d.standardised[i] * d.standardised[i] * h / (pd * (1 - h));
    }
}

// A row's unit deviance: twice its log-likelihood ratio against the
// saturated model (the negative binomial's at the fitted alpha).
double unit_deviance(const FitResult& fit, double y, double mu) {
    if (binary_outcome(fit.family)) return 2.0 * (ylogy(y, mu) + ylogy(1 - y, 1 - mu));
    if (fit.family == Family::Poisson) return 2.0 * (ylogy(y, mu) - (y - mu));
    const double r = 1 / fit.dispersion->alpha;
    return 2.0 * (ylogy(y, mu) - (y + r) * std::log((y + r) / (mu + r)));
}

// Generalized families: deviance residuals and their standardised form.
void deviance_residuals(const Design& design, const FitResult& fit, Diagnostics& d) {
    const Eigen::Index n = design.X.rows();
    d.deviance.resize(n);
    d.standardised_deviance.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double y = design.y[i], mu = fit.fitted[i];
        const double unit = unit_deviance(fit, y, mu);
        const double sign = y > mu ? 1.0 : (y < mu ? -1.0 : 0.0);
        d.deviance[i] = sign * std::sqrt(weight(design, i) * std::max(0.0, unit));
        const double h = d.leverage[i];
        d.standardised_deviance[i] = h >= kLeverageOne ? kNaN : d.deviance[i] / std::sqrt(1 - h);
    }
}

// Linear: externally studentised residuals. s_(i)^2 = (RSS - w_i e_i^2 /
// (1 - h_i)) / (n - p - 1): the residual variance without row i (the
// deletion identity).
void studentised_residuals(Diagnostics& d) {
    const Eigen::Index n = d.pearson.size();
    const double df = static_cast<double>(n) - static_cast<double>(d.p);
    const double rss = d.scale * df;
    d.studentised.resize(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double h = d.leverage[i];
        if (h >= kLeverageOne || df - 1 <= 0) {
            d.studentised[i] = kNaN;
            continue;
        }
        const double e2 = d.pearson[i] * d.pearson[i];
        const double s2 = std::max(0.0, (rss - e2 / (1 - h)) / (df - 1));
        d.studentised[i] = d.pearson[i] / std::sqrt(s2 * (1 - h));
    }
}

// What each residual is called, and the rules with their thresholds.
void names_and_rules(const DiagnosticRules& rules, Diagnostics& d) {
    const bool logistic = generalized(d.family);
    d.fitted_name = binary_outcome(d.family)  ? "fitted probability"
                    : count_outcome(d.family) ? "fitted expected count"
                                              : "fitted value";
    d.plot_residual_name = logistic ? "Pearson residual" : (d.weighted ? "weighted residual √w·e" : "residual");
    d.check_residual_name = logistic ? "standardised Pearson residual" : "externally studentised residual";
    d.quantile_residual_name = logistic ? "standardised deviance residual" : "externally studentised residual";

    const double nd = static_cast<double>(d.n), pd = static_cast<double>(d.p);
    d.residual_threshold = rules.residual_limit;
    d.leverage_threshold = rules.leverage_multiple * pd / nd;
    d.cooks_threshold = rules.cooks_numerator / nd;
    d.residual_rule = "|" + d.check_residual_name + "| > " + number(rules.residual_limit);
    d.leverage_rule = "leverage > " + number(rules.leverage_multiple) + "p/n = " + number(d.leverage_threshold);
    d.cooks_rule = "Cook's distance > " + number(rules.cooks_numerator) + "/n = " + number(d.cooks_threshold);
}

// A multilevel fit: conditional residuals over the residual SD; no leverage
// or Cook's distance (NaN), so the residual rule alone flags rows.
void multilevel_residuals(const FitResult& fit, Diagnostics& d) {
    const Eigen::Index n = fit.residuals.size();
    d.multilevel = true;
    d.p = fit.rank;
    d.scale = fit.multilevel->residual_variance;
    d.pearson = fit.residuals;
    d.standardised = fit.residuals / std::sqrt(d.scale);
    d.studentised = d.standardised;
    d.leverage = Eigen::VectorXd::Constant(n, kNaN);
    d.cooks_distance = Eigen::VectorXd::Constant(n, kNaN);
}

void multilevel_names(Diagnostics& d) {
    d.fitted_name = "fitted value with group effects";
    d.plot_residual_name = "conditional residual";
    d.check_residual_name = "standardised conditional residual";
    d.quantile_residual_name = d.check_residual_name;
    d.leverage_threshold = d.cooks_threshold = kNaN;
    d.residual_rule = "|" + d.check_residual_name + "| > " + number(d.rules.residual_limit);
    d.leverage_rule.clear();
    d.cooks_rule.clear();
}

// The rows meeting any rule, most influential first (multilevel: largest |residual| first).
void flag_rows(const Design& design, Diagnostics& d) {
    for (std::size_t i = 0; i < d.n; ++i) {
        const unsigned flags = diagnostic_flags(d, i);
        if (flags) d.flagged.push_back({i, design.rows.empty() ? i : design.rows[i], flags});
    }
    auto key = [&](const FlaggedRow& r) {
        const auto i = static_cast<Eigen::Index>(r.observation);
        if (d.multilevel) return std::fabs(d.check_residual()[i]);
        const double c = d.cooks_distance[i];
        return std::isnan(c) ? std::numeric_limits<double>::infinity() : c;
    };
    std::stable_sort(d.flagged.begin(), d.flagged.end(),
                     [&](const FlaggedRow& a, const FlaggedRow& b) { return key(a) > key(b); });
    if (!d.flagged.empty() && d.flagged.size() > d.n / 10)
        d.notes.push_back(
            "more than a tenth of the rows meet a rule: with many rows the rules of thumb flag many "
            "ordinary rows; look at the most influential first");
}

}  // namespace

Diagnostics diagnostics(const Design& design, const FitResult& fit, const DiagnosticRules& rules) {
    const Eigen::Index n = design.X.rows();
    const Eigen::Index pcols = design.X.cols();
    if (fit.beta.size() != pcols || fit.fitted.size() != n || fit.residuals.size() != n)
        throw InputError("diagnostics: the fit does not belong to this design (" + std::to_string(n) + " rows, " +
                         std::to_string(pcols) + " columns)");
    Diagnostics d;
    d.family = fit.family;
    d.weighted = design.weights.size() > 0;
    d.n = static_cast<std::size_t>(n);
    d.rules = rules;
    d.fitted = fit.fitted;
    d.residuals = fit.residuals;

    if (fit.multilevel) {
        multilevel_residuals(fit, d);
        names_and_rules(rules, d);
        multilevel_names(d);
        flag_rows(design, d);
        return d;
    }
    std::vector<int> kept;
    const Eigen::MatrixXd XK = estimable_columns(design, fit, kept);
    const Eigen::VectorXd v = working_weights(design, fit, d);
    leverages(XK, v, d);
    standardised_residuals(d);
    if (generalized(fit.family)) deviance_residuals(design, fit, d);
    else studentised_residuals(d);
    names_and_rules(rules, d);
    flag_rows(design, d);
    return d;
}

unsigned diagnostic_flags(const Diagnostics& d, std::size_t observation) {
    const Eigen::Index i = static_cast<Eigen::Index>(observation);
    unsigned flags = 0;
    const double r = d.check_residual()[i];
    if (std::abs(r) > d.residual_threshold) flags |= FlagResidual;
    if (d.leverage[i] > d.leverage_threshold) flags |= FlagLeverage;
    const double c = d.cooks_distance[i];
    if (c > d.cooks_threshold || (std::isnan(c) && d.leverage[i] >= kLeverageOne)) flags |= FlagCooks;
    return flags;
}

double cooks_contour(double cooks, int p, double leverage) {
    if (!(leverage > 0 && leverage < 1)) return kNaN;
    return std::sqrt(cooks * p * (1 - leverage) / leverage);
}

double blom_position(std::size_t i, std::size_t n) {
    return (static_cast<double>(i) - 0.375) / (static_cast<double>(n) + 0.25);
}

QuantilePlot normal_quantile_plot(const Eigen::VectorXd& values) {
    QuantilePlot q;
    for (Eigen::Index i = 0; i < values.size(); ++i)
        if (!std::isnan(values[i])) q.order.push_back(static_cast<std::size_t>(i));
    std::stable_sort(q.order.begin(), q.order.end(), [&](std::size_t a, std::size_t b) {
        return values[static_cast<Eigen::Index>(a)] < values[static_cast<Eigen::Index>(b)];
    });
    const std::size_t m = q.order.size();
    q.observed.resize(m);
    q.theoretical.resize(m);
    for (std::size_t i = 0; i < m; ++i) {
        q.observed[i] = values[static_cast<Eigen::Index>(q.order[i])];
        q.theoretical[i] = dist::normal_quantile(blom_position(i + 1, m));
    }
    return q;
}

BinnedResiduals binned_residuals(const Eigen::VectorXd& fitted, const Eigen::VectorXd& residual, int bins,
                                 double level) {
    BinnedResiduals b;
    b.level = level;
    std::vector<std::size_t> idx;
    for (Eigen::Index i = 0; i < std::min(fitted.size(), residual.size()); ++i)
        if (!std::isnan(fitted[i]) && !std::isnan(residual[i])) idx.push_back(static_cast<std::size_t>(i));
    std::stable_sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t c) {
        return fitted[static_cast<Eigen::Index>(a)] < fitted[static_cast<Eigen::Index>(c)];
    });
    const std::size_t m = idx.size();
    const std::size_t k = std::min<std::size_t>(static_cast<std::size_t>(std::max(bins, 0)), m);
    for (std::size_t g = 0; g < k; ++g) {
        // Bin g holds sorted positions [g m / k, (g + 1) m / k).
        const std::size_t lo = g * m / k, hi = (g + 1) * m / k;
        long double sf = 0, sr = 0;
        for (std::size_t t = lo; t < hi; ++t) {
            sf += fitted[static_cast<Eigen::Index>(idx[t])];
            sr += residual[static_cast<Eigen::Index>(idx[t])];
        }
        const auto c = static_cast<long double>(hi - lo);
        const double mean = static_cast<double>(sr / c);
        b.fitted_mean.push_back(static_cast<double>(sf / c));
        b.residual_mean.push_back(mean);
        b.count.push_back(hi - lo);
        // The interval of the bin's mean: its standard deviation (two passes).
        double half = kNaN;
        if (hi - lo > 1) {
            long double ss = 0;
            for (std::size_t t = lo; t < hi; ++t) {
                const long double e = residual[static_cast<Eigen::Index>(idx[t])] - mean;
                ss += e * e;
            }
            const double df = static_cast<double>(c) - 1.0;
            const double sd = std::sqrt(static_cast<double>(ss) / df);
            half = dist::t_quantile(1.0 - (1.0 - level) / 2.0, df) * sd / std::sqrt(static_cast<double>(c));
        }
        b.residual_lower.push_back(mean - half);
        b.residual_upper.push_back(mean + half);
    }
    return b;
}

}  // namespace moderato
