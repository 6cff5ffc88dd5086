// Power planning for the F test of u tested terms among k predictors
// (core/src/power.cpp), checked against
//   * Cohen's published sample sizes for multiple regression (alpha .05,
//     power .80, f² = .02/.15/.35), recalled from memory;
//   * Cohen's λ table in the v = ∞ column (u = 1, 2), recalled from memory,
//     and the same limit from Boost's noncentral chi-square (closed form);
//   * scipy 1.10 (scipy.stats.ncf / f / optimize.brentq, each power also
//     recomputed in 40-digit mpmath by the script) in
//     tests/reference/fixtures/power_reference.json (or the build's live run),
//     written by tests/reference/make_power_reference.py, at 1e-8 relative;
//   * closed-form properties: power → alpha as f² → 0, monotone in n and f²,
//     round trips of the searches, and for u = 1 the equality with the
//     two-sided noncentral t test.
#include <gtest/gtest.h>

#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/non_central_t.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <functional>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "common/input_error.hpp"
#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"
#include "moderato/probing/power.hpp"
#include "moderato/support/error.hpp"

namespace {

using moderato::InputError;
using moderato::Noncentrality;
using moderato::PowerDesign;
using moderato::test::input_error_of;
using moderato::test::rel;
using nlohmann::json;

PowerDesign design(long long u, long long k, double alpha = 0.05, Noncentrality c = Noncentrality::cohen) {
    PowerDesign d;
    d.tested_terms = u;
    d.total_predictors = k;
    d.alpha = alpha;
    d.convention = c;
    return d;
}

// The scipy fixture (tests/reference/make_power_reference.py): the build's live run, else the committed copy.
json load_reference() {
    return moderato::test::read_fixture_json(moderato::test::reference_fixture("power_reference.json"));
}

Noncentrality convention_of(const json& c) {
    return moderato::parse_noncentrality(c.at("convention").get<std::string>(), "noncentrality");
}

}  // namespace

// ---------------------------------------------------------------------------
// Published sample sizes.

// Total n for alpha = .05, power = .80 when all k = u predictors are tested
// (Cohen's Case 1; here both λ conventions coincide since u + v + 1 = n).
//   u = 1: 395 / 55 / 25 for f² = .02 / .15 / .35 — from memory (the values
//          usually quoted for one predictor; Cohen 1988, ch. 9).
//   u = 2: 481 / 67 / 30 and u = 3: 547 / 76 / 34 — Cohen (1992), "A power
//          primer", Psychological Bulletin 112, Table 2 ("multiple R", 2 and 3
//          independent variables), which summarises Cohen (1988) ch. 9; from
//          memory.
// Cohen obtained n as λ/f² with λ read from his Table 9.4.2 and interpolated
// between the printed v columns (20, 60, 120, ∞), so his n can sit a few units
// below the exact noncentral-F answer; and these are recalled, not looked up.
// Tolerance: max(2, 1 % of n). The exact answers are checked against scipy
// below (ReferenceSampleSizes).
TEST(Power, SampleSizesMatchCohenTables) {
    struct Row {
        long long u;
        double f2;
        long long n;
    };
    const Row rows[] = {
        {1, 0.02, 395}, {1, 0.15, 55}, {1, 0.35, 25},  // from memory
        {2, 0.02, 481}, {2, 0.15, 67}, {2, 0.35, 30},  // Cohen 1992, Table 2; from memory
        {3, 0.02, 547}, {3, 0.15, 76}, {3, 0.35, 34},  // Cohen 1992, Table 2; from memory
    };
    for (const auto& r : rows) {
        for (auto c : {Noncentrality::cohen, Noncentrality::n}) {
            const auto s = moderato::smallest_n_for_power(r.f2, 0.80, design(r.u, r.u, 0.05, c));
            const double tol = std::max(2.0, 0.01 * static_cast<double>(r.n));
            EXPECT_LE(std::fabs(static_cast<double>(s.at_n.n - r.n)), tol)
                << "u = " << r.u << ", f2 = " << r.f2 << ": n = " << s.at_n.n << ", table " << r.n;
        }
    }
}

