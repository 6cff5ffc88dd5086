// output_version 2, the JSON contract of ARCHITECTURE.md ("The headless CLI";
// every field in docs/cli-output.md): every name of the contract is written,
// no name or word of version 1 is left in any command's JSON (each document
// is walked to its leaves), and the numbers under the new names are still the
// outside sources' numbers:
//   statsmodels 0.13 fixtures (tests/reference/make_statsmodels_reference.py
//   and make_logit_effects_reference.py: the build's live run when present,
//   else the committed tests/reference/fixtures), and
//   closed forms on tests/data/ok/slope_five_fourteenths.csv (x = 0, 1, 3
//   twice, y = 0, 0, 1 twice): slope 5/14, intercept −1/7, RSS 1/7 on 4 df,
//   Sxx = 28/3, so SE(slope) = √3/28, t = 10/√3, R² = 25/28, F = 100/3.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <numbers>
#include <string>
#include <vector>

#include "cli_json.hpp"
#include "cli_runner.hpp"
#include "common/reference_fixtures.hpp"
#include "common/sample_projects.hpp"
#include "common/tolerance.hpp"

namespace {

namespace fs = std::filesystem;
using moderato::test::expect_version_two;
using moderato::test::rel;
using moderato::test::run_cli;
using moderato::test::RunResult;
using nlohmann::json;

const std::string kData = MODERATO_TEST_DATA_DIR;
const std::string kSamples = moderato::test::samples_dir().string();

// The folder of the statsmodels fixtures: the build's live run, else the committed one.
fs::path fixtures() { return moderato::test::reference_fixture_dir("ols_binary_continuous.json"); }

json fixture(const std::string& name) { return moderato::test::read_fixture_json(fixtures() / name); }

// Runs the CLI with --format json; checks the document is version 2 and
// free of version-1 words; returns it parsed.
json run_json(std::vector<std::string> args) {
    args.push_back("--format");
    args.push_back("json");
    const RunResult r = run_cli(args);
    const json j = moderato::test::json_output(r);
    expect_version_two(r.out, j, args.front() + " " + (args.size() > 1 ? args[1] : ""));
    return j;
}

const json& term(const json& fit, const std::string& name) {
    for (const auto& t : fit.at("terms"))
        if (t.at("name") == name) return t;
    ADD_FAILURE() << "no term " << name;
    static const json none = json::object();
    return none;
}

std::string number(double v) {
    char buf[40];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}

// Two-sided p of Student's t with 4 df, and its CDF (closed form for ν = 4:
// F(t) = 1/2 + t (t² + 6) / (2 (t² + 4)^{3/2})).
double t4_cdf(double t) { return 0.5 + t * (t * t + 6) / (2 * std::pow(t * t + 4, 1.5)); }

}  // namespace

// ------------------------------------------------------------------ fit

TEST(OutputContract, FitTermsAreStatsmodelsHc3) {
    const json ref = fixture("ols_binary_continuous.json");
    const json& hc3 = ref.at("covariances").at("hc3");
    const json j = run_json({"fit", "--data", (fixtures() / "ols_binary_continuous.csv").string(), "--outcome", "y",
                             "--interaction", "x,g", "--se", "hc3"});
    EXPECT_EQ(j.at("standard_errors"), "hc3");
    EXPECT_EQ(j.at("test"), "t");                                         // statsmodels use_t=True
    EXPECT_EQ(j.at("residual_df"), ref.at("df_residual").get<double>());  // statsmodels df_resid
    EXPECT_EQ(j.at("rows_used"), ref.at("n").get<double>());              // statsmodels nobs
    EXPECT_EQ(j.at("not_estimated"), json::array());
    const auto& names = ref.at("terms");
    ASSERT_EQ(j.at("terms").size(), names.size());
    for (std::size_t k = 0; k < names.size(); ++k) {
        const json& t = term(j, names[k].get<std::string>());
        SCOPED_TRACE(names[k].get<std::string>());
        // statsmodels 0.13 OLS cov_type='HC3': params, bse, tvalues, pvalues, conf_int()
        EXPECT_LE(rel(t.at("value"), ref.at("estimates")[k]), 1e-8);
        EXPECT_LE(rel(t.at("se"), hc3.at("std_errors")[k]), 1e-8);
        EXPECT_LE(rel(t.at("test_value"), hc3.at("statistics")[k]), 1e-8);
        EXPECT_LE(rel(t.at("p"), hc3.at("p_values")[k]), 1e-6);
        EXPECT_LE(rel(t.at("low"), hc3.at("ci_lower_95")[k]), 1e-8);
        EXPECT_LE(rel(t.at("high"), hc3.at("ci_upper_95")[k]), 1e-8);
        for (std::size_t m = 0; m < names.size(); ++m)  // statsmodels cov_params(), the same order
            EXPECT_NEAR(
                j.at("covariance")[k][m].get<double>(), hc3.at("covariance")[k][m].get<double>(),
                1e-8 * std::sqrt(hc3.at("covariance")[k][k].get<double>() * hc3.at("covariance")[m][m].get<double>()));
    }
}

