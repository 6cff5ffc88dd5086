// Probing: conditional effects, Johnson–Neyman regions, the simultaneous band
// and the crossover point. Expected values come from exact algebra (closed
// form) or from a brute-force scan of the t statistic; data are seeded random.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <random>

#include "common/table_builder.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

Table simulate(std::size_t n, unsigned seed, double b_int, double noise = 1.0) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> N(0, 1);
    std::vector<double> y, x, z, g;
    for (std::size_t i = 0; i < n; ++i) {
        const double xi = 2 + N(rng), zi = 5 + 2 * N(rng), gi = i % 2;
        x.push_back(xi);
        z.push_back(zi);
        g.push_back(gi);
        y.push_back(1 + 0.4 * xi + 0.3 * zi + b_int * xi * zi - 1.1 * gi + 0.5 * xi * gi + noise * N(rng));
    }
    return make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("z", z), numeric_column("g", g)});
}

// Brute-force: the sign changes of |t(m)| - q over a fine grid.
std::vector<double> scan_boundaries(const EffectFunction& f, double q, double lo, double hi) {
    std::vector<double> out;
    const int N = 200000;
    auto h = [&](double m) { return std::abs(f.effect(m)) / std::sqrt(f.variance(m)) - q; };
    double prev = h(lo), pm = lo;
    for (int i = 1; i <= N; ++i) {
        const double m = lo + (hi - lo) * i / N;
        const double cur = h(m);
        if ((prev > 0) != (cur > 0)) {
            double a = pm, b = m;  // bisection to full precision
            for (int k = 0; k < 200; ++k) {
                const double c = 0.5 * (a + b);
                if ((h(c) > 0) == (h(a) > 0)) a = c;
                else b = c;
            }
            out.push_back(0.5 * (a + b));
        }
        prev = cur;
        pm = m;
    }
    return out;
}

void expect_boundaries_match_scan(const EffectFunction& f, double q, double lo, double hi, std::size_t count,
                                  const std::string& expected_kind) {
    const auto sig = significance_regions(f, q);
    EXPECT_EQ(kind_text(sig), expected_kind);
    const auto scan = scan_boundaries(f, q, lo, hi);
    ASSERT_EQ(sig.boundaries.size(), count) << kind_text(sig);
    ASSERT_EQ(scan.size(), count);
    for (std::size_t i = 0; i < count; ++i)
        EXPECT_LE(std::abs(sig.boundaries[i] - scan[i]), 1e-9 * std::max(1.0, std::abs(scan[i]))) << i;
    // every region is significant inside and not just outside its ends
    for (const auto& r : sig.significant) {
        const double mid =
            std::isinf(r.lo) ? (std::isinf(r.hi) ? 0 : r.hi - 1) : (std::isinf(r.hi) ? r.lo + 1 : 0.5 * (r.lo + r.hi));
        EXPECT_GT(std::abs(f.effect(mid)) / std::sqrt(f.variance(mid)), q);
    }
}

// An effect a0 + a1 m with a chosen covariance of (a0, a1): every root case.
ProbeSpec spec_of(const char* focal, const char* moderator) {
    ProbeSpec s;
    s.focal = focal;
    s.moderator = moderator;
    return s;
}

EffectFunction linear_effect(double a0, double a1, double v00, double v01, double v11) {
    Eigen::VectorXd b(2);
    b << a0, a1;
    Eigen::MatrixXd V(2, 2);
    V << v00, v01, v01, v11;
    Eigen::VectorXd g0 = Eigen::VectorXd::Zero(2), g1 = Eigen::VectorXd::Zero(2);
    g0[0] = 1;
    g1[1] = 1;
    return EffectFunction({g0, g1}, b, V);
}

}  // namespace

TEST(Probe, EffectAtModeratorZeroIsTheFocalCoefficient) {
    const Table t = simulate(500, 1, 0.2);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    ProbeSpec ps;
    ps.focal = "x";
    ps.moderator = "z";
    ps.at = {0.0, 1.0};
    const ProbeResult r = probe(d, f, ps);
    const auto& bx = f.coefficients[static_cast<std::size_t>(f.index_of("x"))];
    const auto& bxz = f.coefficients[static_cast<std::size_t>(f.index_of("x×z"))];
    // closed form: effect(0) = b_x with the SE of b_x; effect(1) = b_x + b_xz
    EXPECT_NEAR(r.effects[0].estimate, bx.estimate, 1e-14 * std::abs(bx.estimate) + 1e-15);
    EXPECT_NEAR(r.effects[0].std_error, bx.std_error, 1e-12 * bx.std_error);
    EXPECT_NEAR(r.effects[1].estimate, bx.estimate + bxz.estimate, 1e-12);
}