// λ needed for power .80 at alpha .05 when v = ∞. With v = ∞, uF' is a
// noncentral chi-square, so λ solves P(χ'²(u, λ) > χ²_{.95}(u)) = .80; checked
// with Boost's noncentral chi-square (closed form; 1e-4 covers v = 10^8).
// For u = 1 this is also (z_{.975} + z_{.80})² = (1.959964 + 0.841621)² =
// 7.8489 up to the far tail P(Z < −4.8) (closed form; normal quantiles from
// Abramowitz & Stegun Table 26.5, from memory). Cohen (1988) Table 9.4.2,
// v = ∞ column: 7.85 (u = 1) and 9.64 (u = 2), from memory, printed to 2
// decimals (tolerance 0.006). (The u = 3 entry is not used: recalled as
// 10.91, but the chi-square limit is 10.903, so the recollection is doubtful.)
TEST(Power, LargeSampleLambdaMatchesCohenAndChiSquareLimit) {
    namespace bm = boost::math;
    const double table[] = {7.85, 9.64};  // Cohen 1988, Table 9.4.2, v = ∞; from memory
    for (long long u = 1; u <= 3; ++u) {
        const long long n = 100'000'000;
        const auto d = moderato::smallest_detectable_f2(n, 0.80, design(u, u));
        const double lambda = d.at_f2.noncentrality;
        if (u <= 2) {
            EXPECT_NEAR(lambda, table[u - 1], 0.006) << "u = " << u;
        }
        if (u == 1) {
            EXPECT_NEAR(lambda, std::pow(1.959964 + 0.841621, 2), 1e-4);  // closed form
        }

        const double crit = bm::quantile(bm::complement(bm::chi_squared_distribution<double>(u), 0.05));
        const double chi_power =
            bm::cdf(bm::complement(bm::non_central_chi_squared_distribution<double>(u, lambda), crit));
        EXPECT_NEAR(chi_power, 0.80, 1e-4) << "u = " << u;
    }
}

// ---------------------------------------------------------------------------
// scipy reference (tests/reference/fixtures/power_reference.json).

TEST(Power, ReferencePowerMatchesScipy) {
    const json ref = load_reference();
    ASSERT_TRUE(ref.contains("power_cases"));
    ASSERT_GE(ref.at("power_cases").size(), 10u);
    for (const auto& c : ref.at("power_cases")) {
        const auto d = design(c.at("tested_terms").get<long long>(), c.at("total_predictors").get<long long>(),
                              c.at("alpha").get<double>(), convention_of(c));
        const auto r = moderato::power_of_test(c.at("f2").get<double>(), c.at("n").get<long long>(), d);
        const std::string where = c.dump();
        EXPECT_EQ(r.df1, c.at("df1").get<double>()) << where;  // scipy reference (exact)
        EXPECT_EQ(r.df2, c.at("df2").get<double>()) << where;  // scipy reference (exact)
        EXPECT_LE(rel(r.noncentrality, c.at("noncentrality").get<double>()), 1e-12) << where;  // scipy reference
        EXPECT_LE(rel(r.critical_f, c.at("critical_f").get<double>()), 1e-8) << where;         // scipy f.isf
        EXPECT_LE(rel(r.power, c.at("power").get<double>()), 1e-8) << where;                   // scipy ncf.sf
        EXPECT_LE(rel(r.power, c.at("power_mpmath").get<double>()), 1e-8) << where;            // mpmath, 40 digits
    }
}