TEST(OutputContract, FitStatisticsAreStatsmodelsModelBased) {
    const json ref = fixture("ols_binary_continuous.json");
    const json& fit = ref.at("fit");  // statsmodels OLS nonrobust
    const json j = run_json({"fit", "--data", (fixtures() / "ols_binary_continuous.csv").string(), "--outcome", "y",
                             "--interaction", "x,g"});
    EXPECT_EQ(j.at("standard_errors"), "model-based");
    EXPECT_LE(rel(j.at("r2"), fit.at("r_squared")), 1e-8);
    EXPECT_LE(rel(j.at("r2_adjusted"), fit.at("adj_r_squared")), 1e-8);
    EXPECT_LE(rel(j.at("residual_sd"), fit.at("residual_sd")), 1e-8);
    EXPECT_LE(rel(j.at("log_likelihood"), fit.at("log_likelihood")), 1e-8);
    EXPECT_LE(rel(j.at("aic"), fit.at("aic")), 1e-8);
    EXPECT_LE(rel(j.at("bic"), fit.at("bic")), 1e-8);
    const json& overall = j.at("overall_test");
    EXPECT_EQ(overall.at("distribution"), "F");
    EXPECT_LE(rel(overall.at("value"), fit.at("f_statistic")), 1e-8);
    EXPECT_LE(rel(overall.at("p"), fit.at("f_p_value")), 1e-6);
    EXPECT_EQ(overall.at("df1").get<double>(), fit.at("df_model").get<double>());
    EXPECT_EQ(overall.at("df2").get<double>(), ref.at("df_residual").get<double>());
    // The model without x×g: statsmodels wald_test of x×g with this covariance (F = W/q).
    const json& wald = ref.at("covariances").at("classical").at("wald_interactions");
    const json& without = j.at("without_products");
    EXPECT_EQ(without.at("dropped_terms"), json::array({"x×g"}));
    EXPECT_LE(rel(without.at("wald").at("value"), wald.at("statistic")), 1e-8);
    EXPECT_LE(rel(without.at("wald").at("p"), wald.at("p_value")), 1e-6);
}

