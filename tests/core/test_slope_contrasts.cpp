// Pairwise differences of the focal predictor's effect between the levels of
// a categorical moderator, their multiplicity adjustment and the joint test
// of the interaction. Expected values: statsmodels 0.13 t_test, wald_test and
// stats.multitest.multipletests (tests/reference/make_contrasts_reference.py;
// fixtures contrasts_ols4 and contrasts_logit3), hand-worked Holm and
// Bonferroni examples (from the definitions, Holm 1979), and a Holm
// computation written here from its definition.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <random>

#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/multiplicity.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/reading/csv.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

// Holm from its definition: a hypothesis's adjusted p is the largest, over
// every hypothesis at least as small, of min(1, (m - rank + 1) p), ranks
// counted from 1 in ascending order (ties broken by position).
std::vector<double> holm_by_definition(const std::vector<double>& p) {
    const std::size_t m = p.size();
    std::vector<std::size_t> rank(m);
    for (std::size_t i = 0; i < m; ++i) {
        rank[i] = 1;
        for (std::size_t j = 0; j < m; ++j)
            if (p[j] < p[i] || (p[j] == p[i] && j < i)) ++rank[i];
    }
    std::vector<double> out(m, 0.0);
    for (std::size_t i = 0; i < m; ++i)
        for (std::size_t j = 0; j < m; ++j)
            if (rank[j] <= rank[i])
                out[i] = std::max(out[i], std::min(1.0, static_cast<double>(m - rank[j] + 1) * p[j]));
    return out;
}

TEST(Multiplicity, HandWorkedHolmAndBonferroni) {
    // sorted: 0.005 (x4 = 0.02), 0.01 (x3 = 0.03), 0.03 (x2 = 0.06), 0.04 (x1 = 0.04 -> running max 0.06)
    const std::vector<double> p{0.01, 0.04, 0.03, 0.005};
    const auto holm = adjust_p_values(p, Adjustment::Holm);
    const std::vector<double> want_holm{0.03, 0.06, 0.06, 0.02};
    const auto bonf = adjust_p_values(p, Adjustment::Bonferroni);
    const std::vector<double> want_bonf{0.04, 0.16, 0.12, 0.02};
    for (std::size_t i = 0; i < p.size(); ++i) {
        EXPECT_NEAR(holm[i], want_holm[i], 1e-15) << i;
        EXPECT_NEAR(bonf[i], want_bonf[i], 1e-15) << i;
    }
    EXPECT_EQ(adjust_p_values(p, Adjustment::None), p);
    // capped at 1; a NaN stays NaN and is not counted (m = 2 here)
    const auto capped = adjust_p_values({0.6, std::nan(""), 0.2}, Adjustment::Holm);
    EXPECT_EQ(capped[0], 0.6);
    EXPECT_TRUE(std::isnan(capped[1]));
    EXPECT_EQ(capped[2], 0.4);
    EXPECT_EQ(adjust_p_values({0.7, 0.9}, Adjustment::Bonferroni), (std::vector<double>{1.0, 1.0}));
}

TEST(Multiplicity, HolmAgreesWithItsDefinitionOnRandomSets) {
    std::mt19937_64 rng(20261204);
    std::uniform_real_distribution<double> u(0, 1);
    for (int trial = 0; trial < 200; ++trial) {
        std::vector<double> p(1 + trial % 12);
        for (auto& v : p) v = std::pow(u(rng), 3);
        if (trial % 5 == 0 && p.size() > 2) p[1] = p[2];  // ties
        const auto ours = adjust_p_values(p, Adjustment::Holm);
        const auto theirs = holm_by_definition(p);
        for (std::size_t i = 0; i < p.size(); ++i) {
            EXPECT_NEAR(ours[i], theirs[i], 1e-15);
            EXPECT_GE(ours[i], p[i]);                                    // never smaller than the raw p
            EXPECT_LE(ours[i], std::min(1.0, p.size() * p[i]) + 1e-15);  // never above Bonferroni
        }
    }
}

