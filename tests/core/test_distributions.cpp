// Quantiles and tail probabilities against printed handbook tables. The
// tables give 3-5 significant digits, so tolerances are half a unit in the
// last printed digit. Values recalled rather than looked up say "from memory".
#include <gtest/gtest.h>

#include <cmath>
#include <limits>

#include "moderato/estimation/distributions.hpp"

using namespace moderato::dist;

namespace {
constexpr double kInf = std::numeric_limits<double>::infinity();
}

// Standard normal: z_{0.975} = 1.959964, z_{0.995} = 2.575829, z_{0.95} = 1.644854
// (Abramowitz & Stegun 1964, Table 26.5 "percentage points of the normal
// distribution"; the digits from memory).
TEST(Distributions, NormalQuantilesMatchHandbook) {
    EXPECT_NEAR(normal_quantile(0.975), 1.959964, 5e-7);
    EXPECT_NEAR(normal_quantile(0.995), 2.575829, 5e-7);
    EXPECT_NEAR(normal_quantile(0.95), 1.644854, 5e-7);
    EXPECT_NEAR(normal_quantile(0.5), 0.0, 1e-15);  // symmetry: common practice
    EXPECT_NEAR(two_sided_p_t(1.959964, kInf), 0.05, 1e-6);
}

// Student t upper percentage points, two-sided 5 % and 1 % (Abramowitz & Stegun
// 1964, Table 26.10; also any statistics text's t table; from memory).
TEST(Distributions, StudentTQuantilesMatchHandbook) {
    struct Row {
        double df, q975, q995;
    };
    const Row rows[] = {{1, 12.706, 63.657}, {2, 4.303, 9.925},  {5, 2.571, 4.032},  {10, 2.228, 3.169},
                        {20, 2.086, 2.845},  {30, 2.042, 2.750}, {60, 2.000, 2.660}, {120, 1.980, 2.617}};
    for (const auto& r : rows) {
        EXPECT_NEAR(t_quantile(0.975, r.df), r.q975, 5e-4) << "df " << r.df;
        EXPECT_NEAR(t_quantile(0.995, r.df), r.q995, 5e-4) << "df " << r.df;
        EXPECT_NEAR(two_sided_p_t(r.q975, r.df), 0.05, 2e-4) << "df " << r.df;
    }
    EXPECT_DOUBLE_EQ(t_quantile(0.975, kInf), normal_quantile(0.975));  // limit: common practice
}

// Chi-square upper 5 % and 1 % points (Abramowitz & Stegun 1964, Table 26.8;
// from memory).
TEST(Distributions, ChiSquareQuantilesMatchHandbook) {
    struct Row {
        double df, q95, q99;
    };
    const Row rows[] = {{1, 3.841, 6.635},   {2, 5.991, 9.210},    {3, 7.815, 11.345},
                        {5, 11.070, 15.086}, {10, 18.307, 23.209}, {30, 43.773, 50.892}};
    for (const auto& r : rows) {
        EXPECT_NEAR(chi2_quantile(0.95, r.df), r.q95, 5e-4) << "df " << r.df;
        EXPECT_NEAR(chi2_quantile(0.99, r.df), r.q99, 5e-4) << "df " << r.df;
        EXPECT_NEAR(upper_p_chi2(r.q95, r.df), 0.05, 2e-5) << "df " << r.df;
    }
}

// F upper 5 % and 1 % points (Abramowitz & Stegun 1964, Table 26.9; the usual
// F tables; from memory).
TEST(Distributions, FQuantilesMatchHandbook) {
    struct Row {
        double df1, df2, q95, q99;
    };
    const Row rows[] = {{1, 10, 4.96, 10.04}, {2, 10, 4.10, 7.56}, {3, 20, 3.10, 4.94},
                        {5, 10, 3.33, 5.64},  {4, 30, 2.69, 4.02}, {1, 120, 3.92, 6.85}};
    for (const auto& r : rows) {
        EXPECT_NEAR(f_quantile(0.95, r.df1, r.df2), r.q95, 5e-3) << r.df1 << "," << r.df2;
        EXPECT_NEAR(f_quantile(0.99, r.df1, r.df2), r.q99, 5e-3) << r.df1 << "," << r.df2;
        EXPECT_NEAR(upper_p_f(r.q95, r.df1, r.df2), 0.05, 5e-4) << r.df1 << "," << r.df2;
    }
    // F(1, v) is the square of t(v): closed form.
    EXPECT_NEAR(f_quantile(0.95, 1, 10), std::pow(t_quantile(0.975, 10), 2), 1e-10);
    // F(q, inf) is chi-square(q) / q: closed form.
    EXPECT_NEAR(f_quantile(0.95, 3, kInf), chi2_quantile(0.95, 3) / 3, 1e-12);
}

TEST(Distributions, InvalidArgumentsGiveNaNNotExceptions) {
    EXPECT_TRUE(std::isnan(t_quantile(1.5, 10)));
    EXPECT_TRUE(std::isnan(t_quantile(0.5, 0)));
    EXPECT_TRUE(std::isnan(upper_p_f(2.0, 0, 10)));
    EXPECT_EQ(upper_p_chi2(0.0, 3), 1.0);  // common practice: no evidence at 0
}
