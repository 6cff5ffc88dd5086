#include "moderato/probing/power.hpp"

#include <boost/math/distributions/fisher_f.hpp>
#include <boost/math/distributions/non_central_f.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <limits>
#include <string>

#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "support/text_util.hpp"

namespace moderato {
namespace bm = boost::math;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// Boost's noncentral beta series starts at the Poisson mode λ/2, an int: keep
// well below INT_MAX (such designs have power very close to 1).
constexpr double kMaxLambda = 1e9;

void check_f2(double f2) {
    if (std::isnan(f2) || !(f2 > 0) || std::isinf(f2))
        throw InputError("f2 (the effect size) must be a finite number greater than 0, got " + exact_text(f2));
}

void check_power_target(double p) {
    if (std::isnan(p) || !(p > 0 && p < 1))
        throw InputError("the target power must be between 0 and 1 (exclusive), got " + exact_text(p));
}

void check_design(const PowerDesign& d) {
    if (std::isnan(d.alpha) || !(d.alpha > 0 && d.alpha < 1))
        throw InputError("alpha (the significance level) must be between 0 and 1 (exclusive), got " +
                         exact_text(d.alpha));
    if (d.tested_terms < 1)
        throw InputError("the number of tested terms must be at least 1, got " + std::to_string(d.tested_terms));
    if (d.total_predictors < d.tested_terms)
        throw InputError("the total number of predictors (" + std::to_string(d.total_predictors) +
                         ") must be at least the number of tested terms (" + std::to_string(d.tested_terms) +
                         "): the tested terms are counted among the predictors");
}

void check_n(long long n, const PowerDesign& d) {
    const long long least = d.total_predictors + 2;
    if (n < least)
        throw InputError("n = " + std::to_string(n) + " is too small: with " + std::to_string(d.total_predictors) +
                         " predictor" + (d.total_predictors == 1 ? "" : "s") +
                         " and an intercept the test needs n greater than k + 1, so n must be at least " +
                         std::to_string(least));
}

double lambda_of(double f2, long long n, const PowerDesign& d) {
    const double v = static_cast<double>(n - d.total_predictors - 1);
    const double u = static_cast<double>(d.tested_terms);
    return d.convention == Noncentrality::cohen ? f2 * (u + v + 1.0) : f2 * static_cast<double>(n);
}

// Power without validation; f2 ≥ 0 (f2 = 0 gives alpha exactly).
PowerResult compute(double f2, long long n, const PowerDesign& d) {
    PowerResult r;
    r.f2 = f2;
    r.n = n;
    r.tested_terms = d.tested_terms;
    r.total_predictors = d.total_predictors;
    r.alpha = d.alpha;
    r.convention = d.convention;
    r.df1 = static_cast<double>(d.tested_terms);
    r.df2 = static_cast<double>(n - d.total_predictors - 1);
    r.noncentrality = lambda_of(f2, n, d);
    if (r.noncentrality > kMaxLambda)
        throw InputError("the noncentrality (" + noncentrality_formula(d.convention) + " = " +
                         exact_text(r.noncentrality) +
                         ") is above 1e9, beyond what the power can be computed for; such a design has power "
                         "very close to 1; use a smaller f2 or n");
    r.critical_f = bm::quantile(bm::complement(bm::fisher_f_distribution<double>(r.df1, r.df2), d.alpha));
    if (r.noncentrality == 0) {
        r.power = d.alpha;
    } else {
        const bm::non_central_f_distribution<double> alt(r.df1, r.df2, r.noncentrality);
        r.power = bm::cdf(bm::complement(alt, r.critical_f));
    }
    return r;
}

}  // namespace

std::string noncentrality_name(Noncentrality c) { return c == Noncentrality::cohen ? "cohen" : "n"; }

std::string noncentrality_formula(Noncentrality c) {
    return c == Noncentrality::cohen ? "f2 * (df1 + df2 + 1)" : "f2 * n";
}

Noncentrality parse_noncentrality(const std::string& text, const std::string& option) {
    if (text == "cohen") return Noncentrality::cohen;
    if (text == "n") return Noncentrality::n;
    throw InputError("option --" + option +
                     " must be cohen (lambda = f2 * (df1 + df2 + 1)) or n (lambda = f2 * n), got '" + text + "'");
}

double noncentrality_for(double f2, long long n, const PowerDesign& design) {
    check_design(design);
    check_f2(f2);
    check_n(n, design);
    return lambda_of(f2, n, design);
}