TEST(Multiplicity, WordsRoundTrip) {
    for (Adjustment a : {Adjustment::Holm, Adjustment::Bonferroni, Adjustment::None})
        EXPECT_EQ(adjustment_from_string(to_string(a)), a);
    EXPECT_FALSE(adjustment_from_string("Holm").has_value());
    EXPECT_FALSE(adjustment_from_string("").has_value());
}

// ---------------------------------------------------------------------------
// statsmodels reference

struct Case {
    json j;
    Design d;
    FitResult f;
};

Case load(const std::string& name, SeKind se) {
    const fs::path path = reference_fixture(name + ".json");
    json j = read_fixture_json(path);
    const FixtureModel m = fixture_model(j, path, se);
    Design d = build_design(m.table, m.spec);
    FitResult f = fit_design(d, m.spec);
    return {std::move(j), std::move(d), std::move(f)};
}

void expect_inference(const Inference& ours, const json& ref) {
    // statsmodels 0.13 t_test of the same contrast vector: 1e-8 relative
    // (tests/reference/README.md); p-values 1e-6 (different tail code)
    EXPECT_LE(rel(ours.estimate, ref.at("estimate").get<double>()), 1e-8);
    EXPECT_LE(rel(ours.std_error, ref.at("std_error").get<double>()), 1e-8);
    EXPECT_LE(rel(ours.statistic, ref.at("statistic").get<double>()), 1e-8);
    EXPECT_LE(rel(ours.p_value, ref.at("p_value").get<double>()), 1e-6);
    // an interval end is estimate ± q SE: 1e-8 of |estimate| + q SE (an end
    // near zero magnifies the SE's last digits in a relative comparison)
    const double scale = std::abs(ref.at("estimate").get<double>()) + 3 * ref.at("std_error").get<double>();
    EXPECT_LE(std::abs(ours.ci_lower - ref.at("ci_lower").get<double>()), 1e-8 * scale);
    EXPECT_LE(std::abs(ours.ci_upper - ref.at("ci_upper").get<double>()), 1e-8 * scale);
}

void compare(const std::string& name, SeKind se, const std::string& se_name) {
    SCOPED_TRACE(name + " " + se_name);
    const Case k = load(name, se);
    const json& ref = k.j.at("contrasts").at(se_name);
    const json& s = k.j.at("spec");
    for (Adjustment adj : {Adjustment::Holm, Adjustment::Bonferroni, Adjustment::None}) {
        SCOPED_TRACE(to_string(adj));
        ProbeSpec ps;
        ps.focal = s.at("focal").get<std::string>();
        ps.moderator = s.at("moderator").get<std::string>();
        ps.adjustment = adj;
        const ProbeResult r = probe(k.d, k.f, ps);
        ASSERT_EQ(r.effects.size(), ref.at("slopes").size());
        for (std::size_t i = 0; i < r.effects.size(); ++i) {
            EXPECT_EQ(r.effects[i].level, ref.at("slopes")[i].at("level").get<std::string>());
            expect_inference(r.effects[i], ref.at("slopes")[i]);
        }
        ASSERT_EQ(r.slope_contrasts.size(), ref.at("pairs").size());
        std::vector<double> raw;
        for (std::size_t q = 0; q < r.slope_contrasts.size(); ++q) {
            const SlopeContrast& c = r.slope_contrasts[q];
            const json& p = ref.at("pairs")[q];
            SCOPED_TRACE(c.second + " - " + c.first);
            EXPECT_EQ(c.first, p.at("pair")[0].get<std::string>());
            EXPECT_EQ(c.second, p.at("pair")[1].get<std::string>());
            expect_inference(c, p);
            raw.push_back(c.p_value);
            if (adj == Adjustment::None) EXPECT_EQ(c.p_adjusted, c.p_value);
            else  // statsmodels multipletests of statsmodels' p-values
                EXPECT_LE(rel(c.p_adjusted, ref.at(to_string(adj))[q].get<double>()), 1e-6);
        }
        if (adj == Adjustment::Holm) {  // and of our own p-values, by the definition above
            const auto def = holm_by_definition(raw);
            for (std::size_t q = 0; q < raw.size(); ++q) EXPECT_LE(rel(r.slope_contrasts[q].p_adjusted, def[q]), 1e-14);
        }
        // statsmodels wald_test of every product column (F form, or chi-square for Logit)
        const json& w = ref.at("wald");
        ASSERT_TRUE(r.interaction_test.has_value());
        EXPECT_EQ(r.interaction_test->df1, w.at("df_num").get<double>());
        if (k.f.family == Family::Logistic) {
            EXPECT_LE(rel(r.interaction_test->chi_square, w.at("statistic").get<double>()), 1e-8);
        } else {
            EXPECT_EQ(r.interaction_test->df2, w.at("df_denom").get<double>());
            EXPECT_LE(rel(r.interaction_test->statistic, w.at("statistic").get<double>()), 1e-8);
        }
        EXPECT_LE(rel(r.interaction_test->p_value, w.at("p_value").get<double>()), 1e-6);
    }
}

