// Reference distributions (Boost.Math). A degrees-of-freedom value of
// +infinity means the normal (z) or chi-square limit.
#pragma once

namespace moderato::dist {

double normal_quantile(double p);
double normal_cdf(double x);
double t_quantile(double p, double df);               // df = inf: normal
double f_quantile(double p, double df1, double df2);  // df2 = inf: chi2(df1)/df1
double chi2_quantile(double p, double df);

double two_sided_p_t(double statistic, double df);  // df = inf: normal
double upper_p_f(double statistic, double df1, double df2);
double upper_p_chi2(double statistic, double df);

}  // namespace moderato::dist
