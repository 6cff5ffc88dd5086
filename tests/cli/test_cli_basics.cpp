// Positive checks of the moderato-cli process: --version, --help, and
// `fit --format json|text` on small invented data in tests/data/ok/ whose
// answers are known independently:
//   exact_interaction.csv  12 rows with y = 1 + 2x + 3z − 0.5·x·z exactly
//                          (closed form: exact data, so OLS reproduces the
//                          coefficients and R² = 1);
//   exact_interaction_missing.csv  the same 12 rows plus one row missing x
//                          and one row missing z (so 2 rows are excluded);
//   categorical.csv        y = 1 + 2x + 5·[g=b] − 3·[g=c] exactly;
//   collinear.csv          y = 1 + 2x + 3z exactly, with z2 = 2z;
//   slope_five_fourteenths.csv  x = 0,1,3 (twice), y = 0,0,1 (twice):
//                          slope Sxy/Sxx = (5/3)/(14/3) = 5/14, intercept
//                          ȳ − slope·x̄ = 1/3 − (5/14)(4/3) = −1/7 (closed form).
// The JSON contract (names, 17 significant digits, term labels) is the one in
// ../shared/design/ARCHITECTURE.md, "The headless CLI".
#include <gtest/gtest.h>

#include <cctype>
#include <cmath>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli_json.hpp"
#include "cli_runner.hpp"

