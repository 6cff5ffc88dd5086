#include "moderato/estimation/distributions.hpp"

#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <limits>

namespace moderato::dist {
namespace bm = boost::math;

namespace {
bool unusable(double x) { return std::isnan(x); }
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}  // namespace

double normal_quantile(double p) {
    if (unusable(p) || p <= 0 || p >= 1) return kNaN;
    return bm::quantile(bm::normal_distribution<double>(), p);
}

double normal_cdf(double x) {
    if (unusable(x)) return kNaN;
    if (std::isinf(x)) return x > 0 ? 1.0 : 0.0;
    return bm::cdf(bm::normal_distribution<double>(), x);
}

double t_quantile(double p, double df) {
    if (unusable(p) || unusable(df) || p <= 0 || p >= 1 || df <= 0) return kNaN;
    if (std::isinf(df)) return normal_quantile(p);
    return bm::quantile(bm::students_t_distribution<double>(df), p);
}

double chi2_quantile(double p, double df) {
    if (unusable(p) || unusable(df) || p <= 0 || p >= 1 || df <= 0) return kNaN;
    return bm::quantile(bm::chi_squared_distribution<double>(df), p);
}

double f_quantile(double p, double df1, double df2) {
    if (unusable(p) || unusable(df1) || unusable(df2) || p <= 0 || p >= 1 || df1 <= 0 || df2 <= 0) return kNaN;
    if (std::isinf(df2)) return chi2_quantile(p, df1) / df1;
    return bm::quantile(bm::fisher_f_distribution<double>(df1, df2), p);
}

double two_sided_p_t(double statistic, double df) {
    if (unusable(statistic) || unusable(df) || df <= 0) return kNaN;
    const double a = std::fabs(statistic);
    if (std::isinf(a)) return 0.0;
    if (std::isinf(df)) return 2.0 * bm::cdf(bm::complement(bm::normal_distribution<double>(), a));
    return 2.0 * bm::cdf(bm::complement(bm::students_t_distribution<double>(df), a));
}

double upper_p_chi2(double statistic, double df) {
    if (unusable(statistic) || unusable(df) || df <= 0) return kNaN;
    if (statistic <= 0) return 1.0;
    if (std::isinf(statistic)) return 0.0;
    return bm::cdf(bm::complement(bm::chi_squared_distribution<double>(df), statistic));
}

double upper_p_f(double statistic, double df1, double df2) {
    if (unusable(statistic) || unusable(df1) || unusable(df2) || df1 <= 0 || df2 <= 0) return kNaN;
    if (statistic <= 0) return 1.0;
    if (std::isinf(statistic)) return 0.0;
    if (std::isinf(df2)) return upper_p_chi2(statistic * df1, df1);
    return bm::cdf(bm::complement(bm::fisher_f_distribution<double>(df1, df2), statistic));
}

}  // namespace moderato::dist