PowerResult power_of_test(double f2, long long n, const PowerDesign& design) {
    check_design(design);
    check_f2(f2);
    check_n(n, design);
    return compute(f2, n, design);
}

SampleSizeResult smallest_n_for_power(double f2, double target_power, const PowerDesign& design, long long max_n) {
    check_design(design);
    check_f2(f2);
    check_power_target(target_power);
    const long long least = design.total_predictors + 2;
    if (max_n < least) max_n = least;

    SampleSizeResult out;
    out.target_power = target_power;
    const auto reaches = [&](long long n) { return compute(f2, n, design).power >= target_power; };

    long long lo = least - 1;  // the largest n known to fall short (least − 1: not a valid n)
    long long hi = least;
    if (!reaches(hi)) {
        // Bracket: double the distance from the smallest valid n.
        long long step = 1;
        lo = hi;
        for (;;) {
            if (hi >= max_n)
                throw InputError("f2 = " + exact_text(f2) + " is too small to reach power " + exact_text(target_power) +
                                 " with at most " + std::to_string(max_n) +
                                 " observations; plan for a larger effect or a lower power");
            step = step > max_n / 2 ? max_n : step * 2;
            const long long next = (hi > max_n - step) ? max_n : hi + step;
            if (reaches(next)) {
                lo = hi;
                hi = next;
                break;
            }
            hi = next;
        }
        // Bisect: power(lo) < target ≤ power(hi).
        while (hi - lo > 1) {
            const long long mid = lo + (hi - lo) / 2;
            if (reaches(mid)) hi = mid;
            else lo = mid;
        }
    }
    out.at_n = compute(f2, hi, design);
    out.power_one_fewer = hi - 1 >= least ? compute(f2, hi - 1, design).power : kNaN;
    return out;
}

DetectableResult smallest_detectable_f2(long long n, double target_power, const PowerDesign& design) {
    check_design(design);
    check_power_target(target_power);
    check_n(n, design);
    if (!(target_power > design.alpha))
        throw InputError("the target power (" + exact_text(target_power) + ") must be greater than alpha (" +
                         exact_text(design.alpha) +
                         "): the test rejects with probability alpha even when there is no effect");

    const auto gap = [&](double f2) { return compute(f2, n, design).power - target_power; };
    double a = 0, fa = design.alpha - target_power;  // f2 = 0: power is alpha exactly
    double b = 0.01, fb = gap(b);
    while (fb < 0) {
        a = b;
        fa = fb;
        b *= 4;
        if (b > 1e15)
            throw InputError("no effect size f2 up to 1e15 reaches power " + exact_text(target_power) +
                             " with n = " + std::to_string(n) + "; lower the target power or raise n");
        fb = gap(b);
    }
    std::uintmax_t iterations = 200;
    const auto root = bm::tools::toms748_solve(gap, a, b, fa, fb, bm::tools::eps_tolerance<double>(50), iterations);
    const double f2 = 0.5 * (root.first + root.second);

    DetectableResult out;
    out.target_power = target_power;
    out.at_f2 = compute(f2, n, design);
    return out;
}

double f2_from_r2(double r2_full, double r2_reduced) {
    if (std::isnan(r2_full) || !(r2_full >= 0 && r2_full < 1))
        throw InputError("the full model's R² must be at least 0 and below 1, got " + exact_text(r2_full));
    if (std::isnan(r2_reduced) || !(r2_reduced >= 0 && r2_reduced < 1))
        throw InputError("the reduced model's R² must be at least 0 and below 1, got " + exact_text(r2_reduced));
    if (r2_reduced > r2_full)
        throw InputError(
            "the reduced model's R² (" + exact_text(r2_reduced) + ") exceeds the full model's R² (" +
            exact_text(r2_full) +
            "): the full model contains the reduced one plus the tested terms, so its R² is at least as large");
    return (r2_full - r2_reduced) / (1.0 - r2_full);
}

double f2_from_partial_r2(double partial_r2) {
    if (std::isnan(partial_r2) || !(partial_r2 >= 0 && partial_r2 < 1))
        throw InputError("the partial R² must be at least 0 and below 1, got " + exact_text(partial_r2));
    return partial_r2 / (1.0 - partial_r2);
}

double partial_r2_from_f2(double f2) {
    if (std::isnan(f2) || !(f2 >= 0) || std::isinf(f2))
        throw InputError("f2 (the effect size) must be a finite number of at least 0, got " + exact_text(f2));
    return f2 / (1.0 + f2);
}

}  // namespace moderato
