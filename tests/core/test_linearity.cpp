// The binned and smooth estimates of the focal predictor's effect and the
// linearity test, against statsmodels 0.13 (tests/reference/
// make_linearity_reference.py: OLS/WLS/Logit wald_test of the same
// regressions, WLS and GLM Binomial at each kernel grid point); the bins'
// definition re-derived here; and bad input.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>
#include <random>

#include "common/input_error.hpp"
#include "common/reference_fixtures.hpp"
#include "common/table_builder.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/binned_effects.hpp"
#include "moderato/probing/common_support.hpp"
#include "moderato/probing/smooth_effects.hpp"

using namespace moderato;
using namespace moderato::test;
using nlohmann::json;

namespace {

struct Case {
    json j;
    ModelSpec spec;
    Design d;
    FitResult f;
};

Case load(const std::string& name, SeKind se) {
    const auto path = reference_fixture(name + ".json");
    Case c;
    c.j = read_fixture_json(path);
    auto fm = fixture_model(c.j, path, se);
    if (c.j.at("spec").at("weights").is_string()) fm.spec.weights = c.j["spec"]["weights"].get<std::string>();
    c.spec = fm.spec;
    c.d = build_design(fm.table, c.spec);
    c.f = fit_design(c.d, c.spec);
    return c;
}

const char* se_key(SeKind se) { return se == SeKind::Classical ? "classical" : se == SeKind::HC3 ? "hc3" : "cluster"; }

void compare_bins(const std::string& name, SeKind se, int k) {
    const Case c = load(name, se);
    const json& blk = c.j.at("bins").at(std::to_string(k));
    const json& ref = blk.at("by_se").at(se_key(se));
    const std::string focal = c.j["spec"]["focal"], moderator = c.j["spec"]["moderator"];
    const BinnedEffects b = binned_effects(c.d, c.f, c.spec, focal, moderator, k);
    ASSERT_EQ(b.bins.size(), static_cast<std::size_t>(k));
    for (int j = 0; j + 1 < k; ++j)  // numpy.quantile (linear), statsmodels fixture
        EXPECT_LE(rel(b.cuts[static_cast<std::size_t>(j)], blk["cuts"][j].get<double>()), 1e-14);
    for (int j = 0; j < k; ++j) {
        const auto& bin = b.bins[static_cast<std::size_t>(j)];
        SCOPED_TRACE(name + " bin " + std::to_string(j + 1) + " " + se_key(se));
        EXPECT_EQ(bin.rows, blk["rows"][j].get<std::size_t>());                       // numpy, fixture
        EXPECT_LE(rel(bin.moderator_value, blk["medians"][j].get<double>()), 1e-14);  // numpy.quantile 0.5
        EXPECT_LE(rel(bin.estimate, ref["effects"][j].get<double>()), 1e-8);          // statsmodels params
        EXPECT_LE(rel(bin.std_error, ref["std_errors"][j].get<double>()), 1e-8);      // statsmodels bse
    }
    const json& t = ref.at("linearity");  // statsmodels wald_test
    EXPECT_EQ(b.linearity.df1, t["df1"].get<double>());
    EXPECT_LE(rel(b.linearity.p_value, t["p_value"].get<double>()), 1e-7);
    if (t.contains("df2")) {  // F form
        EXPECT_LE(rel(b.linearity.statistic, t["statistic"].get<double>()), 1e-8);
        EXPECT_EQ(b.linearity.df2, t["df2"].get<double>());
    } else {  // chi-square
        EXPECT_LE(rel(b.linearity.chi_square, t["statistic"].get<double>()), 1e-8);
        EXPECT_TRUE(std::isinf(b.linearity.df2));
    }
}

void compare_kernel(const std::string& name) {
    const Case c = load(name, SeKind::Classical);
    const json& ref = c.j.at("kernel");
    SmoothOptions o;
    o.bandwidth = ref["bandwidth"].get<double>();
    o.replicates = 0;
    const SmoothEffects s = smooth_effects(c.d, c.f, c.j["spec"]["focal"], c.j["spec"]["moderator"], o);
    ASSERT_EQ(s.points.size(), ref["grid"].size());
    for (std::size_t g = 0; g < s.points.size(); ++g) {
        SCOPED_TRACE(name + " grid point " + std::to_string(g));
        EXPECT_LE(rel(s.points[g].moderator_value, ref["grid"][g].get<double>()), 1e-14);  // numpy.linspace
        EXPECT_LE(rel(s.points[g].effect, ref["effects"][g].get<double>()), 1e-8);         // statsmodels WLS/GLM
    }
    EXPECT_EQ(s.method, BandwidthMethod::Given);
}

}  // namespace