TEST(Power, ReferenceSampleSizes) {
    const json ref = load_reference();
    ASSERT_TRUE(ref.contains("sample_size_cases"));
    ASSERT_GE(ref.at("sample_size_cases").size(), 9u);
    for (const auto& c : ref.at("sample_size_cases")) {
        const auto d = design(c.at("tested_terms").get<long long>(), c.at("total_predictors").get<long long>(),
                              c.at("alpha").get<double>(), convention_of(c));
        const auto s = moderato::smallest_n_for_power(c.at("f2").get<double>(), c.at("target_power").get<double>(), d);
        const std::string where = c.dump();
        EXPECT_EQ(s.at_n.n, c.at("n").get<long long>()) << where;                       // scan of scipy ncf.sf
        EXPECT_LE(rel(s.at_n.power, c.at("power_at_n").get<double>()), 1e-8) << where;  // scipy ncf.sf
        if (c.at("power_one_fewer").is_null()) {
            EXPECT_TRUE(std::isnan(s.power_one_fewer)) << where;
        } else {
            EXPECT_LE(rel(s.power_one_fewer, c.at("power_one_fewer").get<double>()), 1e-8) << where;  // scipy ncf.sf
        }
    }
}

TEST(Power, ReferenceDetectableEffectSizes) {
    const json ref = load_reference();
    ASSERT_TRUE(ref.contains("detectable_cases"));
    ASSERT_GE(ref.at("detectable_cases").size(), 5u);
    for (const auto& c : ref.at("detectable_cases")) {
        const auto d = design(c.at("tested_terms").get<long long>(), c.at("total_predictors").get<long long>(),
                              c.at("alpha").get<double>(), convention_of(c));
        const auto r =
            moderato::smallest_detectable_f2(c.at("n").get<long long>(), c.at("target_power").get<double>(), d);
        EXPECT_LE(rel(r.at_f2.f2, c.at("f2").get<double>()), 1e-8) << c.dump();  // scipy brentq on ncf.sf
    }
}

// ---------------------------------------------------------------------------
// Closed-form properties.

// With no effect the statistic is central F, so power → alpha (closed form).
TEST(Power, TendsToAlphaAsEffectVanishes) {
    for (double alpha : {0.01, 0.05, 0.10}) {
        for (auto c : {Noncentrality::cohen, Noncentrality::n}) {
            const auto r = moderato::power_of_test(1e-12, 100, design(2, 4, alpha, c));
            EXPECT_NEAR(r.power, alpha, 1e-9) << "alpha " << alpha;  // closed form: λ → 0
            EXPECT_GE(r.power, alpha * (1 - 1e-12));
        }
    }
}

// Power rises strictly with n (λ and df2 both grow) and with f² (closed form:
// the noncentral F is stochastically increasing in λ; the critical value falls
// as df2 grows).
TEST(Power, IncreasesWithSampleSizeAndEffectSize) {
    for (auto c : {Noncentrality::cohen, Noncentrality::n}) {
        const auto d = design(2, 5, 0.05, c);
        double previous = 0;
        for (long long n = 7; n <= 400; ++n) {
            const double p = moderato::power_of_test(0.05, n, d).power;
            EXPECT_GT(p, previous) << "n " << n;
            previous = p;
        }
        previous = 0;
        for (double f2 = 0.001; f2 < 3; f2 *= 1.25) {
            const double p = moderato::power_of_test(f2, 60, d).power;
            EXPECT_GT(p, previous) << "f2 " << f2;
            previous = p;
        }
        EXPECT_GT(previous, 0.999);  // f² ≈ 3 at n = 60: power near 1 (closed form: λ ≈ 170)
    }
}