TEST(OutputContract, LogisticFitIsStatsmodelsLogit) {
    const json ref = fixture("logit_interaction.json");
    const json& fit = ref.at("fit");  // statsmodels Logit.fit(method='newton')
    const json j = run_json({"fit", "--data", (fixtures() / "logit_interaction.csv").string(), "--outcome", "y",
                             "--interaction", "x,g", "--family", "logistic"});
    EXPECT_EQ(j.at("family"), "logistic");
    EXPECT_EQ(j.at("test"), "z");  // statsmodels Logit: normal reference
    EXPECT_TRUE(j.at("r2").is_null());
    EXPECT_TRUE(j.at("residual_sd").is_null());
    const auto& names = ref.at("terms");
    for (std::size_t k = 0; k < names.size(); ++k) {
        SCOPED_TRACE(names[k].get<std::string>());
        const json& t = term(j, names[k].get<std::string>());
        EXPECT_LE(rel(t.at("value"), ref.at("estimates")[k]), 1e-8);
        EXPECT_LE(rel(t.at("se"), ref.at("covariances").at("classical").at("std_errors")[k]), 1e-8);
        EXPECT_LE(rel(t.at("test_value"), ref.at("covariances").at("classical").at("statistics")[k]), 1e-8);
    }
    // statsmodels llr, llr_pvalue, df_model: the likelihood-ratio test of every term.
    const json& overall = j.at("overall_test");
    EXPECT_EQ(overall.at("distribution"), "chi-square");
    EXPECT_LE(rel(overall.at("value"), fit.at("lr_statistic")), 1e-8);
    EXPECT_LE(rel(overall.at("p"), fit.at("lr_p_value")), 1e-6);
    EXPECT_EQ(overall.at("df1").get<double>(), fit.at("df_model").get<double>());
    EXPECT_TRUE(overall.at("df2").is_null());
    EXPECT_LE(rel(j.at("log_likelihood"), fit.at("log_likelihood")), 1e-8);
    EXPECT_LE(rel(j.at("aic"), fit.at("aic")), 1e-8);
    EXPECT_LE(rel(j.at("bic"), fit.at("bic")), 1e-8);
    EXPECT_LE(rel(j.at("deviance"), fit.at("deviance")), 1e-8);
    EXPECT_LE(rel(j.at("r2_mcfadden"), fit.at("mcfadden_r2")), 1e-8);
}

TEST(OutputContract, FitValuesMatchTheClosedForm) {
    const json j =
        run_json({"fit", "--data", kData + "/ok/slope_five_fourteenths.csv", "--outcome", "y", "--predictors", "x"});
    const json& slope = term(j, "x");
    const double se = std::sqrt(3.0) / 28, t = 10 / std::sqrt(3.0), p = 2 * (1 - t4_cdf(t));  // closed form
    EXPECT_NEAR(slope.at("value").get<double>(), 5.0 / 14, 1e-14);
    EXPECT_NEAR(slope.at("se").get<double>(), se, 1e-14);
    EXPECT_NEAR(slope.at("test_value").get<double>(), t, 1e-12);
    EXPECT_NEAR(slope.at("p").get<double>(), p, 1e-12);
    // The interval: value ± q·SE, q the 97.5% point of t with 4 df (closed-form CDF above).
    const double q = j.at("critical_value").get<double>();
    EXPECT_NEAR(t4_cdf(q), 0.975, 1e-12);
    EXPECT_NEAR(slope.at("low").get<double>(), 5.0 / 14 - q * se, 1e-13);
    EXPECT_NEAR(slope.at("high").get<double>(), 5.0 / 14 + q * se, 1e-13);
    EXPECT_EQ(j.at("residual_df"), 4);
    EXPECT_NEAR(j.at("r2").get<double>(), 25.0 / 28, 1e-14);
    EXPECT_NEAR(j.at("r2_adjusted").get<double>(), 1 - (5.0 / 4) * (3.0 / 28), 1e-14);  // 1 − (n−1)/(n−p)(1 − R²)
    EXPECT_NEAR(j.at("residual_sd").get<double>(), std::sqrt(1.0 / 28), 1e-14);
    EXPECT_NEAR(j.at("overall_test").at("value").get<double>(), 100.0 / 3, 1e-11);  // F = t²
    EXPECT_NEAR(j.at("overall_test").at("p").get<double>(), p, 1e-12);
    EXPECT_EQ(j.at("overall_test").at("df1"), 1);
    EXPECT_EQ(j.at("overall_test").at("df2"), 4);
    // Gaussian log-likelihood at the MLE of σ² = RSS/n = 1/42 (closed form).
    const double ll = -3 * (std::log(2 * std::numbers::pi) + std::log(1.0 / 42) + 1);
    EXPECT_NEAR(j.at("log_likelihood").get<double>(), ll, 1e-12);
}