TEST(BinnedStatsmodels, OlsThreeBinsClassical) { compare_bins("linearity_ols", SeKind::Classical, 3); }
TEST(BinnedStatsmodels, OlsThreeBinsHc3) { compare_bins("linearity_ols", SeKind::HC3, 3); }
TEST(BinnedStatsmodels, OlsThreeBinsCluster) { compare_bins("linearity_ols", SeKind::Cluster, 3); }
TEST(BinnedStatsmodels, OlsFourBinsClassical) { compare_bins("linearity_ols", SeKind::Classical, 4); }
TEST(BinnedStatsmodels, OlsFourBinsCluster) { compare_bins("linearity_ols", SeKind::Cluster, 4); }
TEST(BinnedStatsmodels, WlsBinaryFocalClassical) { compare_bins("linearity_wls", SeKind::Classical, 3); }
TEST(BinnedStatsmodels, WlsBinaryFocalHc3) { compare_bins("linearity_wls", SeKind::HC3, 3); }
TEST(BinnedStatsmodels, LogitChiSquare) { compare_bins("linearity_logit", SeKind::Classical, 3); }

TEST(SmoothStatsmodels, OlsKernelAtFixedBandwidth) { compare_kernel("linearity_ols"); }
TEST(SmoothStatsmodels, WlsKernelWithModelWeights) { compare_kernel("linearity_wls"); }
TEST(SmoothStatsmodels, LogitKernelAtFixedBandwidth) { compare_kernel("linearity_logit"); }

// The fixture's data bend (the slope of x is quadratic in w): the test must
// reject and the sentence must say so (by construction of the data).
// 25 clusters: the cluster-robust test of 8 terms gets the few-clusters
// caution (the rule of about 50 clusters, Cameron & Miller 2015).
TEST(Binned, FewClustersGetACaution) {
    const Case c = load("linearity_ols", SeKind::Cluster);
    const BinnedEffects b = binned_effects(c.d, c.f, c.spec, "x", "w", 3);
    const bool said = std::any_of(b.cautions.begin(), b.cautions.end(), [](const std::string& t) {
        return t.find("With 25 clusters the cluster-robust test of 8 terms") != std::string::npos;
    });
    EXPECT_TRUE(said);
    const Case plain = load("linearity_ols", SeKind::Classical);
    const BinnedEffects bp = binned_effects(plain.d, plain.f, plain.spec, "x", "w", 3);
    for (const auto& t : bp.cautions) EXPECT_EQ(t.find("clusters"), std::string::npos) << t;
}

TEST(Binned, BendingEffectIsFoundAndSaid) {
    const Case c = load("linearity_ols", SeKind::Classical);
    const BinnedEffects b = binned_effects(c.d, c.f, c.spec, "x", "w", 3);
    EXPECT_TRUE(b.linear_contradicted);
    EXPECT_NE(linearity_sentence(b).find("contradict the straight-line effect of x across w"), std::string::npos)
        << linearity_sentence(b);
    // The middle bin's effect is above both outer ones (the true slope
    // 0.2 + 0.25 w − 0.025 w² peaks at w = 5): by construction.
    EXPECT_GT(b.bins[1].estimate, b.bins[0].estimate);
    EXPECT_GT(b.bins[1].estimate, b.bins[2].estimate);
}

// Noise-free straight-line moderation: every bin's effect equals the line's
// effect at the bin's median, and the smooth curve equals the line at every
// grid point (by construction: the local models hold exactly).
TEST(Binned, ExactLineIsReproducedByBinsAndKernel) {
    std::mt19937_64 g(7);
    std::normal_distribution<double> nd(0, 1);
    std::vector<double> x, w, c, y;
    for (int i = 0; i < 300; ++i) {
        x.push_back(nd(g));
        w.push_back(3 + 2 * nd(g));
        c.push_back(nd(g));
        y.push_back(1 + x.back() * (0.5 + 0.3 * w.back()) - 0.2 * w.back() + 0.7 * c.back());
    }
    const Table t =
        make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("w", w), numeric_column("c", c)});
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x", "w", "c"};
    s.interactions = {{"x", "w"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    const BinnedEffects b = binned_effects(d, f, s, "x", "w", 4);
    for (const auto& bin : b.bins) EXPECT_NEAR(bin.estimate, 0.5 + 0.3 * bin.moderator_value, 1e-9);
    SmoothOptions o;
    o.bandwidth = 0.5;
    o.replicates = 0;
    const SmoothEffects sm = smooth_effects(d, f, "x", "w", o);
    for (const auto& p : sm.points) EXPECT_NEAR(p.effect, 0.5 + 0.3 * p.moderator_value, 1e-8);
}

namespace {

// A linear model y ~ x + w + x×w (+ extra terms) on invented data.
struct Small {
    Design d;
    FitResult f;
    ModelSpec s;
};

Small small_model(const std::vector<double>& w, std::vector<std::vector<std::string>> extra = {}) {
    std::mt19937_64 g(11);
    std::normal_distribution<double> nd(0, 1);
    std::vector<double> x, y, b;
    for (double wi : w) {
        x.push_back(nd(g));
        b.push_back(nd(g) > 0 ? 1 : 0);
        y.push_back(x.back() * (1 + 0.2 * wi) + nd(g));
    }
    Small m;
    m.s.outcome = "y";
    m.s.predictors = {"x", "w", "b"};
    m.s.interactions = {{"x", "w"}};
    for (auto& e : extra) m.s.interactions.push_back(e);
    m.d = build_design(
        make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("w", w), numeric_column("b", b)}),
        m.s);
    m.f = fit_design(m.d, m.s);
    return m;
}

