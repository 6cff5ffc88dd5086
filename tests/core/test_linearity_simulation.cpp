// Simulations of the binned estimates, the linearity test and the smooth
// band on invented data (seeded): when the true moderation is a straight
// line the test rejects at about its level and the bins' intervals cover
// the true effect at their medians; when the effect bends the binned
// estimates find it. Expected rates come from the definitions (level 5 %,
// 95 % coverage) with binomial Monte Carlo error (common practice).
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "common/table_builder.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/binned_effects.hpp"
#include "moderato/probing/smooth_effects.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {

// y = 1 + x·slope(w) + 0.5 w + 0.3 c + N(0, 1); x, c ~ N(0, 1), w ~ U(0, 4).
struct Draw {
    Design d;
    FitResult f;
    ModelSpec s;
};

template <class Slope>
Draw simulate(std::mt19937_64& g, int n, Slope slope) {
    std::normal_distribution<double> nd(0, 1);
    std::uniform_real_distribution<double> ud(0, 4);
    std::vector<double> x(n), w(n), c(n), y(n);
    for (int i = 0; i < n; ++i) {
        x[i] = nd(g);
        w[i] = ud(g);
        c[i] = nd(g);
        y[i] = 1 + x[i] * slope(w[i]) + 0.5 * w[i] + 0.3 * c[i] + nd(g);
    }
    Draw r;
    r.s.outcome = "y";
    r.s.predictors = {"x", "w", "c"};
    r.s.interactions = {{"x", "w"}};
    r.s.threads = 1;
    r.d = build_design(
        make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("w", w), numeric_column("c", c)}),
        r.s);
    r.f = fit_design(r.d, r.s);
    return r;
}

double line(double w) { return 0.5 + 0.4 * w; }
double bend(double w) { return 0.5 + 1.2 * w - 0.3 * w * w; }

}  // namespace

TEST(LinearitySimulation, StraightLineIsRejectedAtAboutTheLevelAndBinsCover) {
    std::mt19937_64 g(20261205);
    const int reps = 400;
    int rejected = 0, covered = 0, intervals = 0;
    for (int r = 0; r < reps; ++r) {
        const Draw s = simulate(g, 300, line);
        const BinnedEffects b = binned_effects(s.d, s.f, s.s, "x", "w", 3);
        rejected += b.linear_contradicted;
        for (const auto& bin : b.bins) {
            const double truth = line(bin.moderator_value);
            covered += bin.ci_lower <= truth && truth <= bin.ci_upper;
            ++intervals;
        }
    }
    const double rate = static_cast<double>(rejected) / reps, coverage = static_cast<double>(covered) / intervals;
    std::printf("straight line: rejection rate %.3f (level 0.05), bin coverage %.3f (nominal 0.95)\n", rate, coverage);
    // 0.05 ± 3.5 binomial SDs (SD = 0.011 at 400 draws)
    EXPECT_GT(rate, 0.012);
    EXPECT_LT(rate, 0.088);
    // 0.95 ± 3.5 SDs of 1,200 intervals (SD = 0.0063; the bins of one draw are independent)
    EXPECT_GT(coverage, 0.928);
    EXPECT_LT(coverage, 0.972);
}

TEST(LinearitySimulation, BendIsFoundByTheBinnedEstimates) {
    std::mt19937_64 g(77);
    const int reps = 100;
    int rejected = 0, peaked = 0;
    for (int r = 0; r < reps; ++r) {
        const Draw s = simulate(g, 300, bend);
        const BinnedEffects b = binned_effects(s.d, s.f, s.s, "x", "w", 3);
        rejected += b.linear_contradicted;
        peaked += b.bins[1].estimate > b.bins[0].estimate && b.bins[1].estimate > b.bins[2].estimate;
    }
    std::printf("bend: rejection rate %.2f, middle bin highest in %.2f of draws\n", rejected / 100.0, peaked / 100.0);
    // the slope rises from 0.5 to 1.7 at w = 2 and falls back to 0.5: a
    // difference of 1.2 against bin SEs near 0.1 — found nearly always
    EXPECT_GE(rejected, 95);
    EXPECT_GE(peaked, 95);
}

// The smooth curve's percentile band at a fixed bandwidth covers the true
// effect at the middle of the moderator about as often as it says.
TEST(LinearitySimulation, SmoothBandCoversTheTrueEffect) {
    std::mt19937_64 g(5);
    const int reps = 80;
    int covered = 0;
    SmoothOptions o;
    o.bandwidth = 0.8;
    o.replicates = 150;
    o.threads = 2;
    for (int r = 0; r < reps; ++r) {
        const Draw s = simulate(g, 200, line);
        o.seed = static_cast<std::uint64_t>(r + 1);
        const SmoothEffects e = smooth_effects(s.d, s.f, "x", "w", o);
        const SmoothPoint& p = e.points[25];
        covered += p.low <= line(p.moderator_value) && line(p.moderator_value) <= p.high;
    }
    const double coverage = static_cast<double>(covered) / reps;
    std::printf("smooth band: coverage %.3f at w = 2 (nominal 0.95)\n", coverage);
    // 0.95 − 3.5 SDs of 80 draws (SD = 0.024); percentile intervals run a little short
    EXPECT_GT(coverage, 0.86);
    EXPECT_LE(coverage, 1.0);
}