// ------------------------------------------------------------------ probe

TEST(OutputContract, ProbeEffectsAreStatsmodelsLinearCombinations) {
    const json ref = fixture("ols_binary_continuous.json");
    std::vector<double> at;
    std::vector<json> expected;
    for (const auto& c : ref.at("conditional_effects"))
        if (c.at("focal") == "g" && c.at("se") == "hc3") {
            at.push_back(c.at("at").get<double>());
            expected.push_back(c);
        }
    ASSERT_EQ(at.size(), 3u);
    const json j = run_json({"probe", "--data", (fixtures() / "ols_binary_continuous.csv").string(), "--outcome", "y",
                             "--interaction", "x,g", "--se", "hc3", "--focal", "g", "--moderator", "x",
                             "--moderator-values", number(at[0]) + "," + number(at[1]) + "," + number(at[2])});
    EXPECT_EQ(j.at("focal"), "g");
    EXPECT_EQ(j.at("moderator"), "x");
    EXPECT_EQ(j.at("scale"), "model");
    EXPECT_EQ(j.at("df"), 396);  // statsmodels df_resid
    // statsmodels conf_int(): (high − low) / (2 SE) of any coefficient is the same t quantile.
    const json& hc3 = ref.at("covariances").at("hc3");
    const double q = (hc3.at("ci_upper_95")[1].get<double>() - hc3.at("ci_lower_95")[1].get<double>()) /
                     (2 * hc3.at("std_errors")[1].get<double>());
    EXPECT_NEAR(j.at("critical_value").get<double>(), q, 1e-9);
    const auto& effects = j.at("effects_at");
    ASSERT_EQ(effects.size(), 3u);
    for (std::size_t k = 0; k < 3; ++k) {
        SCOPED_TRACE(expected[k].at("at_label").get<std::string>());
        const json& e = effects[k];
        // statsmodels t_test of the linear combination b[g] + m·b[x×g] with HC3
        EXPECT_LE(rel(e.at("moderator_value"), at[k]), 1e-15);
        EXPECT_LE(rel(e.at("effect"), expected[k].at("estimate")), 1e-8);
        EXPECT_LE(rel(e.at("se"), expected[k].at("std_error")), 1e-8);
        EXPECT_LE(rel(e.at("test_value"), expected[k].at("statistic")), 1e-8);
        EXPECT_LE(rel(e.at("p"), expected[k].at("p_value")), 1e-6);
        EXPECT_NEAR(e.at("low").get<double>(), e.at("effect").get<double>() - q * e.at("se").get<double>(), 1e-9);
        EXPECT_NEAR(e.at("high").get<double>(), e.at("effect").get<double>() + q * e.at("se").get<double>(), 1e-9);
        EXPECT_FALSE(e.at("beyond_data").get<bool>());  // mean ± SD lies inside the data
    }
}

// Outcome scale of a logistic model: effects on the probability against
// statsmodels predictions differentiated numerically (about 7 digits).
TEST(OutputContract, OutcomeScaleEffectsAreStatsmodelsProbabilityEffects) {
    const json ref = fixture("logit_effects.json");
    const json j = run_json({"probe", "--data", (fixtures() / "logit_interaction.csv").string(), "--outcome", "y",
                             "--interaction", "x,g", "--family", "logistic", "--focal", "x", "--moderator", "g",
                             "--scale", "outcome", "--moderator-values", "0,1"});
    EXPECT_EQ(j.at("scale"), "outcome");
    EXPECT_EQ(j.at("averaging"), "sample");
    EXPECT_TRUE(j.at("df").is_null());  // a normal reference
    int checked = 0;
    for (const auto& c : ref.at("cases")) {
        if (c.at("focal") != "x" || c.at("averaging") != "sample") continue;
        if (c.at("quantity") == "effect") {
            const json& e = j.at("effects_at").at(c.at("at").get<double>() == 0 ? 0 : 1);
            EXPECT_LE(rel(e.at("effect"), c.at("estimate")), 1e-6);
            EXPECT_LE(rel(e.at("se"), c.at("std_error")), 1e-6);
            ++checked;
        } else {
            const json& ie = j.at("interaction_on_outcome_scale");
            EXPECT_EQ(ie.at("kind"), c.at("kind"));
            EXPECT_LE(rel(ie.at("value"), c.at("estimate")), 1e-6);
            EXPECT_LE(rel(ie.at("se"), c.at("std_error")), 1e-6);
            ++checked;
        }
    }
    EXPECT_EQ(checked, 3);
}

