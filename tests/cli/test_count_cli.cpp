// moderato-cli with --family probit|poisson|negative-binomial and --exposure:
// the JSON contract (docs/cli-output.md) and its numbers against statsmodels
// 0.13 (fixtures of tests/reference/make_count_reference.py, each value's
// statsmodels call named in its "source"), and the refusals users read.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include "cli/cli_json.hpp"
#include "cli/cli_runner.hpp"
#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"

using moderato::test::rel;
using moderato::test::run_cli;
using nlohmann::json;

namespace {

std::string data_of(const char* fixture) {
    const auto path = moderato::test::reference_fixture(std::string(fixture) + ".json");
    return (path.parent_path() / moderato::test::read_fixture_json(path).at("data").get<std::string>()).string();
}

}  // namespace

TEST(CountCli, PoissonWithExposureProbedOnTheRateScale) {
    const json ref = moderato::test::read_fixture_json(moderato::test::reference_fixture("poisson_exposure.json"));
    const json& rr = ref.at("rate_ratios");
    std::string at;
    for (const json& row : rr.at("rows")) at += (at.empty() ? "" : ",") + row.at("at").dump();
    const json out = moderato::test::json_output(run_cli({"probe",
                                                          "--data",
                                                          data_of("poisson_exposure"),
                                                          "--outcome",
                                                          "y",
                                                          "--predictors",
                                                          "g,w,x",
                                                          "--interaction",
                                                          "g,w",
                                                          "--family",
                                                          "poisson",
                                                          "--exposure",
                                                          "months",
                                                          "--focal",
                                                          "g",
                                                          "--moderator",
                                                          "w",
                                                          "--moderator-values",
                                                          at,
                                                          "--format",
                                                          "json"}));
    EXPECT_EQ(out.at("family"), "poisson");
    EXPECT_EQ(out.at("exposure"), "months");
    const json fit = moderato::test::json_output(
        run_cli({"fit", "--data", data_of("poisson_exposure"), "--outcome", "y", "--predictors", "g,w,x",
                 "--interaction", "g,w", "--family", "poisson", "--exposure", "months", "--format", "json"}));
    // statsmodels GLM(..., Poisson(), offset=log(months)); overdispersion by numpy OLS (fixture "source")
    EXPECT_LE(rel(fit.at("log_likelihood").get<double>(), ref.at("fit").at("log_likelihood").get<double>()), 1e-8);
    const json& od = fit.at("overdispersion");
    EXPECT_LE(rel(od.at("pearson_ratio").get<double>(), ref.at("overdispersion").at("pearson_ratio").get<double>()),
              1e-8);
    EXPECT_LE(rel(od.at("test_value").get<double>(), ref.at("overdispersion").at("test_value").get<double>()), 1e-8);
    ASSERT_EQ(out.at("rate_ratios").size(), rr.at("rows").size());
    for (std::size_t k = 0; k < rr.at("rows").size(); ++k) {
        const json& mine = out.at("rate_ratios")[k];
        const json& row = rr.at("rows")[k];
        EXPECT_LE(rel(mine.at("ratio").get<double>(), row.at("rate_ratio").get<double>()), 1e-8);
        EXPECT_LE(rel(mine.at("low").get<double>(), row.at("ci_lower_95").get<double>()), 1e-8);
        EXPECT_LE(rel(mine.at("high").get<double>(), row.at("ci_upper_95").get<double>()), 1e-8);
    }
}

TEST(CountCli, NegativeBinomialReportsAlpha) {
    const json ref = moderato::test::read_fixture_json(moderato::test::reference_fixture("negbin_counts.json"));
    const json out = moderato::test::json_output(
        run_cli({"fit", "--data", data_of("negbin_counts"), "--outcome", "y", "--predictors", "x,w,g", "--interaction",
                 "x,w", "--family", "negative-binomial", "--cluster", "site", "--format", "json"}));
    const json& disp = out.at("dispersion");
    // statsmodels NegativeBinomial(loglike_method='nb2'), cluster covariance
    EXPECT_LE(rel(disp.at("alpha").get<double>(), ref.at("dispersion").at("alpha").get<double>()), 1e-6);
    EXPECT_LE(rel(disp.at("se").get<double>(), ref.at("dispersion").at("std_errors").at("cluster").get<double>()),
              1e-6);
    EXPECT_LT(disp.at("low").get<double>(), disp.at("alpha").get<double>());
    EXPECT_TRUE(out.at("exposure").is_null());
    EXPECT_FALSE(out.contains("overdispersion"));
}

TEST(CountCli, OutcomeScaleForProbitAndTextInTheFamilysWords) {
    const auto r = run_cli({"probe", "--data", data_of("probit_binary"), "--outcome", "y", "--predictors", "x,w,g",
                            "--interaction", "x,w", "--family", "probit", "--focal", "x", "--moderator", "w", "--scale",
                            "outcome"});
    ASSERT_EQ(r.exit_code, 0) << r.describe();
    EXPECT_NE(r.out.find("(probability scale)"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("Interaction on the probability scale"), std::string::npos);
    EXPECT_NE(r.out.find("probit scale"), std::string::npos);
    const auto fit = run_cli({"fit", "--data", data_of("poisson_counts"), "--outcome", "y", "--predictors", "x,w,g",
                              "--interaction", "x,w", "--family", "poisson"});
    EXPECT_NE(fit.out.find("Poisson model of y (counts, log expected count scale)"), std::string::npos) << fit.out;
    EXPECT_NE(fit.out.find("overdispersion: Pearson χ²/df"), std::string::npos);
}

TEST(CountCli, RefusalsNameTheProblem) {
    struct Case {
        std::vector<std::string> extra;
        std::string message;
    };
    const std::vector<Case> cases{
        {{"--family", "linear", "--exposure", "months"},
         "moderato-cli: an exposure column ('months') applies to poisson and negative-binomial models only; this is "
         "a linear model"},
        {{"--family", "poisson", "--exposure", "nothere"}, "moderato-cli: exposure column 'nothere' not found"},
        {{"--family", "poisson", "--exposure", "months", "--se", "hc3"},
         "moderato-cli: hc3 is not offered for poisson models; use classical (model-based), hc0 or hc1 (sandwich), "
         "or cluster"},
    };
    for (const Case& c : cases) {
        std::vector<std::string> args{"fit",          "--data", data_of("poisson_exposure"), "--outcome", "y",
                                      "--predictors", "g,w,x"};
        args.insert(args.end(), c.extra.begin(), c.extra.end());
        const auto r = run_cli(args);
        EXPECT_EQ(r.exit_code, 2) << r.describe();
        EXPECT_EQ(r.err, c.message + "\n");
    }
}
