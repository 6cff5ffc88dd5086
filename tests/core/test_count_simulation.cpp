// Coverage of the outcome-scale intervals of Poisson (with an exposure),
// negative binomial and probit models on invented data (seeded). The
// design is drawn once and the outcome redrawn in every replication, so the
// estimand — the focal predictor's effect on the expected count (rate,
// probability) averaged over these rows with the moderator set to w0 — has
// one true value, computed from the true coefficients by the same formula.
// Expected: 95 % coverage (the definition of the interval) with binomial
// Monte Carlo error (common practice: 300 replications give SE 1.3 points).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <random>

#include "common/table_builder.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/response_scale.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {

constexpr int kRows = 500, kReplications = 300;
constexpr double kW0 = 1.0;

struct Design0 {
    std::vector<double> x, w, g, exposure;
};

Design0 draw_design(std::mt19937_64& rng) {
    std::normal_distribution<double> nd(0, 1);
    std::uniform_real_distribution<double> ud(0.5, 3.0);
    Design0 d;
    for (int i = 0; i < kRows; ++i) {
        d.x.push_back(nd(rng));
        d.w.push_back(nd(rng));
        d.g.push_back(nd(rng) > 0 ? 1.0 : 0.0);
        d.exposure.push_back(ud(rng));
    }
    return d;
}

// The true linear predictor without the offset: 0.2 + 0.3x + 0.2w - 0.25xw + 0.3g.
double eta(const Design0& d, int i, double w) {
    return 0.2 + 0.3 * d.x[i] + 0.2 * w - 0.25 * d.x[i] * w + 0.3 * d.g[i];
}

// The true average effect of x at w = kW0: d mean / dx averaged over the rows.
double true_effect(const Design0& d, Family f) {
    double sum = 0;
    for (int i = 0; i < kRows; ++i) {
        const double e = eta(d, i, kW0), slope = 0.3 - 0.25 * kW0;
        const double dmu = f == Family::Probit ? std::exp(-0.5 * e * e) / std::sqrt(2 * M_PI) : std::exp(e);
        sum += dmu * slope;
    }
    return sum / kRows;
}

double draw_y(const Design0& d, int i, Family f, std::mt19937_64& rng) {
    const double e = eta(d, i, d.w[i]);
    if (f == Family::Probit) return std::normal_distribution<double>(0, 1)(rng) < e ? 1.0 : 0.0;
    const double mu = std::exp(e) * (f == Family::Poisson ? d.exposure[i] : 1.0);
    if (f == Family::Poisson) return std::poisson_distribution<int>(mu)(rng);
    const double alpha = 0.5;  // NB2 as a gamma mixture of Poissons
    const double lambda = std::gamma_distribution<double>(1 / alpha, alpha * mu)(rng);
    return std::poisson_distribution<int>(lambda)(rng);
}

double coverage(Family f, std::uint64_t seed) {
    std::mt19937_64 rng(seed);
    const Design0 d = draw_design(rng);
    const double truth = true_effect(d, f);
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x", "w", "g"};
    s.interactions = {{"x", "w"}};
    s.family = f;
    s.threads = 1;
    if (f == Family::Poisson) s.exposure = "exposure";
    int covered = 0;
    for (int r = 0; r < kReplications; ++r) {
        std::vector<double> y(kRows);
        for (int i = 0; i < kRows; ++i) y[i] = draw_y(d, i, f, rng);
        const Design design =
            build_design(make_table({numeric_column("y", y), numeric_column("x", d.x), numeric_column("w", d.w),
                                     numeric_column("g", d.g), numeric_column("exposure", d.exposure)}),
                         s);
        const FitResult fit = fit_design(design, s);
        ScaleRequest req;
        req.focal = "x";
        req.moderator = "w";
        const EffectPoint e = probability_effect(design, fit, req, kW0);
        covered += e.ci_lower <= truth && truth <= e.ci_upper;
    }
    return static_cast<double>(covered) / kReplications;
}

}  // namespace

TEST(CountSimulation, OutcomeScaleIntervalsCoverTheTruth) {
    const std::pair<Family, const char*> families[] = {{Family::Poisson, "Poisson, rate per unit of exposure"},
                                                       {Family::NegativeBinomial, "negative binomial, expected count"},
                                                       {Family::Probit, "probit, probability"}};
    std::uint64_t seed = 20261205;
    for (const auto& [f, name] : families) {
        const double c = coverage(f, seed++);
        std::printf("coverage of the 95%% outcome-scale interval (%s): %.3f of %d\n", name, c, kReplications);
        EXPECT_GE(c, 0.92) << name;
        EXPECT_LE(c, 0.975) << name;
    }
}
