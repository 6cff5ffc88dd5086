// Power and sample size for detecting a set of u tested terms (typically the
// interaction terms) in a linear model with k predictors in total (excluding
// the intercept), by the F test of the R² change.
//
//   effect size  f² = (R²_full − R²_reduced) / (1 − R²_full)   (Cohen's f²)
//   test         F with df1 = u, df2 = v = n − k − 1
//   alternative  noncentral F(u, v, λ); power = P(F' > F_crit(1 − alpha; u, v))
//
// The noncentrality λ has two conventions in use, and the result names the
// one it used:
//   cohen  λ = f²·(u + v + 1) = f²·(n − k + u)   (Cohen 1988, ch. 9, the
//          default: the one behind the published n tables);
//   n      λ = f²·n                            (the noncentrality of the test
//          when f² describes the population and the sample's predictor
//          covariance matches it; slightly larger than Cohen's when u < k,
//          so it asks for slightly fewer observations. Both agree when every
//          predictor is tested, u = k, because then u + v + 1 = n.)
// All distributions come from Boost.Math. Bad input throws moderato::InputError
// naming the quantity at fault.
#pragma once

#include <string>

namespace moderato {

enum class Noncentrality { cohen, n };

// "cohen" or "n" (the JSON/CLI spelling), and the formula in words.
std::string noncentrality_name(Noncentrality c);
std::string noncentrality_formula(Noncentrality c);
// Parses "cohen" or "n"; InputError otherwise (the message names `option`).
Noncentrality parse_noncentrality(const std::string& text, const std::string& option);

struct PowerDesign {
    long long tested_terms = 1;      // u ≥ 1
    long long total_predictors = 1;  // k ≥ u, excluding the intercept
    double alpha = 0.05;             // 0 < alpha < 1
    Noncentrality convention = Noncentrality::cohen;
};

struct PowerResult {
    double f2 = 0;
    long long n = 0;
    long long tested_terms = 0;      // u
    long long total_predictors = 0;  // k
    double alpha = 0;
    Noncentrality convention = Noncentrality::cohen;
    double df1 = 0;            // u
    double df2 = 0;            // n − k − 1
    double noncentrality = 0;  // λ
    double critical_f = 0;     // upper-alpha point of F(df1, df2)
    double power = 0;          // P(F' > critical_f)
};

// Power of the F test for the tested terms at effect size f2 and sample size n.
// Requires f2 > 0 (finite), u ≥ 1, k ≥ u, n ≥ k + 2, 0 < alpha < 1.
PowerResult power_of_test(double f2, long long n, const PowerDesign& design);

// The noncentrality λ for f2 and n under the design's convention (validated).
double noncentrality_for(double f2, long long n, const PowerDesign& design);

struct SampleSizeResult {
    double target_power = 0;
    PowerResult at_n;            // the smallest n whose power ≥ target
    double power_one_fewer = 0;  // power at n − 1 (NaN when n − 1 < k + 2)
};

// The smallest n (≥ k + 2) with power ≥ target_power: power rises with n, so
// the search brackets by doubling and then bisects on whole numbers. Throws
// InputError when more than max_n observations would be needed.
SampleSizeResult smallest_n_for_power(double f2, double target_power, const PowerDesign& design,
                                      long long max_n = 1'000'000'000LL);

struct DetectableResult {
    double target_power = 0;
    PowerResult at_f2;  // at_f2.f2 is the smallest detectable f²
};

// The f² at which the test has exactly target_power with n observations
// (bracketing root finder, TOMS 748). Requires alpha < target_power < 1:
// power tends to alpha as f² → 0.
DetectableResult smallest_detectable_f2(long long n, double target_power, const PowerDesign& design);

// Cohen's f² from the R² of the full model and of the reduced model without
// the tested terms: (R²_full − R²_reduced) / (1 − R²_full).
// Requires 0 ≤ R²_reduced ≤ R²_full < 1. May return 0.
double f2_from_r2(double r2_full, double r2_reduced);

// f² = R²_partial / (1 − R²_partial) and back, R²_partial = f² / (1 + f²),
// where R²_partial is the share of the variance left by the reduced model
// that the tested terms explain.
double f2_from_partial_r2(double partial_r2);  // 0 ≤ partial_r2 < 1
double partial_r2_from_f2(double f2);          // f2 ≥ 0, finite

}  // namespace moderato