std::vector<double> spread(int n) {
    std::vector<double> w;
    for (int i = 0; i < n; ++i) w.push_back(i * 0.1);
    return w;
}

}  // namespace

// Bad input: each refusal names what is wrong (the wording is ours).
TEST(BinnedInput, MoreBinsThanTiedValuesAllowIsRefusedWithTheLimit) {
    // 60 rows spread over 0..0.59, 100 rows at 1, 40 rows over 2..2.39: the
    // quartiles are about 0.50, 1 and 1, the tertiles 1 and 1 (by hand)
    std::vector<double> w;
    for (int i = 0; i < 60; ++i) w.push_back(i * 0.01);
    for (int i = 0; i < 100; ++i) w.push_back(1.0);
    for (int i = 0; i < 40; ++i) w.push_back(2 + i * 0.01);
    const Small m = small_model(w);
    const std::string e = input_error_of([&] { binned_effects(m.d, m.f, m.s, "x", "w", 4); });
    EXPECT_NE(e.find("'w' cannot be cut into 4 bins"), std::string::npos) << e;
    EXPECT_NE(e.find("at most 2 bins"), std::string::npos) << e;
    // 2 bins: the median 1 leaves 160 and 40 rows (by hand)
    const BinnedEffects b = binned_effects(m.d, m.f, m.s, "x", "w", 2);
    EXPECT_EQ(b.bins[0].rows, 160u);
    EXPECT_EQ(b.bins[1].rows, 40u);
    EXPECT_EQ(b.bins[0].moderator_value, 1.0);
}

// A bin without one of the two values of a 0/1 focal predictor, and a bin
// too small for its four coefficients, are refused naming the bin.
TEST(BinnedInput, ABinWithoutOneFocalGroupOrTooFewRowsIsRefused) {
    const std::vector<double> w = spread(200);
    std::vector<double> y(200), b(200), x(200);
    for (int i = 0; i < 200; ++i) {
        b[static_cast<std::size_t>(i)] = i < 70 ? 0 : i % 2;  // the lowest third holds only b = 0
        x[static_cast<std::size_t>(i)] = std::sin(i);
        y[static_cast<std::size_t>(i)] = b[static_cast<std::size_t>(i)] * w[static_cast<std::size_t>(i)] + std::cos(i);
    }
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"b", "w", "x"};
    s.interactions = {{"b", "w"}};
    const Design d = build_design(
        make_table({numeric_column("y", y), numeric_column("b", b), numeric_column("w", w), numeric_column("x", x)}),
        s);
    const FitResult f = fit_design(d, s);
    const std::string e = input_error_of([&] { binned_effects(d, f, s, "b", "w", 3); });
    EXPECT_NE(e.find("bin 1 of 'w' (0.000 to 6.600, 67 rows) has no rows with b = 1"), std::string::npos) << e;
    // 10 rows in 3 bins: 4 coefficients need more than 3 or 4 rows a bin
    const Small tiny = small_model(spread(10));
    const std::string et = input_error_of([&] { binned_effects(tiny.d, tiny.f, tiny.s, "x", "w", 3); });
    EXPECT_NE(et.find("its effect cannot be estimated"), std::string::npos) << et;
}