// smallest_n_for_power(power_of_test(n)) returns n: power at n reaches the
// target exactly and at n − 1 falls short (closed form: monotone in n).
TEST(Power, SampleSizeRoundTrip) {
    for (auto c : {Noncentrality::cohen, Noncentrality::n}) {
        for (long long u : {1, 3}) {
            for (long long k : {u, u + 4}) {
                for (double f2 : {0.01, 0.08, 0.4}) {
                    for (long long n : {k + 2, k + 9, 48LL, 333LL, 2500LL}) {
                        if (n < k + 2) continue;
                        const auto d = design(u, k, 0.05, c);
                        const double p = moderato::power_of_test(f2, n, d).power;
                        if (!(p < 1.0)) continue;  // a target of 1 is outside (0, 1)
                        const auto s = moderato::smallest_n_for_power(f2, p, d);
                        EXPECT_EQ(s.at_n.n, n) << "u " << u << " k " << k << " f2 " << f2;
                        EXPECT_EQ(s.at_n.power, p);
                        if (n > k + 2) {
                            EXPECT_LT(s.power_one_fewer, p);
                        } else {
                            EXPECT_TRUE(std::isnan(s.power_one_fewer));
                        }
                    }
                }
            }
        }
    }
}

// The detectable f² at the n found for (f², target) gives the target power
// exactly, is at most the planned f², and at n − 1 it exceeds the planned f²
// (closed form: power is monotone in f² and n).
TEST(Power, DetectableEffectGivesTargetPower) {
    for (auto c : {Noncentrality::cohen, Noncentrality::n}) {
        for (double target : {0.5, 0.8, 0.95}) {
            for (double f2 : {0.02, 0.15, 0.35}) {
                const auto d = design(2, 6, 0.05, c);
                const auto s = moderato::smallest_n_for_power(f2, target, d);
                const auto at_n = moderato::smallest_detectable_f2(s.at_n.n, target, d);
                EXPECT_NEAR(at_n.at_f2.power, target, 1e-12);
                EXPECT_LE(at_n.at_f2.f2, f2 * (1 + 1e-12));
                const auto fewer = moderato::smallest_detectable_f2(s.at_n.n - 1, target, d);
                EXPECT_GT(fewer.at_f2.f2, f2);
            }
        }
    }
}

// For u = 1 the F statistic is the square of a t statistic with v df, so
// P(F'(1, v, λ) > F_crit) = P(|T'| > t_crit), T' noncentral t with δ = √λ,
// t_crit the two-sided critical t (closed form), computed here with Boost's
// noncentral t.
TEST(Power, SingleTermEqualsTwoSidedNoncentralT) {
    namespace bm = boost::math;
    for (double alpha : {0.01, 0.05, 0.2}) {
        for (long long n : {5LL, 30LL, 200LL, 3000LL}) {
            for (double f2 : {0.005, 0.05, 0.3}) {
                const auto r = moderato::power_of_test(f2, n, design(1, 3, alpha));
                const double v = static_cast<double>(n - 4);
                const double t_crit = bm::quantile(bm::complement(bm::students_t_distribution<double>(v), alpha / 2));
                const bm::non_central_t_distribution<double> t(v, std::sqrt(r.noncentrality));
                const double p_t = bm::cdf(bm::complement(t, t_crit)) + bm::cdf(t, -t_crit);
                EXPECT_LE(rel(r.power, p_t), 1e-9) << "alpha " << alpha << " n " << n << " f2 " << f2;
            }
        }
    }
}

