// moderato-cli fit and probe with groups: the JSON contract of a multilevel
// fit (estimation, log_likelihood, random_effects, each term's df), its
// numbers against statsmodels 0.13 MixedLM (tests/reference/fixtures/
// mixed_slope.json, REML, full covariance, where statsmodels reached the
// optimum), the probe's closed forms (b_x + m b_xz; the groups' slope SD
// √τ11), and the messages for multilevel options without groups.
#include <gtest/gtest.h>

#include <cmath>
#include <nlohmann/json.hpp>

#include "cli/cli_json.hpp"
#include "cli/cli_runner.hpp"
#include "common/reference_fixtures.hpp"

using moderato::test::run_cli;
using nlohmann::json;

namespace {

std::vector<std::string> teams_model(std::vector<std::string> args) {
    for (const char* a : {"--data", "", "--outcome", "score", "--interaction", "hours,climate", "--groups", "team",
                          "--random-slopes", "hours", "--categorical", "team", "--format", "json"})
        args.push_back(a);
    args[args.size() - 13] = moderato::test::reference_fixture("mixed_teams.csv").string();
    return args;
}

}  // namespace

TEST(MultilevelCli, FitJsonHoldsTheRandomPartAndStatsmodelsNumbers) {
    const json fit = moderato::test::json_output(run_cli(teams_model({"fit", "--group-effects"})));
    const auto ref = moderato::test::read_fixture_json(moderato::test::reference_fixture("mixed_slope.json"));
    const json& sm = ref.at("fits").at(0);
    ASSERT_EQ(sm.at("estimation"), "reml");
    ASSERT_EQ(sm.at("covariance"), "full");
    EXPECT_EQ(fit.at("estimation"), "reml");
    EXPECT_EQ(fit.at("df_method"), "satterthwaite");
    EXPECT_NEAR(fit.at("log_likelihood").get<double>(), sm.at("criterion").get<double>(), 1e-6);
    const json& re = fit.at("random_effects");
    for (const char* key : {"groups", "groups_count", "terms", "covariance", "residual_variance", "singular"})
        EXPECT_TRUE(re.contains(key)) << key;
    EXPECT_EQ(re.at("groups"), "team");
    EXPECT_EQ(re.at("groups_count"), 45);
    EXPECT_EQ(re.at("terms"), json({"intercept", "hours"}));
    EXPECT_FALSE(re.at("singular").get<bool>());
    EXPECT_NEAR(re.at("covariance")[1][1].get<double>(), sm.at("random_covariance")[1][1].get<double>(), 1e-5);
    EXPECT_EQ(re.at("group_effects").size(), 45u);
    for (std::size_t k = 0; k < 4; ++k) {
        const json& t = fit.at("terms")[k];
        const double b = sm.at("fixed_effects")[k].get<double>();
        EXPECT_NEAR(t.at("value").get<double>(), b, 1e-5 * (1 + std::abs(b))) << t.at("name");
        EXPECT_GT(t.at("df").get<double>(), 20);  // Satterthwaite: about the number of teams, not of rows
        EXPECT_LT(t.at("df").get<double>(), 45);
    }
    const auto slope_test = re.at("random_slope_tests").at(0);
    EXPECT_EQ(slope_test.at("mixture_df"), json({1, 2}));
}

TEST(MultilevelCli, ProbeGivesEffectsAndTheGroupsSlopeSpread) {
    const json fit = moderato::test::json_output(run_cli(teams_model({"fit"})));
    const json probe = moderato::test::json_output(
        run_cli(teams_model({"probe", "--focal", "hours", "--moderator", "climate", "--moderator-values", "1"})));
    const double bx = fit.at("terms")[1].at("value").get<double>(), bxz = fit.at("terms")[3].at("value").get<double>();
    EXPECT_NEAR(probe.at("effects_at")[0].at("effect").get<double>(), bx + bxz, 1e-12);  // closed form
    EXPECT_DOUBLE_EQ(probe.at("df").get<double>(), fit.at("terms")[3].at("df").get<double>());
    const double tau = fit.at("random_effects").at("covariance")[1][1].get<double>();
    EXPECT_NEAR(probe.at("group_slopes").at("sd").get<double>(), std::sqrt(tau), 1e-12);
    EXPECT_NEAR(probe.at("group_slopes").at("critical_value").get<double>(), 1.959963984540054, 1e-9);  // from memory
}

TEST(MultilevelCli, MultilevelOptionsWithoutGroupsAreRefused) {
    const std::string data = moderato::test::reference_fixture("mixed_teams.csv").string();
    const auto r =
        run_cli({"fit", "--data", data, "--outcome", "score", "--predictors", "hours", "--random-slopes", "hours"});
    EXPECT_EQ(r.exit_code, 2);
    EXPECT_NE(r.err.find("--random-slopes belongs to a multilevel model"), std::string::npos) << r.err;
    const auto bad = run_cli(teams_model({"fit", "--estimation", "bayes"}));
    EXPECT_EQ(bad.exit_code, 2);
    EXPECT_NE(bad.err.find("unknown estimation 'bayes'; use reml or ml"), std::string::npos) << bad.err;
}

// Resampling rows would break up the groups: the bootstrap is refused with a
// message (it once crashed on the groups of the original rows).
TEST(MultilevelCli, TheBootstrapIsRefusedForMultilevelModels) {
    const auto r = run_cli(
        teams_model({"probe", "--focal", "hours", "--moderator", "climate", "--bootstrap", "200", "--seed", "1"}));
    EXPECT_TRUE(r.exited);
    EXPECT_EQ(r.exit_code, 2);
    EXPECT_NE(r.err.find("the bootstrap is not offered for multilevel models (groups 'team')"), std::string::npos)
        << r.err;
}
