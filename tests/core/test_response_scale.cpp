// Logistic models on the probability scale: marginal effects and the Ai &
// Norton interaction effect, against statsmodels predictions differentiated
// numerically (tests/reference/make_logit_effects_reference.py, about 7
// correct digits, so the tolerance is 1e-6 relative), and closed forms.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;

namespace {

struct LogitCase {
    Design design;
    FitResult fit;
};

LogitCase logit_case() {
    const Table t = read_csv((committed_fixture_dir() / "logit_interaction.csv").string());
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "g"}};
    s.family = Family::Logistic;
    LogitCase c{build_design(t, s), {}};
    c.fit = fit_design(c.design, s);
    return c;
}

}  // namespace

TEST(ResponseScale, MarginalEffectsMatchDifferentiatedStatsmodelsPredictions) {
    const LogitCase c = logit_case();
    const auto j = read_fixture_json(reference_fixture("logit_effects.json"));
    int checked = 0;
    for (const auto& row : j.at("cases")) {
        ScaleRequest r;
        r.focal = row.at("focal");
        r.moderator = row.at("moderator");
        SCOPED_TRACE(r.focal + " / " + r.moderator);
        if (row.at("quantity") == "effect") {
            const EffectPoint e = probability_effect(c.design, c.fit, r, row.at("at").get<double>());
            EXPECT_LE(rel(e.estimate, row.at("estimate").get<double>()), 1e-6);
            EXPECT_LE(rel(e.std_error, row.at("std_error").get<double>()), 1e-6);
        } else {
            const InteractionEffect ie = probability_interaction(c.design, c.fit, r);
            EXPECT_EQ(to_string(ie.kind), row.at("kind").get<std::string>());
            EXPECT_LE(rel(ie.estimate, row.at("estimate").get<double>()), 1e-6);
            EXPECT_LE(rel(ie.std_error, row.at("std_error").get<double>()), 1e-6);
        }
        ++checked;
    }
    EXPECT_EQ(checked, 6);
}

// Closed form: at one profile, dP/dx = P(1 - P)(b_x + b_xg g).
TEST(ResponseScale, AtValuesEffectIsTheLinkEffectTimesTheDensity) {
    const LogitCase c = logit_case();
    ScaleRequest r;
    r.focal = "x";
    r.moderator = "g";
    r.averaging = Averaging::AtValues;
    r.values = {{"x", 0.3}};
    const EffectPoint e = probability_effect(c.design, c.fit, r, 1.0);
    const auto& b = c.fit.beta;
    const double eta = b[0] + b[1] * 0.3 + b[2] + b[3] * 0.3;
    const double p = 1 / (1 + std::exp(-eta));
    EXPECT_NEAR(e.estimate, p * (1 - p) * (b[1] + b[3]), 1e-14);
}

// Closed form: with no interaction on either scale a flat effect gives no
// boundaries; and a scan finds the sign changes of |t| - q (checked by
// evaluating t at each boundary).
TEST(ResponseScale, RegionsFromTheScanHitTheCriticalValue) {
    const LogitCase c = logit_case();
    ScaleRequest r;
    r.focal = "g";
    r.moderator = "x";
    const auto regions = probability_regions(c.design, c.fit, r, c.fit.critical_value, -4, 4, 120);
    for (double bnd : regions.boundaries)
        EXPECT_NEAR(std::abs(probability_effect(c.design, c.fit, r, bnd).statistic), c.fit.critical_value, 1e-7);
    EXPECT_FALSE(regions.significant.empty());
}

TEST(ResponseScale, LinearModelsAreRefused) {
    const Table t = read_csv((committed_fixture_dir() / "logit_interaction.csv").string());
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "g"}};
    const Design d = build_design(t, s);
    const FitResult f = fit_design(d, s);
    ScaleRequest r;
    r.focal = "x";
    r.moderator = "g";
    EXPECT_THROW(probability_effect(d, f, r, 0.0), InputError);
}
