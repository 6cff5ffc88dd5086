// moderato-cli probe: the JSON contract, agreement with `fit`, and the
// refusals. Expected numbers come from closed forms (the effect at moderator
// 0 is the focal coefficient; b_x + m b_xz at m) applied to `fit`'s output.
#include <gtest/gtest.h>

#include <cmath>
#include <nlohmann/json.hpp>

#include "cli/cli_json.hpp"
#include "cli/cli_runner.hpp"
#include "common/sample_projects.hpp"

using moderato::test::run_cli;
using nlohmann::json;

namespace {

const std::string kData = moderato::test::sample_file("coffee-discount", "spend.csv").string();
const std::string kOrchard = moderato::test::sample_file("orchard-nitrogen", "plots.csv").string();

json run_json(const std::vector<std::string>& args) { return moderato::test::json_output(run_cli(args)); }

double coefficient(const json& fit, const std::string& term) {
    for (const auto& c : fit.at("terms"))
        if (c.at("name") == term) return c.at("value").get<double>();
    ADD_FAILURE() << "no term " << term;
    return NAN;
}

}  // namespace

TEST(ProbeCli, JsonHasTheContractFieldsAndAgreesWithFit) {
    const std::vector<std::string> model{
        "--data", kOrchard, "--outcome", "yield_t_ha", "--interaction", "nitrogen_kg_ha,soil_moisture_pct",
        "--se",   "hc3",    "--format",  "json"};
    std::vector<std::string> fit_args{"fit"},
        probe_args{"probe", "--focal", "nitrogen_kg_ha", "--moderator", "soil_moisture_pct", "--moderator-values",
                   "0,20"};
    fit_args.insert(fit_args.end(), model.begin(), model.end());
    probe_args.insert(probe_args.end(), model.begin(), model.end());
    const json fit = run_json(fit_args), probe = run_json(probe_args);
    for (const char* key : {"output_version", "focal", "moderator", "scale", "level", "df", "critical_value",
                            "effects_at", "significance_region", "simultaneous", "crossing"})
        EXPECT_TRUE(probe.contains(key)) << key;
    for (const char* key : {"moderator_value", "effect", "se", "test_value", "p", "low", "high", "beyond_data"})
        EXPECT_TRUE(probe.at("effects_at").at(0).contains(key)) << key;
    for (const char* key : {"boundaries", "intervals", "observed_range"})
        EXPECT_TRUE(probe.at("significance_region").contains(key)) << key;
    for (const char* key : {"critical_value", "boundaries", "intervals"})
        EXPECT_TRUE(probe.at("simultaneous").contains(key)) << key;
    for (const char* key : {"at", "low", "high", "interval_kind", "inside_data", "form"})
        EXPECT_TRUE(probe.at("crossing").contains(key)) << key;
    EXPECT_EQ(probe.at("scale"), "model");  // a linear model: the coefficients' scale is the outcome's
    const double bx = coefficient(fit, "nitrogen_kg_ha"), bxz = coefficient(fit, "nitrogen_kg_ha×soil_moisture_pct");
    const auto& effects = probe.at("effects_at");
    EXPECT_NEAR(effects.at(0).at("effect").get<double>(), bx, 1e-15);  // closed form: effect(0) = b_x
    EXPECT_NEAR(effects.at(1).at("effect").get<double>(), bx + 20 * bxz, 1e-14);
    EXPECT_TRUE(effects.at(0).at("beyond_data").get<bool>());  // moisture 0 lies below the observed 12
    EXPECT_FALSE(effects.at(1).at("beyond_data").get<bool>());
    // crossover x* = -b_z / b_xz (closed form)
    EXPECT_NEAR(probe.at("crossing").at("at").get<double>(), -coefficient(fit, "soil_moisture_pct") / bxz, 1e-9);
    // an unbounded region is written with null
    bool has_null = false;
    for (const auto& r : probe.at("significance_region").at("intervals"))
        has_null |= r.at(0).is_null() || r.at(1).is_null();
    EXPECT_TRUE(has_null);
}

TEST(ProbeCli, PercentilesAndTextOutput) {
    auto r =
        run_cli({"probe", "--data", kData, "--outcome", "weekly_spend", "--interaction", "discount_pct,tenure_months",
                 "--focal", "discount_pct", "--moderator", "tenure_months", "--moderator-percentiles", "10,50,90"});
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    EXPECT_NE(r.out.find("Region of significance"), std::string::npos);
    EXPECT_NE(r.out.find("Cautions:"), std::string::npos);
    EXPECT_NE(r.out.find("not causal"), std::string::npos);
}

struct Refusal {
    std::vector<std::string> args;
    std::string message;
};