namespace {

using moderato::test::run_cli;
using moderato::test::RunOptions;
using moderato::test::RunResult;
using nlohmann::json;

constexpr double kExact = 1e-9;  // tolerance for closed-form values on exact data

RunResult run_in_data(const std::vector<std::string>& args) {
    RunOptions o;
    o.cwd = MODERATO_TEST_DATA_DIR;
    return run_cli(args, o);
}

// Runs `fit --format json` and parses stdout; fails the test on a non-zero exit.
json fit_json(std::vector<std::string> args) {
    args.insert(args.begin(), "fit");
    args.push_back("--format");
    args.push_back("json");
    return moderato::test::json_output(run_in_data(args));
}

std::vector<std::string> terms_of(const json& j) {
    std::vector<std::string> t;
    for (const auto& c : j.at("terms")) t.push_back(c.at("name").get<std::string>());
    return t;
}

double estimate_of(const json& j, const std::string& term) {
    for (const auto& c : j.at("terms"))
        if (c.at("name") == term) return c.at("value").get<double>();
    ADD_FAILURE() << "no term " << term << " in " << j.at("terms").dump();
    return NAN;
}

// Significant digits of a JSON number as written: digits of the mantissa
// without sign, leading zeros and the exponent.
int significant_digits(std::string number) {
    if (auto e = number.find_first_of("eE"); e != std::string::npos) number.resize(e);
    std::string digits;
    for (char c : number)
        if (std::isdigit(static_cast<unsigned char>(c))) digits += c;
    const auto first = digits.find_first_not_of('0');
    return first == std::string::npos ? 0 : static_cast<int>(digits.size() - first);
}

// The raw text of the "value" written for `term` in the JSON output
// (the writer puts "value" right after "name" in each term).
std::string raw_estimate(const std::string& out, const std::string& term) {
    const std::string key = "\"name\": \"" + term + "\"";
    const auto at = out.find(key);
    if (at == std::string::npos) return "";
    const auto est = out.find("\"value\":", at);
    if (est == std::string::npos) return "";
    const auto b = out.find_first_not_of(" \n", est + 8);
    if (b == std::string::npos) return "";
    const auto e = out.find_first_of(",\n}", b);
    return out.substr(b, e == std::string::npos ? std::string::npos : e - b);
}

TEST(CliBasics, VersionPrintsNameAndProjectVersion) {
    const RunResult r = run_cli({"--version"});
    ASSERT_TRUE(r.exited) << r.describe();
    EXPECT_EQ(r.exit_code, 0);
    // MODERATO_VERSION is the project(VERSION ...) of the top CMakeLists.txt.
    EXPECT_EQ(r.out, std::string("moderato-cli ") + MODERATO_VERSION + "\n");
    EXPECT_EQ(r.err, "");
}

TEST(CliBasics, HelpExitsZeroAndDescribesFit) {
    const RunResult r = run_cli({"--help"});
    ASSERT_TRUE(r.exited) << r.describe();
    EXPECT_EQ(r.exit_code, 0);
    EXPECT_NE(r.out.find("fit"), std::string::npos);
    EXPECT_NE(r.out.find("--outcome"), std::string::npos);
    EXPECT_EQ(r.err, "");
}

TEST(CliBasics, FitJsonHasEveryContractKeyAndExactCoefficients) {
    const json j = fit_json({"--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z"});
    ASSERT_TRUE(j.is_object());
    for (const char* key : {"output_version", "rows_used", "rows_left_out", "family", "standard_errors", "test",
                            "residual_df", "terms", "covariance", "not_estimated", "r2", "r2_adjusted", "residual_sd",
                            "overall_test", "log_likelihood", "aic", "bic"})
        EXPECT_TRUE(j.contains(key)) << "missing key " << key;
    ASSERT_TRUE(j.contains("terms"));
    for (const auto& c : j.at("terms"))
        for (const char* key : {"name", "value", "se", "test_value", "p", "low", "high"})
            EXPECT_TRUE(c.contains(key)) << "term lacks " << key << ": " << c.dump();

    // Term labels (ARCHITECTURE.md): intercept, columns, product with U+00D7.
    EXPECT_EQ(terms_of(j), (std::vector<std::string>{"intercept", "x", "z", "x\u00D7z"}));
    // Closed form: exact data y = 1 + 2x + 3z − 0.5xz.
    EXPECT_NEAR(estimate_of(j, "intercept"), 1.0, kExact);
    EXPECT_NEAR(estimate_of(j, "x"), 2.0, kExact);
    EXPECT_NEAR(estimate_of(j, "z"), 3.0, kExact);
    EXPECT_NEAR(estimate_of(j, "x\u00D7z"), -0.5, kExact);
    EXPECT_EQ(j.at("output_version"), 2);  // ARCHITECTURE.md
    EXPECT_EQ(j.at("rows_used"), 12);      // 12 rows in the file
    EXPECT_EQ(j.at("rows_left_out"), 0);   // none missing
    EXPECT_EQ(j.at("residual_df"), 8);     // n − p = 12 − 4
    EXPECT_EQ(j.at("family"), "linear");
    EXPECT_EQ(j.at("standard_errors"), "model-based");
    EXPECT_EQ(j.at("test"), "t");
    EXPECT_NEAR(j.at("r2").get<double>(), 1.0, kExact);  // exact fit
    EXPECT_TRUE(j.at("not_estimated").is_array() && j.at("not_estimated").empty());
    // Covariance: p × p, same order as the coefficients, symmetric.
    const auto& v = j.at("covariance");
    ASSERT_EQ(v.size(), 4u);
    for (std::size_t a = 0; a < 4; ++a) {
        ASSERT_EQ(v[a].size(), 4u);
        for (std::size_t b = 0; b < 4; ++b) EXPECT_EQ(v[a][b], v[b][a]);
    }
}

TEST(CliBasics, FitJsonWritesSeventeenSignificantDigits) {
    const RunResult r = run_in_data(
        {"fit", "--format", "json", "--data", "ok/slope_five_fourteenths.csv", "--outcome", "y", "--predictors", "x"});
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    const json j = json::parse(r.out);
    // Closed form: slope 5/14, intercept −1/7 (see the top of this file).
    EXPECT_NEAR(estimate_of(j, "x"), 5.0 / 14.0, kExact);
    EXPECT_NEAR(estimate_of(j, "intercept"), -1.0 / 7.0, kExact);
    // Neither value is a short decimal, so all 17 significant digits are written.
    const std::string slope = raw_estimate(r.out, "x");
    const std::string intercept = raw_estimate(r.out, "intercept");
    EXPECT_EQ(significant_digits(slope), 17) << "raw text: " << slope;
    EXPECT_EQ(significant_digits(intercept), 17) << "raw text: " << intercept;
}

TEST(CliBasics, FitTextNamesEveryTerm) {
    const RunResult r = run_in_data(
        {"fit", "--format", "text", "--data", "ok/exact_interaction.csv", "--outcome", "y", "--interaction", "x,z"});
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    EXPECT_EQ(r.err, "");
    for (const char* term : {"intercept", "x\u00D7z"}) EXPECT_NE(r.out.find(term), std::string::npos) << term;
    // x and z alone: as a term at the start of a table line.
    EXPECT_NE(r.out.find("\nx "), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("\nz "), std::string::npos) << r.out;
}

// The text report writes numbers by the rules every other output uses
// (common practice for reports; the rules of support/report_text.hpp,
// re-derived here): four significant digits with trailing zeros, the minus
// sign U+2212, p-values to three decimals. Values from the JSON output of
// the same fit, 17 significant digits.
std::string four_significant(double v) {
    const int lead = static_cast<int>(std::floor(std::log10(std::abs(v))));
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", std::max(0, 3 - lead), std::abs(v));
    return (v < 0 ? "\u2212" : "") + std::string(buf);
}

TEST(CliBasics, FitTextWritesNumbersByTheOneSetOfRules) {
    const std::vector<std::string> args{
        "--data", "ok/logistic_small.csv", "--outcome", "y", "--predictors", "x", "--family", "logistic"};
    std::vector<std::string> text_args{"fit", "--format", "text"};
    text_args.insert(text_args.end(), args.begin(), args.end());
    const RunResult r = run_in_data(text_args);
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    const json j = fit_json(args);
    for (const auto& term : j.at("terms")) {
        const std::string name = term.at("name").get<std::string>();
        const std::size_t at = r.out.find("\n" + name + " ");
        ASSERT_NE(at, std::string::npos) << name << "\n" << r.out;
        const std::string line = r.out.substr(at + 1, r.out.find('\n', at + 1) - at - 1);
        EXPECT_NE(line.find(four_significant(term.at("value").get<double>())), std::string::npos) << line;
        EXPECT_NE(line.find(four_significant(term.at("se").get<double>())), std::string::npos) << line;
        const double p = term.at("p").get<double>();
        char pbuf[16];
        std::snprintf(pbuf, sizeof pbuf, "%.3f", p);
        EXPECT_NE(line.find(p < 0.001 ? std::string("< 0.001") : std::string(pbuf)), std::string::npos) << line;
    }
    // No hyphen-minus before a digit anywhere in the report.
    for (std::size_t k = 0; k + 1 < r.out.size(); ++k)
        if (r.out[k] == '-' && std::isdigit(static_cast<unsigned char>(r.out[k + 1])))
            ADD_FAILURE() << "hyphen as minus at " << k << ": " << r.out.substr(k > 20 ? k - 20 : 0, 40);
}

TEST(CliBasics, MissingCellsAreCountedAsExcludedRows) {
    // The file: the 12 exact rows, plus one row with x = NA and one with z empty.
    const json j = fit_json({"--data", "ok/exact_interaction_missing.csv", "--outcome", "y", "--interaction", "x,z"});
    ASSERT_TRUE(j.is_object() && j.contains("rows_used"));
    EXPECT_EQ(j.at("rows_used"), 12);
    EXPECT_EQ(j.at("rows_left_out"), 2);
    // The excluded rows do not pull the fit off the exact plane (closed form).
    EXPECT_NEAR(estimate_of(j, "x\u00D7z"), -0.5, kExact);
}

TEST(CliBasics, TextMissingReadsAColumnAsNumbersWithoutItsTextCells) {
    // The file has 8 rows; line 4 holds x = "3..5" (text), so 7 rows are fitted.
    const json j = fit_json({"--data", "bad/numeric_predictor_with_text.csv", "--outcome", "y", "--predictors", "x",
                             "--text-missing", "x"});
    ASSERT_TRUE(j.is_object() && j.contains("rows_used")) << j.dump();
    EXPECT_EQ(j.at("rows_used"), 7);
    EXPECT_EQ(j.at("rows_left_out"), 1);
}

TEST(CliBasics, CategoricalPredictorUsesFirstSortedLevelAsReference) {
    // The file lists levels in the order b, a, c; the reference is the first sorted: a.
    const json j = fit_json({"--data", "ok/categorical.csv", "--outcome", "y", "--predictors", "x,g"});
    ASSERT_TRUE(j.is_object() && j.contains("terms"));
    EXPECT_EQ(terms_of(j), (std::vector<std::string>{"intercept", "x", "g=b", "g=c"}));
    // Closed form: y = 1 + 2x + 5[g=b] − 3[g=c].
    EXPECT_NEAR(estimate_of(j, "intercept"), 1.0, kExact);
    EXPECT_NEAR(estimate_of(j, "x"), 2.0, kExact);
    EXPECT_NEAR(estimate_of(j, "g=b"), 5.0, kExact);
    EXPECT_NEAR(estimate_of(j, "g=c"), -3.0, kExact);
}

TEST(CliBasics, ReferenceOptionChangesTheReferenceLevel) {
    const json j =
        fit_json({"--data", "ok/categorical.csv", "--outcome", "y", "--predictors", "x,g", "--reference", "g=c"});
    ASSERT_TRUE(j.is_object() && j.contains("terms"));
    EXPECT_EQ(terms_of(j), (std::vector<std::string>{"intercept", "x", "g=a", "g=b"}));
    // Closed form: the same plane written with reference c:
    // y = −2 + 2x + 3[g=a] + 8[g=b].
    EXPECT_NEAR(estimate_of(j, "intercept"), -2.0, kExact);
    EXPECT_NEAR(estimate_of(j, "x"), 2.0, kExact);
    EXPECT_NEAR(estimate_of(j, "g=a"), 3.0, kExact);
    EXPECT_NEAR(estimate_of(j, "g=b"), 8.0, kExact);
}

TEST(CliBasics, CollinearColumnIsReportedAsNotEstimatedNotDropped) {
    const json j = fit_json({"--data", "ok/collinear.csv", "--outcome", "y", "--predictors", "x,z,z2"});
    ASSERT_TRUE(j.is_object() && j.contains("terms"));
    // z2 = 2z exactly. Common practice (R's lm with pivoting): the later of two
    // collinear columns is the one not estimated; it stays listed, with no value.
    EXPECT_EQ(j.at("not_estimated"), json::array({"z2"}));
    EXPECT_EQ(terms_of(j), (std::vector<std::string>{"intercept", "x", "z", "z2"}));
    for (const auto& c : j.at("terms"))
        if (c.at("name") == "z2") {
            EXPECT_TRUE(c.at("value").is_null()) << c.dump();
            EXPECT_TRUE(c.at("se").is_null()) << c.dump();
        }
    // Closed form: exact data y = 1 + 2x + 3z.
    EXPECT_NEAR(estimate_of(j, "intercept"), 1.0, kExact);
    EXPECT_NEAR(estimate_of(j, "x"), 2.0, kExact);
    EXPECT_NEAR(estimate_of(j, "z"), 3.0, kExact);
    EXPECT_EQ(j.at("residual_df"), 9);  // 12 rows − rank 3
    // The user is told, not only the JSON reader.
    bool warned = false;
    for (const auto& w : j.value("warnings", json::array()))
        warned = warned || w.get<std::string>().find("z2") != std::string::npos;
    EXPECT_TRUE(warned) << j.value("warnings", json::array()).dump();
}

}  // namespace