// λ = f²(u + v + 1) (Cohen) and λ = f²·n; they agree when u = k; with u < k the
// n convention gives more power and asks for fewer observations (closed form).
TEST(Power, NoncentralityConventions) {
    EXPECT_DOUBLE_EQ(moderato::noncentrality_for(0.1, 50, design(1, 4)), 0.1 * (1 + 45 + 1));  // closed form
    EXPECT_DOUBLE_EQ(moderato::noncentrality_for(0.1, 50, design(1, 4, 0.05, Noncentrality::n)), 0.1 * 50);
    EXPECT_DOUBLE_EQ(moderato::noncentrality_for(0.1, 50, design(3, 3)),
                     moderato::noncentrality_for(0.1, 50, design(3, 3, 0.05, Noncentrality::n)));

    const auto cohen = moderato::power_of_test(0.05, 120, design(1, 5));
    const auto by_n = moderato::power_of_test(0.05, 120, design(1, 5, 0.05, Noncentrality::n));
    EXPECT_GT(by_n.power, cohen.power);
    EXPECT_EQ(cohen.convention, Noncentrality::cohen);
    EXPECT_EQ(by_n.convention, Noncentrality::n);
    EXPECT_LE(moderato::smallest_n_for_power(0.05, 0.8, design(1, 5, 0.05, Noncentrality::n)).at_n.n,
              moderato::smallest_n_for_power(0.05, 0.8, design(1, 5)).at_n.n);

    EXPECT_EQ(moderato::noncentrality_name(Noncentrality::cohen), "cohen");
    EXPECT_EQ(moderato::noncentrality_name(Noncentrality::n), "n");
    EXPECT_EQ(moderato::noncentrality_formula(Noncentrality::cohen), "f2 * (df1 + df2 + 1)");
    EXPECT_EQ(moderato::noncentrality_formula(Noncentrality::n), "f2 * n");
}

// f² = (R²_full − R²_reduced)/(1 − R²_full); partial R² = f²/(1 + f²) (closed form).
TEST(Power, EffectSizeConversions) {
    EXPECT_NEAR(moderato::f2_from_r2(0.30, 0.25), 0.05 / 0.70, 1e-15);  // closed form
    EXPECT_EQ(moderato::f2_from_r2(0.4, 0.4), 0.0);                     // closed form
    EXPECT_NEAR(moderato::f2_from_r2(0.5, 0.0), 1.0, 1e-15);            // closed form
    // Cohen's conventional f² = .02, .15, .35 are R² = .0196, .1304, .2593 for
    // a set tested alone (Cohen 1988, ch. 9; from memory; also closed form).
    EXPECT_NEAR(moderato::partial_r2_from_f2(0.02), 0.0196, 5e-5);
    EXPECT_NEAR(moderato::partial_r2_from_f2(0.15), 0.1304, 5e-5);
    EXPECT_NEAR(moderato::partial_r2_from_f2(0.35), 0.2593, 5e-5);
    for (double f2 : {0.0, 1e-6, 0.02, 0.15, 0.35, 4.0, 1e3}) {
        const double r2 = moderato::partial_r2_from_f2(f2);
        EXPECT_NEAR(r2, f2 / (1 + f2), 1e-15 * (1 + r2));  // closed form
        EXPECT_NEAR(moderato::f2_from_partial_r2(r2), f2, 1e-12 * (1 + f2));
    }
    // f² from an R² pair equals f² from the partial R² of that pair:
    // partial R² = (R²_full − R²_reduced)/(1 − R²_reduced) (closed form).
    const double full = 0.42, reduced = 0.37;
    EXPECT_NEAR(moderato::f2_from_r2(full, reduced), moderato::f2_from_partial_r2((full - reduced) / (1 - reduced)),
                1e-14);
}

// ---------------------------------------------------------------------------
// Bad input: each message names the quantity and what is allowed.