TEST(Probe, JohnsonNeymanEveryRootCaseMatchesBruteForceScan) {
    const double q = 1.96;
    // Two roots, significant outside: slope clearly significant.
    expect_boundaries_match_scan(linear_effect(0.5, 1.0, 0.04, 0.001, 0.01), q, -50, 50, 2,
                                 "significant outside the two boundaries");
    // Two roots, significant between: imprecise slope, precise effect near m = 0.
    expect_boundaries_match_scan(linear_effect(1.0, 0.05, 0.04, 0.0, 0.02), q, -50, 50, 2,
                                 "significant between the two boundaries");
    // No real root, significant everywhere: with a slope a1 != 0 the effect is
    // zero somewhere, so this needs an exactly flat effect known without error
    // in its slope (a1 = 0, v11 = 0).
    expect_boundaries_match_scan(linear_effect(2.0, 0.0, 0.04, 0.0, 0.0), q, -50, 50, 0, "significant everywhere");
    // No real root, significant nowhere.
    expect_boundaries_match_scan(linear_effect(0.1, 0.01, 0.04, 0.0, 0.01), q, -50, 50, 0, "significant nowhere");
    // Degenerate: a1^2 = q^2 v11 exactly, one boundary.
    expect_boundaries_match_scan(linear_effect(0.3, 0.196, 0.04, 0.0, 0.01), q, -50, 50, 1,
                                 "one boundary (degenerate case)");
}

TEST(Probe, JohnsonNeymanOnFittedDataAndSimultaneousBandIsWider) {
    const Table t = simulate(400, 2, 0.08, 2.0);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z"}};
    s.se = SeKind::HC3;
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    ProbeSpec ps = spec_of("x", "z");
    const ProbeResult r = probe(d, f, ps);
    ASSERT_TRUE(r.johnson_neyman.has_value());
    const auto scan = scan_boundaries(r.effect_function, f.critical_value, -100, 100);
    ASSERT_EQ(scan.size(), r.johnson_neyman->boundaries.size());
    for (std::size_t i = 0; i < scan.size(); ++i)
        EXPECT_LE(std::abs(r.johnson_neyman->boundaries[i] - scan[i]), 1e-9 * std::max(1.0, std::abs(scan[i])));
    // Potthoff: critical value sqrt(2 F(2, df)) exceeds the pointwise t quantile.
    const double band_q = std::sqrt(2 * dist::f_quantile(0.95, 2, f.df_inference));
    EXPECT_NEAR(r.simultaneous->critical_value, band_q, 1e-12);
    EXPECT_GT(band_q, f.critical_value);
    EXPECT_EQ(r.observed_range.first, d.summaries.at("z").min);
}