TEST(OutputContract, ProbeWritesEveryContractName) {
    const std::string data = kSamples + "/orchard-nitrogen/plots.csv";
    const json j =
        run_json({"probe", "--data", data, "--outcome", "yield_t_ha", "--interaction",
                  "nitrogen_kg_ha,soil_moisture_pct", "--focal", "nitrogen_kg_ha", "--moderator", "soil_moisture_pct"});
    for (const char* key :
         {"focal", "moderator", "scale", "level", "df", "critical_value", "effects_at", "significance_region",
          "simultaneous", "crossing", "moderator_skew", "moderator_percentiles", "values_from"})
        EXPECT_TRUE(j.contains(key)) << key;
    for (const auto& e : j.at("effects_at"))
        for (const char* key : {"moderator_value", "effect", "se", "test_value", "p", "low", "high", "beyond_data"})
            EXPECT_TRUE(e.contains(key)) << key;
    for (const char* key : {"boundaries", "intervals", "observed_range"})
        EXPECT_TRUE(j.at("significance_region").contains(key)) << key;
    for (const char* key : {"critical_value", "boundaries", "intervals"})
        EXPECT_TRUE(j.at("simultaneous").contains(key)) << key;
    for (const char* key : {"at", "low", "high", "interval_kind", "inside_data", "form"})
        EXPECT_TRUE(j.at("crossing").contains(key)) << key;
    // Intervals are [lo, hi] pairs; the boundaries are their finite ends (closed form of a region).
    for (const auto& pair : j.at("significance_region").at("intervals")) {
        ASSERT_EQ(pair.size(), 2u);
        for (const auto& end : pair)
            if (!end.is_null()) {
                bool listed = false;
                for (const auto& b : j.at("significance_region").at("boundaries")) listed |= b == end;
                EXPECT_TRUE(listed) << end;
            }
    }
}

// ------------------------------------------------------------------ every command

