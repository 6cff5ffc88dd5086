#include "estimation/overdispersion.hpp"

#include <cmath>
#include <numbers>

#include "moderato/support/report_text.hpp"

namespace moderato::detail {

Overdispersion overdispersion(const Design& d, const FitResult& f) {
    Overdispersion o;
    const Eigen::Index n = d.y.size();
    long double chi2 = 0, sxz = 0, sxx = 0;
    for (Eigen::Index i = 0; i < n; ++i) {
        const double w = d.weights.size() ? d.weights[i] : 1.0, mu = f.fitted[i], e = d.y[i] - mu;
        chi2 += w * e * e / mu;
        const double z = (e * e - d.y[i]) / mu;  // the auxiliary regression: z on mu, no intercept
        sxz += w * mu * z;
        sxx += w * mu * mu;
    }
    o.pearson_chi2 = static_cast<double>(chi2);
    o.df = f.df_residual;
    o.pearson_ratio = o.pearson_chi2 / o.df;
    o.alpha_estimate = static_cast<double>(sxz / sxx);
    long double rss = 0;
    for (Eigen::Index i = 0; i < n; ++i) {
        const double w = d.weights.size() ? d.weights[i] : 1.0, mu = f.fitted[i], e = d.y[i] - mu;
        const double r = (e * e - d.y[i]) / mu - o.alpha_estimate * mu;
        rss += w * r * r;
    }
    const double se = std::sqrt(static_cast<double>(rss) / (static_cast<double>(n) - 1) / static_cast<double>(sxx));
    o.test_value = o.alpha_estimate / se;
    o.p_value = 0.5 * std::erfc(o.test_value / std::numbers::sqrt2);  // the upper tail, without cancellation
    return o;
}

void add_dispersion_warnings(FitResult& f) {
    if (f.overdispersion && f.overdispersion->evident()) {
        const Overdispersion& o = *f.overdispersion;
        std::string advice = f.se == SeKind::Classical
                                 ? "its model-based standard errors are then too small and its tests too eager"
                                 : "the robust standard errors allow for it, but the expected counts' spread is wrong";
        f.warnings.push_back(
            "the counts vary more than a Poisson model allows (Pearson χ² / df = " + format_sig(o.pearson_ratio) +
            "; Cameron & Trivedi test z = " + format_sig(o.test_value) + ", " + p_clause(o.p_value) + "): " + advice +
            "; fit the negative binomial family instead");
    }
    if (f.dispersion && f.dispersion->alpha < 1e-6)
        f.warnings.push_back("the negative binomial's alpha is at its lower limit (" + format_sig(f.dispersion->alpha) +
                             "): the counts show no overdispersion, and the Poisson model says the same more simply");
}

}  // namespace moderato::detail