TEST(Probe, LinesMeetAtMinusB2OverB3AndFiellerMatchesTheGapTest) {
    const Table t = simulate(600, 3, 0.0);
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"z"};
    s.interactions = {{"x", "g"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    const ProbeResult r = probe(d, f, spec_of("x", "g"));
    ASSERT_EQ(r.crossovers.size(), 1u);
    const auto& c = r.crossovers[0];
    const double b2 = f.beta[f.index_of("g")], b3 = f.beta[f.index_of("x×g")];
    EXPECT_NEAR(c.focal_value, -b2 / b3, 1e-12 * std::abs(b2 / b3));  // closed form
    EXPECT_EQ(c.groups, "g=0 vs g=1");
    // Fieller interval = where the group gap b2 + b3 x is not significant.
    const int i2 = f.index_of("g"), i3 = f.index_of("x×g");
    auto gap_t = [&](double x) {
        const double e = f.beta[i2] + x * f.beta[i3];
        const double v = f.covariance(i2, i2) + 2 * x * f.covariance(i2, i3) + x * x * f.covariance(i3, i3);
        return std::abs(e) / std::sqrt(v);
    };
    ASSERT_EQ(c.ci_kind, FiellerInterval::Bounded);
    EXPECT_NEAR(gap_t(c.ci_lower), f.critical_value, 1e-9);
    EXPECT_NEAR(gap_t(c.ci_upper), f.critical_value, 1e-9);
    EXPECT_LT(gap_t(0.5 * (c.ci_lower + c.ci_upper)), f.critical_value);
    EXPECT_EQ(c.within_observed_range, c.focal_value >= r.focal_range.first && c.focal_value <= r.focal_range.second);
}

TEST(Probe, CategoricalModeratorGivesOneEffectPerLevel) {
    std::mt19937_64 rng(4);
    std::normal_distribution<double> N(0, 1);
    std::vector<double> y, x;
    std::vector<std::string> shift;
    const char* names[] = {"day", "evening", "night"};
    const double slope[] = {-0.3, -0.6, -1.1};
    for (int i = 0; i < 300; ++i) {
        const int k = i % 3;
        const double xi = 3 + 10 * (N(rng) * 0.2 + 0.5);
        x.push_back(xi);
        shift.push_back(names[k]);
        y.push_back(10 + k + slope[k] * xi + N(rng));
    }
    const Table t = make_table({numeric_column("y", y), numeric_column("x", x), categorical_column("shift", shift)});
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "shift"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    const ProbeResult r = probe(d, f, spec_of("x", "shift"));
    ASSERT_EQ(r.effects.size(), 3u);
    EXPECT_EQ(r.effects[1].level, "evening");
    // closed form: the slope within a level is b_x + b_(x×level)
    EXPECT_NEAR(r.effects[0].estimate, f.beta[f.index_of("x")], 1e-12);
    EXPECT_NEAR(r.effects[2].estimate, f.beta[f.index_of("x")] + f.beta[f.index_of("x×shift=night")], 1e-12);
    EXPECT_EQ(r.crossovers.size(), 3u);  // every pair of levels
}

// A 0/1 moderator has two effects and no region of significance; a
// continuous one has both regions.
TEST(Probe, BinaryModeratorIsSaidByAFieldNotOnlyByANote) {
    const Table t = simulate(300, 8, 0.1);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "g"}, {"x", "z"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    const ProbeResult binary = probe(d, f, spec_of("x", "g"));
    EXPECT_TRUE(binary.binary_moderator);
    EXPECT_FALSE(binary.categorical_moderator);
    EXPECT_FALSE(binary.johnson_neyman.has_value());
    EXPECT_FALSE(binary.simultaneous.has_value());
    ASSERT_EQ(binary.effects.size(), 2u);
    EXPECT_EQ(binary.effects[0].moderator_value, 0.0);
    EXPECT_EQ(binary.effects[1].moderator_value, 1.0);
    const ProbeResult continuous = probe(d, f, spec_of("x", "z"));
    EXPECT_FALSE(continuous.binary_moderator);
    EXPECT_TRUE(continuous.johnson_neyman.has_value());
    EXPECT_TRUE(continuous.simultaneous.has_value());
}

TEST(Probe, BadRequestsAreExplained) {
    const Table t = simulate(100, 5, 0.1);
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"g"};
    s.interactions = {{"x", "z"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    try {
        probe(d, f, spec_of("x", "g"));
        FAIL();
    } catch (const InputError& e) {
        EXPECT_STREQ(e.what(),
                     "focal predictor 'x' and moderator 'g' share no product term, so the effect of 'x' does not "
                     "depend on 'g'; add --interaction x,g");
    }
    EXPECT_THROW(probe(d, f, spec_of("x", "w")), InputError);
}

// Closed form: with x, x^2 and x×z, the effect of x at x0 and z is
// b_x + 2 b_xx x0 + b_xz z.
TEST(Probe, SquaredFocalIsEvaluatedAtTheChosenFocalValue) {
    const Table t = simulate(400, 6, 0.1);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z"}};
    s.polynomial["x"] = 2;
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    ProbeSpec ps = spec_of("x", "z");
    ps.focal_value = 1.5;
    ps.at = {4.0};
    const ProbeResult r = probe(d, f, ps);
    const double expected =
        f.beta[f.index_of("x")] + 2 * f.beta[f.index_of("x^2")] * 1.5 + f.beta[f.index_of("x×z")] * 4.0;
    EXPECT_NEAR(r.effects[0].estimate, expected, 1e-12);
}

// Common practice: a reader must be told where every other column that
// changes the effect is held (here g, whose mean is exactly 0.5 by design,
// written at four significant digits as every number is: 0.5000).
TEST(Probe, NotesSayWhereOtherModeratorsAreHeld) {
    const Table t = simulate(100, 7, 0.1);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z", "g"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    const ProbeResult r = probe(d, f, spec_of("x", "z"));
    EXPECT_NE(
        std::find(r.notes.begin(), r.notes.end(), "g also changes the effect of x; it is held at its mean 0.5000"),
        r.notes.end());
}

namespace {

// The p-th quantile of ascending values by linear interpolation between order
// statistics (numpy.percentile's default, Hyndman & Fan definition 7),
// written out here rather than taken from the code under test.
double percentile_h7(std::vector<double> v, double p) {
    std::sort(v.begin(), v.end());
    const double h = (static_cast<double>(v.size()) - 1) * p;
    const auto lo = static_cast<std::size_t>(std::floor(h));
    const std::size_t hi = std::min(lo + 1, v.size() - 1);
    return v[lo] + (h - std::floor(h)) * (v[hi] - v[lo]);
}

// x, and a moderator z = exp(N(1, 0.8)) (log-normal: skewness well above 1).
Table skewed(std::size_t n, unsigned seed) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> N(0, 1);
    std::vector<double> y, x, z;
    for (std::size_t i = 0; i < n; ++i) {
        const double xi = N(rng), zi = std::exp(1 + 0.8 * N(rng));
        x.push_back(xi);
        z.push_back(zi);
        y.push_back(1 + 0.5 * xi + 0.2 * zi + 0.1 * xi * zi + N(rng));
    }
    return make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("z", z)});
}

}  // namespace