// Each command's JSON, in every shape it takes, is version 2 through and
// through (run_json walks each document).
TEST(OutputContract, NoVersionOneNameInAnyCommand) {
    const std::string coffee = kSamples + "/coffee-discount/spend.csv";
    const std::string trials = kSamples + "/trial-conversion/trials.csv";
    const std::string helpdesk = kSamples + "/helpdesk-staffing/tickets.csv";
    const std::string volunteers = kSamples + "/volunteer-onboarding/volunteers.csv";
    run_json({"fit", "--data", coffee, "--outcome", "weekly_spend", "--interaction", "discount_pct,loyalty_member",
              "--predictors", "tenure_months", "--cluster", "shop", "--test", "discount_pct*loyalty_member"});
    run_json({"fit", "--data", kData + "/ok/collinear.csv", "--outcome", "y", "--predictors", "x,z,z2"});
    run_json({"fit", "--data", trials, "--missing", "NaN", "--outcome", "converted", "--interaction",
              "setup_sessions,employees", "--family", "logistic", "--log", "employees"});
    run_json({"probe", "--data", coffee, "--outcome", "weekly_spend", "--interaction", "discount_pct,loyalty_member",
              "--focal", "discount_pct", "--moderator", "loyalty_member", "--se", "hc3", "--bootstrap", "100", "--seed",
              "4"});
    run_json({"probe", "--data", coffee, "--outcome", "weekly_spend", "--interaction", "discount_pct,tenure_months",
              "--focal", "discount_pct", "--moderator", "tenure_months", "--moderator-percentiles", "10,50,90",
              "--surface", "3"});
    run_json({"probe", "--data", helpdesk, "--outcome", "resolution_hours", "--interaction", "agents_on_shift,shift",
              "--focal", "agents_on_shift", "--moderator", "shift"});
    run_json({"probe", "--data", trials, "--outcome", "converted", "--interaction", "setup_sessions,employees",
              "--family", "logistic", "--focal", "setup_sessions", "--moderator", "employees", "--scale", "outcome",
              "--average", "values"});
    run_json({"probe", "--data", trials, "--outcome", "converted", "--interaction", "setup_sessions,employees",
              "--family", "logistic", "--focal", "setup_sessions", "--moderator", "employees"});
    const json cells = run_json({"probe", "--data", volunteers, "--outcome", "hours_q1", "--interaction",
                                 "onboarding,mentoring", "--focal", "onboarding", "--moderator", "mentoring"});
    for (const auto& c : cells.at("cell_table").at("effects_of_row_factor"))
        for (const char* key : {"value", "se", "test_value", "p", "low", "high"}) EXPECT_TRUE(c.contains(key)) << key;
    run_json({"columns", "--data", coffee});
    run_json({"power", "--predictors", "3", "--f2", "0.02", "--n", "400"});
    run_json({"power", "--predictors", "3", "--f2", "0.02", "--power", "0.8"});
    run_json({"power", "--predictors", "3", "--n", "400", "--power", "0.8", "--detectable"});
}

// Renamed words: the new ones work, the old ones are refused with the new
// word in the message (exit 2; test_bad_input.cpp has the exact messages).
TEST(OutputContract, RenamedCommandAndOptionsWork) {
    const json columns = run_json({"columns", "--data", kData + "/ok/categorical.csv"});
    ASSERT_EQ(columns.at("columns").size(), 3u);  // y, x, g (the file's header)
    EXPECT_EQ(columns.at("rows"), 12);            // the file's 12 data rows
    const std::string coffee = kSamples + "/coffee-discount/spend.csv";
    const json values =
        run_json({"probe", "--data", coffee, "--outcome", "weekly_spend", "--interaction", "discount_pct,tenure_months",
                  "--focal", "discount_pct", "--moderator", "tenure_months", "--moderator-values", "6,30"});
    ASSERT_EQ(values.at("effects_at").size(), 2u);
    EXPECT_EQ(values.at("effects_at")[0].at("moderator_value"), 6);
    EXPECT_EQ(values.at("effects_at")[1].at("moderator_value"), 30);
    for (const auto& [old_word, new_word] : std::vector<std::pair<std::string, std::string>>{
             {"--at", "--moderator-values"}, {"--at-percentiles", "--moderator-percentiles"}}) {
        const RunResult r = run_cli({"probe", "--data", coffee, "--outcome", "weekly_spend", "--interaction",
                                     "discount_pct,tenure_months", "--focal", "discount_pct", "--moderator",
                                     "tenure_months", old_word, "10,20"});
        EXPECT_EQ(r.exit_code, 2) << r.describe();
        EXPECT_NE(r.err.find(new_word), std::string::npos) << r.err;
    }
    const RunResult old_command = run_cli({"describe", "--data", coffee});
    EXPECT_EQ(old_command.exit_code, 2);
    EXPECT_NE(old_command.err.find("'columns'"), std::string::npos) << old_command.err;
    const RunResult help = run_cli({"--help"});
    for (const char* word : {"columns --data", "--moderator-values", "--scale model|outcome"})
        EXPECT_NE(help.out.find(word), std::string::npos) << word;
    for (const char* word : {"describe", "--at ", "link", "response"})
        EXPECT_EQ(help.out.find(word), std::string::npos) << word;
}