TEST(Power, RejectsBadInputWithClearMessages) {
    using namespace moderato;
    EXPECT_EQ(input_error_of([] { power_of_test(0, 50, design(1, 3)); }),
              "f2 (the effect size) must be a finite number greater than 0, got 0");
    EXPECT_EQ(input_error_of([] { power_of_test(-0.1, 50, design(1, 3)); }),
              "f2 (the effect size) must be a finite number greater than 0, got -0.1");
    EXPECT_EQ(input_error_of([] { power_of_test(NAN, 50, design(1, 3)); }),
              "f2 (the effect size) must be a finite number greater than 0, got nan");
    EXPECT_EQ(input_error_of([] { power_of_test(0.1, 50, design(1, 3, 1.0)); }),
              "alpha (the significance level) must be between 0 and 1 (exclusive), got 1");
    EXPECT_EQ(input_error_of([] { power_of_test(0.1, 50, design(1, 3, 0.0)); }),
              "alpha (the significance level) must be between 0 and 1 (exclusive), got 0");
    EXPECT_EQ(input_error_of([] { power_of_test(0.1, 50, design(0, 3)); }),
              "the number of tested terms must be at least 1, got 0");
    EXPECT_EQ(input_error_of([] { power_of_test(0.1, 50, design(4, 3)); }),
              "the total number of predictors (3) must be at least the number of tested terms (4): the tested "
              "terms are counted among the predictors");
    EXPECT_EQ(input_error_of([] { power_of_test(0.1, 4, design(1, 3)); }),
              "n = 4 is too small: with 3 predictors and an intercept the test needs n greater than k + 1, so n "
              "must be at least 5");
    EXPECT_EQ(input_error_of([] { power_of_test(0.1, 2, design(1, 1)); }),
              "n = 2 is too small: with 1 predictor and an intercept the test needs n greater than k + 1, so n "
              "must be at least 3");
    EXPECT_EQ(input_error_of([] { smallest_n_for_power(0.1, 1.0, design(1, 3)); }),
              "the target power must be between 0 and 1 (exclusive), got 1");
    EXPECT_EQ(input_error_of([] { smallest_n_for_power(0.1, 0.0, design(1, 3)); }),
              "the target power must be between 0 and 1 (exclusive), got 0");
    EXPECT_EQ(input_error_of([] { smallest_n_for_power(1e-9, 0.8, design(1, 1)); }),
              "f2 = 1e-09 is too small to reach power 0.8 with at most 1000000000 observations; plan for a "
              "larger effect or a lower power");
    EXPECT_EQ(input_error_of([] { smallest_detectable_f2(100, 0.04, design(1, 3)); }),
              "the target power (0.04) must be greater than alpha (0.05): the test rejects with probability "
              "alpha even when there is no effect");
    EXPECT_EQ(input_error_of([] { power_of_test(100, 100'000'000, design(1, 1)); }),
              "the noncentrality (f2 * (df1 + df2 + 1) = 1e+10) is above 1e9, beyond what the power can be "
              "computed for; such a design has power very close to 1; use a smaller f2 or n");
    EXPECT_EQ(input_error_of([] { f2_from_r2(0.2, 0.3); }),
              "the reduced model's R² (0.3) exceeds the full model's R² (0.2): the full model contains the reduced "
              "one plus the tested terms, so its R² is at least as large");
    EXPECT_EQ(input_error_of([] { f2_from_r2(1.0, 0.3); }),
              "the full model's R² must be at least 0 and below 1, got 1");
    EXPECT_EQ(input_error_of([] { f2_from_r2(0.5, -0.1); }),
              "the reduced model's R² must be at least 0 and below 1, got -0.1");
    EXPECT_EQ(input_error_of([] { f2_from_partial_r2(1.0); }), "the partial R² must be at least 0 and below 1, got 1");
    EXPECT_EQ(input_error_of([] { partial_r2_from_f2(-1); }),
              "f2 (the effect size) must be a finite number of at least 0, got -1");
    EXPECT_EQ(input_error_of([] { parse_noncentrality("total", "noncentrality"); }),
              "option --noncentrality must be cohen (lambda = f2 * (df1 + df2 + 1)) or n (lambda = f2 * n), got "
              "'total'");
}

// A target at or below alpha is met by the smallest n already: any positive
// effect gives power above alpha (closed form).
TEST(Power, TargetBelowAlphaIsMetAtTheSmallestSample) {
    const auto s = moderato::smallest_n_for_power(0.01, 0.04, design(2, 5));
    EXPECT_EQ(s.at_n.n, 7);  // k + 2 (closed form)
    EXPECT_TRUE(std::isnan(s.power_one_fewer));
    EXPECT_GE(s.at_n.power, 0.04);
}