TEST(BinnedInput, FewerThanTwoBinsAndZeroBandwidthAreRefused) {
    const Small m = small_model(spread(200));
    EXPECT_NE(input_error_of([&] { binned_effects(m.d, m.f, m.s, "x", "w", 1); }).find("at least 2"),
              std::string::npos);
    SmoothOptions o;
    o.bandwidth = 0;
    EXPECT_NE(input_error_of([&] { smooth_effects(m.d, m.f, "x", "w", o); }).find("bandwidth must be a positive"),
              std::string::npos);
    o.bandwidth = -1;
    EXPECT_NE(input_error_of([&] { smooth_effects(m.d, m.f, "x", "w", o); }).find("got −1"), std::string::npos);
    o.bandwidth = 1;
    o.points = 10;
    EXPECT_NE(input_error_of([&] { smooth_effects(m.d, m.f, "x", "w", o); }).find("at least 50 points"),
              std::string::npos);
}

TEST(BinnedInput, OtherTermsOfTheFocalOrModeratorAndBinaryModeratorsAreRefused) {
    const Small m = small_model(spread(200), {{"x", "b"}});
    const std::string e = input_error_of([&] { binned_effects(m.d, m.f, m.s, "x", "w", 3); });
    EXPECT_NE(e.find("the term 'x×b' also involves them"), std::string::npos) << e;
    const Small plain = small_model(spread(200));
    const std::string eb = input_error_of([&] { binned_effects(plain.d, plain.f, plain.s, "x", "b", 3); });
    EXPECT_NE(eb.find("'b' takes only 0 and 1"), std::string::npos) << eb;
}

// Thin bins: with 60 rows, 3 bins of 20 rows each fall below the rule of 40
// (10 per coefficient); the caution names the bins (the rule as documented).
TEST(BinnedInput, ThinBinsGetACautionNamingThem) {
    const Small m = small_model(spread(60));
    const BinnedEffects b = binned_effects(m.d, m.f, m.s, "x", "w", 3);
    for (const auto& bin : b.bins) EXPECT_TRUE(bin.thin);
    ASSERT_FALSE(b.cautions.empty());
    EXPECT_NE(b.cautions[0].find("Bins 1, 2 and 3 rest on few rows"), std::string::npos) << b.cautions[0];
}

// Common support: the counts add up to the rows, and a gap in the moderator
// is reported as a thin stretch (re-derived here from the rule: fewer than
// 20 rows in an equal-width interval).
TEST(CommonSupport, CountsAddUpAndAGapIsThin) {
    std::vector<double> w;
    for (int i = 0; i < 400; ++i) w.push_back(i < 200 ? i * 0.01 : 8.0 + (i - 200) * 0.01);  // nothing in (2, 8)
    const Small m = small_model(w);
    const CommonSupport s = common_support(m.d, "x", "w");
    EXPECT_FALSE(s.binary_focal);
    EXPECT_EQ(static_cast<std::size_t>(s.joint.sum()), m.d.n());
    ASSERT_EQ(s.moderator_edges.size(), 11u);  // 400 / 40 = 10 intervals
    ASSERT_EQ(s.thin.size(), 1u);
    EXPECT_GE(s.thin[0].lo, 1.99);
    EXPECT_LE(s.thin[0].hi, 8.0);
    EXPECT_GT(s.thin[0].hi - s.thin[0].lo, 4.0);
    const CommonSupport sb = common_support(m.d, "b", "w");
    EXPECT_TRUE(sb.binary_focal);
    std::size_t total = 0;
    for (std::size_t k = 0; k < sb.counts_zero.size(); ++k) total += sb.counts_zero[k] + sb.counts_one[k];
    EXPECT_EQ(total, m.d.n());
}

// The bootstrap band does not depend on the thread count, and a seed gives
// the same band twice (the streams are per replicate, bootstrap.hpp).
TEST(Smooth, BandIsTheSameOnAnyNumberOfThreads) {
    const Small m = small_model(spread(300));
    SmoothOptions o;
    o.replicates = 100;
    o.seed = 42;
    o.threads = 1;
    const SmoothEffects one = smooth_effects(m.d, m.f, "x", "w", o);
    o.threads = 3;
    const SmoothEffects three = smooth_effects(m.d, m.f, "x", "w", o);
    EXPECT_EQ(one.bandwidth, three.bandwidth);
    EXPECT_EQ(one.method, BandwidthMethod::CrossValidation);
    for (std::size_t g = 0; g < one.points.size(); ++g) {
        EXPECT_EQ(one.points[g].low, three.points[g].low);
        EXPECT_EQ(one.points[g].high, three.points[g].high);
        EXPECT_LE(one.points[g].low, one.points[g].effect + 1e-12);
    }
    // The cross-validated bandwidth is one of the candidates, whose scores are finite.
    ASSERT_EQ(one.scores.size(), 20u);
    EXPECT_TRUE(std::any_of(one.scores.begin(), one.scores.end(),
                            [&](const BandwidthScore& b) { return b.bandwidth == one.bandwidth; }));
}