// A four-level categorical moderator with cluster-robust SEs: every pairwise
// difference of the slopes, its Holm- and Bonferroni-adjusted p, and the joint
// test, against statsmodels 0.13 t_test, multitest.multipletests and
// wald_test (tests/reference/make_contrasts_reference.py, contrasts_ols4).
TEST(OutputContract, SlopeContrastsAreStatsmodelsTTests) {
    const json ref = moderato::test::read_fixture_json(moderato::test::reference_fixture("contrasts_ols4.json"));
    const json& c = ref.at("contrasts").at("cluster");
    const std::string data =
        (moderato::test::reference_fixture_dir("contrasts_ols4.json") / "contrasts_ols4.csv").string();
    for (const std::string adjust : {"holm", "bonferroni"}) {
        SCOPED_TRACE(adjust);
        const json j = run_json({"probe",
                                 "--data",
                                 data,
                                 "--outcome",
                                 "wait",
                                 "--predictors",
                                 "tenure,channel,backlog",
                                 "--interaction",
                                 "channel,tenure",
                                 "--reference",
                                 "channel=phone",
                                 "--se",
                                 "cluster",
                                 "--cluster",
                                 "team",
                                 "--focal",
                                 "tenure",
                                 "--moderator",
                                 "channel",
                                 "--adjust",
                                 adjust});
        EXPECT_EQ(j.at("adjustment"), adjust);
        const json& pairs = j.at("slope_contrasts");
        ASSERT_EQ(pairs.size(), c.at("pairs").size());
        for (std::size_t q = 0; q < pairs.size(); ++q) {
            const json& ours = pairs[q];
            const json& theirs = c.at("pairs")[q];
            EXPECT_EQ(ours.at("pair"), theirs.at("pair"));
            EXPECT_LE(rel(ours.at("difference").get<double>(), theirs.at("estimate").get<double>()), 1e-8);
            EXPECT_LE(rel(ours.at("se").get<double>(), theirs.at("std_error").get<double>()), 1e-8);
            EXPECT_LE(rel(ours.at("test_value").get<double>(), theirs.at("statistic").get<double>()), 1e-8);
            EXPECT_LE(rel(ours.at("p").get<double>(), theirs.at("p_value").get<double>()), 1e-6);
            EXPECT_LE(rel(ours.at("p_adjusted").get<double>(), c.at(adjust)[q].get<double>()), 1e-6);
            for (const char* key : {"low", "high"}) EXPECT_TRUE(ours.contains(key)) << key;
        }
        const json& test = j.at("interaction_test");
        EXPECT_EQ(test.at("df1").get<double>(), c.at("wald").at("df_num").get<double>());
        EXPECT_EQ(test.at("df2").get<double>(), c.at("wald").at("df_denom").get<double>());  // G - 1
        EXPECT_LE(rel(test.at("value").get<double>(), c.at("wald").at("statistic").get<double>()), 1e-8);
    }
    // a numeric moderator: no pairs, but still the joint test
    const json numeric = run_json({"probe", "--data", kSamples + "/orchard-nitrogen/plots.csv", "--outcome",
                                   "yield_t_ha", "--interaction", "nitrogen_kg_ha,soil_moisture_pct", "--focal",
                                   "nitrogen_kg_ha", "--moderator", "soil_moisture_pct"});
    EXPECT_TRUE(numeric.at("slope_contrasts").is_null());
    EXPECT_FALSE(numeric.contains("adjustment"));
    // one product term: the joint F is the square of its t (closed form)
    const json fit = run_json({"fit", "--data", kSamples + "/orchard-nitrogen/plots.csv", "--outcome", "yield_t_ha",
                               "--interaction", "nitrogen_kg_ha,soil_moisture_pct"});
    const double t = term(fit, "nitrogen_kg_ha×soil_moisture_pct").at("test_value").get<double>();
    EXPECT_LE(rel(numeric.at("interaction_test").at("value").get<double>(), t * t), 1e-12);
}