TEST(SlopeContrastsStatsmodels, FourLevelsClassical) { compare("contrasts_ols4", SeKind::Classical, "classical"); }
TEST(SlopeContrastsStatsmodels, FourLevelsHc3) { compare("contrasts_ols4", SeKind::HC3, "hc3"); }
TEST(SlopeContrastsStatsmodels, FourLevelsCluster) { compare("contrasts_ols4", SeKind::Cluster, "cluster"); }
TEST(SlopeContrastsStatsmodels, LogitThreeLevels) { compare("contrasts_logit3", SeKind::Classical, "classical"); }

// On the probability scale each difference is the difference of the two
// levels' average marginal effects, with the delta method's SE from the
// difference of their gradients. Check the gradient by central differences
// of the effect itself over the coefficients (common practice).
TEST(SlopeContrastsOutcomeScale, DifferenceOfEffectsWithDeltaMethodSe) {
    const Case k = load("contrasts_logit3", SeKind::Classical);
    ProbeSpec ps;
    ps.focal = "tenure";
    ps.moderator = "channel";
    const ProbeResult r = probe_response(k.d, k.f, ps, Averaging::Sample);
    ASSERT_EQ(r.effects.size(), 3u);
    ASSERT_EQ(r.slope_contrasts.size(), 3u);
    const SlopeContrast& c = r.slope_contrasts[2];  // visit minus email
    EXPECT_EQ(c.first, "email");
    EXPECT_EQ(c.second, "visit");
    EXPECT_NEAR(c.estimate, r.effects[2].estimate - r.effects[1].estimate, 1e-14);
    ScaleRequest req;
    req.focal = "tenure";
    req.moderator = "channel";
    auto difference = [&](const Eigen::VectorXd& b) {
        FitResult f = k.f;
        f.beta = b;
        return probability_effect(k.d, f, req, 2).estimate - probability_effect(k.d, f, req, 1).estimate;
    };
    Eigen::VectorXd grad(k.f.beta.size());
    for (Eigen::Index j = 0; j < grad.size(); ++j) {
        const double h = 1e-6 * std::max(1.0, std::abs(k.f.beta[j]));
        Eigen::VectorXd up = k.f.beta, down = k.f.beta;
        up[j] += h;
        down[j] -= h;
        grad[j] = (difference(up) - difference(down)) / (2 * h);
    }
    const double se = std::sqrt(grad.dot(k.f.covariance * grad));
    EXPECT_LE(rel(c.std_error, se), 1e-6);
    EXPECT_LE(c.p_adjusted, 1.0);
    EXPECT_GE(c.p_adjusted, c.p_value);
}

TEST(SlopeContrasts, NumericModeratorHasNoneButAJointTest) {
    const Case k = load("contrasts_ols4", SeKind::HC3);
    ProbeSpec ps;
    ps.focal = "tenure";
    ps.moderator = "backlog";
    // backlog is in no product with tenure: the probe refuses, as before
    EXPECT_THROW(probe(k.d, k.f, ps), InputError);
    ps.focal = "tenure";
    ps.moderator = "channel";
    const ProbeResult r = probe(k.d, k.f, ps);
    EXPECT_EQ(r.interaction_test->terms, (std::vector<std::string>{"channel×tenure"}));
    EXPECT_EQ(r.adjustment, Adjustment::Holm);  // the default
}

}  // namespace
