// moderato-cli probe --bins / --smooth: the JSON contract (docs/cli-output.md)
// and its numbers against statsmodels 0.13 (the linearity_ols fixture of
// tests/reference/make_linearity_reference.py: OLS wald_test of the bin
// terms, WLS at each kernel grid point), thread independence of the band,
// and the refusals.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include "cli/cli_json.hpp"
#include "cli/cli_runner.hpp"
#include "common/reference_fixtures.hpp"
#include "common/sample_projects.hpp"
#include "common/tolerance.hpp"

using moderato::test::rel;
using moderato::test::run_cli;
using nlohmann::json;

namespace {

const auto kFixture = moderato::test::reference_fixture("linearity_ols.json");

std::vector<std::string> model_args(std::vector<std::string> extra) {
    std::vector<std::string> a{"probe",
                               "--data",
                               (kFixture.parent_path() / "linearity_ols.csv").string(),
                               "--outcome",
                               "y",
                               "--predictors",
                               "x,w,c",
                               "--interaction",
                               "x,w",
                               "--focal",
                               "x",
                               "--moderator",
                               "w"};
    a.insert(a.end(), extra.begin(), extra.end());
    return a;
}

}  // namespace

TEST(LinearityCli, BinsAndSmoothAgreeWithStatsmodels) {
    const json ref = moderato::test::read_fixture_json(kFixture);
    const json out = moderato::test::json_output(run_cli(model_args(
        {"--bins", "3", "--smooth", "--bandwidth", "1.2", "--bootstrap", "100", "--seed", "9", "--format", "json"})));
    const json& b = out.at("binned");
    for (const char* key : {"count", "cut_points", "bins", "linearity_test", "sentence", "cautions"})
        EXPECT_TRUE(b.contains(key)) << key;
    const json& cls = ref.at("bins").at("3").at("by_se").at("classical");
    for (int j = 0; j < 3; ++j) {
        const json& bin = b.at("bins").at(j);
        for (const char* key : {"moderator_value", "effect", "se", "low", "high", "rows", "range"})
            EXPECT_TRUE(bin.contains(key)) << key;
        EXPECT_LE(rel(bin.at("effect").get<double>(), cls.at("effects").at(j).get<double>()), 1e-8);  // statsmodels
        EXPECT_LE(rel(bin.at("se").get<double>(), cls.at("std_errors").at(j).get<double>()), 1e-8);   // statsmodels
    }
    const json& t = b.at("linearity_test");
    EXPECT_EQ(t.at("distribution"), "F");
    EXPECT_LE(rel(t.at("value").get<double>(), cls.at("linearity").at("statistic").get<double>()), 1e-8);  // wald_test
    EXPECT_EQ(t.at("df2").get<double>(), cls.at("linearity").at("df2").get<double>());
    EXPECT_TRUE(b.at("straight_line_contradicted").get<bool>());  // the data bend by construction

    const json& s = out.at("smooth");
    EXPECT_EQ(s.at("bandwidth_method"), "given");
    EXPECT_EQ(s.at("replicates").get<int>(), 100);
    const json& kernel = ref.at("kernel");
    ASSERT_EQ(s.at("points").size(), 50u);
    for (std::size_t g = 0; g < 50; g += 7)  // statsmodels WLS at the grid point, bandwidth 1.2
        EXPECT_LE(rel(s.at("points").at(g).at("effect").get<double>(), kernel.at("effects").at(g).get<double>()), 1e-8);
    EXPECT_TRUE(out.at("common_support").contains("thin_stretches"));
}

// The band comes from per-replicate random streams: one thread or two give
// the same numbers, and so does the cross-validated bandwidth.
TEST(LinearityCli, SmoothBandIsTheSameOnOneOrTwoThreads) {
    auto run = [](const char* threads) {
        return moderato::test::json_output(run_cli(
            model_args({"--smooth", "--bootstrap", "100", "--seed", "3", "--threads", threads, "--format", "json"})));
    };
    const json one = run("1"), two = run("2");
    EXPECT_EQ(one.at("smooth").at("points"), two.at("smooth").at("points"));
    EXPECT_EQ(one.at("smooth").at("bandwidth_method"), "cross-validation");
    EXPECT_EQ(one.at("smooth").at("bandwidth"), two.at("smooth").at("bandwidth"));
}

TEST(LinearityCli, TextSaysWhetherTheLineHolds) {
    const auto r = run_cli(model_args({"--bins", "4"}));
    ASSERT_EQ(r.exit_code, 0) << r.describe();
    EXPECT_NE(r.out.find("Binned effects of x across w (4 bins"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("contradict the straight-line effect of x across w"), std::string::npos) << r.out;
}

TEST(LinearityCli, RefusalsNameTheOption) {
    const std::vector<std::pair<std::vector<std::string>, std::string>> cases{
        {{"--bandwidth", "1"}, "option --bandwidth goes with --smooth"},
        {{"--smooth", "--bandwidth", "0"}, "option --bandwidth must be a positive number, got '0'"},
        {{"--smooth", "--bandwidth", "-2"}, "option --bandwidth must be a positive number, got '-2'"},
        {{"--bins", "1"}, "--bins"},
        {{"--bins", "400"}, "--bins"},
    };
    for (const auto& [extra, message] : cases) {
        const auto r = run_cli(model_args(extra));
        EXPECT_EQ(r.exit_code, 2) << r.describe();
        EXPECT_NE(r.err.find(message), std::string::npos) << r.describe();
    }
}