TEST(ProbeCli, RefusalsAreExplained) {
    const std::string sep = std::string(MODERATO_TEST_DATA_DIR) + "/bad/logistic_separated.csv";
    const std::vector<Refusal> cases{
        {{"probe", "--data", kData, "--outcome", "weekly_spend", "--predictors", "discount_pct,tenure_months",
          "--interaction", "discount_pct,loyalty_member", "--focal", "tenure_months", "--moderator", "loyalty_member"},
         "moderato-cli: focal predictor 'tenure_months' and moderator 'loyalty_member' share no product term, so "
         "the effect of 'tenure_months' does not depend on 'loyalty_member'; add --interaction "
         "tenure_months,loyalty_member"},
        {{"probe", "--data", kData, "--outcome", "weekly_spend", "--interaction", "discount_pct,loyalty_member",
          "--focal", "discount_pct", "--moderator", "shop"},
         "moderato-cli: moderator 'shop' is not in the model"},
        {{"probe", "--data", kData, "--outcome", "weekly_spend", "--interaction", "discount_pct,shop", "--focal",
          "discount_pct", "--moderator", "shop", "--moderator-values", "1,2"},
         "moderato-cli: --moderator-values and --moderator-percentiles need a numeric moderator; 'shop' is "
         "categorical, and its effects are given at every level"},
        {{"probe", "--data", kData, "--outcome", "weekly_spend", "--interaction", "discount_pct,loyalty_member",
          "--focal", "discount_pct", "--moderator", "loyalty_member", "--scale", "outcome"},
         "moderato-cli: --scale outcome applies to logistic, probit, poisson and negative-binomial models; a linear "
         "model's effects are already on the outcome's scale"},
        {{"probe", "--data", kData, "--outcome", "weekly_spend", "--interaction", "discount_pct,shop", "--focal",
          "discount_pct", "--moderator", "shop", "--adjust", "Holm"},
         "moderato-cli: option --adjust must be holm, bonferroni or none, got 'Holm'"},
        {{"probe", "--data", kData, "--outcome", "weekly_spend", "--interaction", "discount_pct,tenure_months",
          "--focal", "discount_pct", "--moderator", "tenure_months", "--adjust", "none"},
         "moderato-cli: option --adjust applies to the pairwise comparisons of a categorical moderator's levels; "
         "'tenure_months' is numeric"},
        {{"probe", "--data", sep, "--outcome", "y", "--interaction", "x,z", "--family", "logistic", "--focal", "x",
          "--moderator", "z"},
         ""},  // message checked by prefix below
    };
    for (const auto& c : cases) {
        auto r = run_cli(c.args);
        EXPECT_TRUE(r.exited) << r.describe();
        EXPECT_EQ(r.exit_code, 2) << r.describe();
        EXPECT_TRUE(r.out.empty());
        if (!c.message.empty()) EXPECT_EQ(r.err, c.message + "\n");
        else
            EXPECT_EQ(r.err.rfind("moderato-cli: the logistic fit shows separation, so its estimates", 0), 0u) << r.err;
    }
}

// Common practice for resampling code: one random stream per replicate makes
// the intervals identical whatever the thread count.
TEST(ProbeCli, BootstrapIsTheSameOnOneOrTwoThreads) {
    std::vector<std::string> args{"probe",
                                  "--data",
                                  kData,
                                  "--outcome",
                                  "weekly_spend",
                                  "--interaction",
                                  "discount_pct,loyalty_member",
                                  "--focal",
                                  "discount_pct",
                                  "--moderator",
                                  "loyalty_member",
                                  "--bootstrap",
                                  "200",
                                  "--seed",
                                  "11",
                                  "--format",
                                  "json"};
    auto one = args, two = args;
    one.insert(one.end(), {"--threads", "1"});
    two.insert(two.end(), {"--threads", "2"});
    const json a = run_json(one), b = run_json(two);
    ASSERT_TRUE(a.at("bootstrap").is_object());
    EXPECT_EQ(a.at("bootstrap").at("resampled"), b.at("bootstrap").at("resampled"));
    EXPECT_EQ(a.at("bootstrap").at("completed").get<int>(), 200);
    // the effect at loyalty_member = 0 equals the discount_pct coefficient (closed form), bootstrapped around it
    const auto& first = a.at("bootstrap").at("resampled").at(0);
    EXPECT_LT(first.at("percentile").at("low").get<double>(), first.at("value").get<double>());
    EXPECT_GT(first.at("percentile").at("high").get<double>(), first.at("value").get<double>());
}