TEST(Probe, ASkewedModeratorIsProbedAtItsPercentilesAndSaysSo) {
    const Table t = skewed(400, 21);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    const ProbeResult r = probe(d, f, spec_of("x", "z"));
    const std::vector<double>& z = t.at("z").numbers;
    // Moment skewness m3 / m2^(3/2) (scipy.stats.skew with bias=True), summed here.
    double mean = 0;
    for (double v : z) mean += v;
    mean /= static_cast<double>(z.size());
    double m2 = 0, m3 = 0;
    for (double v : z) m2 += (v - mean) * (v - mean), m3 += (v - mean) * (v - mean) * (v - mean);
    m2 /= static_cast<double>(z.size());
    m3 /= static_cast<double>(z.size());
    EXPECT_NEAR(r.moderator_skew, m3 / std::pow(m2, 1.5), 1e-10);
    ASSERT_GT(r.moderator_skew, 1.0);  // log-normal with sigma 0.8: skewness about 3.7 (from memory)
    EXPECT_EQ(r.points, ProbePoints::Percentiles);
    ASSERT_EQ(r.effects.size(), 3u);
    EXPECT_NEAR(r.effects[0].moderator_value, percentile_h7(z, 0.10), 1e-12);
    EXPECT_NEAR(r.effects[1].moderator_value, percentile_h7(z, 0.50), 1e-12);
    EXPECT_NEAR(r.effects[2].moderator_value, percentile_h7(z, 0.90), 1e-12);
    bool said = false;
    for (const auto& n : r.notes) said |= n.find("10th, 50th and 90th percentiles") != std::string::npos;
    EXPECT_TRUE(said);

    // A symmetric moderator keeps mean and ± 1 SD.
    const Table sym = simulate(300, 3, 0.2);
    const Design ds = build_design(sym, s);
    const ProbeResult rs = probe(ds, fit_design(ds, s), spec_of("x", "z"));
    EXPECT_EQ(rs.points, ProbePoints::MeanSd);
    EXPECT_NEAR(rs.effects[1].moderator_value, rs.moderator_mean, 1e-12);
}

TEST(Probe, PinsJoinTheDefaultsInOrderOfValue) {
    const Table t = simulate(300, 5, 0.2);
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    ProbeSpec ps = spec_of("x", "z");
    const ProbeResult plain = probe(d, f, ps);
    ASSERT_EQ(plain.effects.size(), 3u);
    const double mean = plain.moderator_mean, sd = plain.moderator_sd;
    ps.pinned = {mean + 2 * sd, mean - 0.5 * sd, mean};  // the mean is a default already
    const ProbeResult r = probe(d, f, ps);
    ASSERT_EQ(r.effects.size(), 5u);
    const double expected[] = {mean - sd, mean - 0.5 * sd, mean, mean + sd, mean + 2 * sd};
    for (std::size_t k = 0; k < 5; ++k) EXPECT_NEAR(r.effects[k].moderator_value, expected[k], 1e-12) << k;
    EXPECT_EQ(r.points, ProbePoints::MeanSd);
    // Chosen values replace the defaults and ignore pins.
    ps.at = {1.0};
    EXPECT_EQ(probe(d, f, ps).effects.size(), 1u);
}