TEST(ProbeCli, BootstrapRefusesTooFewRows) {
    auto r =
        run_cli({"probe", "--data", std::string(MODERATO_TEST_DATA_DIR) + "/bad/too_few_rows_for_bootstrap.csv",
                 "--outcome", "y", "--interaction", "x,z", "--focal", "x", "--moderator", "z", "--bootstrap", "200"});
    EXPECT_TRUE(r.exited && r.exit_code == 2) << r.describe();
    EXPECT_EQ(r.err,
              "moderato-cli: too few rows for the bootstrap: n = 9 rows for p = 4 coefficients; resampling needs at "
              "least 10 rows and at least twice as many rows as coefficients (here 10) — add rows or drop terms\n");
    EXPECT_TRUE(r.out.empty());
}

// Closed form: in the saturated 2 x 2 model each cell's prediction is its
// observed mean and the difference in differences is the product coefficient.
TEST(ProbeCli, TwoCategoricalPredictorsGiveTheCellTable) {
    const std::string data = moderato::test::sample_file("volunteer-onboarding", "volunteers.csv").string();
    const std::vector<std::string> model{
        "--data", data, "--outcome", "hours_q1", "--interaction", "onboarding,mentoring", "--format", "json"};
    std::vector<std::string> fit_args{"fit"}, probe_args{"probe", "--focal", "onboarding", "--moderator", "mentoring"};
    fit_args.insert(fit_args.end(), model.begin(), model.end());
    probe_args.insert(probe_args.end(), model.begin(), model.end());
    const json fit = run_json(fit_args), probe = run_json(probe_args);
    const auto& t = probe.at("cell_table");
    ASSERT_EQ(t.at("cells").size(), 4u);
    for (const auto& c : t.at("cells"))
        EXPECT_NEAR(c.at("value").get<double>(), c.at("observed_mean").get<double>(), 1e-10);
    ASSERT_EQ(t.at("interaction_contrasts").size(), 1u);
    EXPECT_NEAR(t.at("interaction_contrasts").at(0).at("value").get<double>(),
                coefficient(fit, "onboarding=online×mentoring=no mentor"), 1e-10);
}

// Closed form: the surface is b0 + b_x x + b_z z + b_xz x z at each grid point.
TEST(ProbeCli, SurfaceGridIsThePredictionOverBothPredictors) {
    const std::vector<std::string> model{"--data",     kOrchard,        "--outcome",
                                         "yield_t_ha", "--interaction", "nitrogen_kg_ha,soil_moisture_pct",
                                         "--format",   "json"};
    std::vector<std::string> fit_args{"fit"},
        probe_args{"probe", "--focal", "nitrogen_kg_ha", "--moderator", "soil_moisture_pct", "--surface", "5"};
    fit_args.insert(fit_args.end(), model.begin(), model.end());
    probe_args.insert(probe_args.end(), model.begin(), model.end());
    const json fit = run_json(fit_args), probe = run_json(probe_args);
    const auto& s = probe.at("surface");
    const double b0 = coefficient(fit, "intercept"), bx = coefficient(fit, "nitrogen_kg_ha"),
                 bz = coefficient(fit, "soil_moisture_pct"), bxz = coefficient(fit, "nitrogen_kg_ha×soil_moisture_pct");
    ASSERT_EQ(s.at("x_values").size(), 5u);
    for (std::size_t k = 0; k < 5; ++k)
        for (std::size_t i = 0; i < 5; ++i) {
            const double x = s.at("x_values").at(i), z = s.at("z_values").at(k);
            EXPECT_NEAR(s.at("predicted").at(k).at(i).get<double>(), b0 + bx * x + bz * z + bxz * x * z, 1e-9);
        }
}

TEST(ProbeCli, TheModeratorsShapeIsReportedAndAgreesWithScipy) {
    const json j = run_json({"probe", "--data", kOrchard, "--outcome", "yield_t_ha", "--predictors", "slope_pct",
                             "--interaction", "nitrogen_kg_ha,soil_moisture_pct", "--focal", "nitrogen_kg_ha",
                             "--moderator", "soil_moisture_pct", "--format", "json"});
    // scipy 1.10.1 stats.skew(bias=True) and numpy 1.24.2 percentile (linear) on the 480 rows used.
    EXPECT_NEAR(j.at("moderator_skew").get<double>(), -0.08505456207039845, 1e-12);
    const auto pct = j.at("moderator_percentiles").get<std::vector<double>>();
    ASSERT_EQ(pct.size(), 3u);
    EXPECT_NEAR(pct[0], 14.5, 1e-12);
    EXPECT_NEAR(pct[1], 25.7, 1e-12);
    EXPECT_NEAR(pct[2], 35.7, 1e-12);
    // Not skewed, and mean ± SD (17.56 to 32.97) lies inside 12 to 37.9: mean and ± 1 SD.
    EXPECT_EQ(j.at("values_from"), "mean-sd");
    EXPECT_NEAR(j.at("effects_at").at(1).at("moderator_value").get<double>(), j.at("moderator_mean").get<double>(),
                1e-12);
}
