// `moderato-cli power` as a process: JSON runs checked against the scipy
// reference written by tests/reference/make_power_reference.py (the build's
// live run when present, else tests/reference/fixtures/power_reference.json)
// and against the core functions the command wraps; bad inputs with their
// exact messages and exit code 2.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <functional>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli_json.hpp"
#include "cli_runner.hpp"
#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"
#include "moderato/probing/power.hpp"

namespace {

using moderato::test::rel;
using moderato::test::run_cli;
using moderato::test::RunResult;
using nlohmann::json;

json power_json(std::vector<std::string> args) {
    args.insert(args.begin(), "power");
    args.push_back("--format");
    args.push_back("json");
    return moderato::test::json_output(run_cli(args));
}

// The first case of `section` in the scipy fixture for which `pick` is true.
json reference_case(const std::string& section, const std::function<bool(const json&)>& pick) {
    const json doc = moderato::test::read_fixture_json(moderato::test::reference_fixture("power_reference.json"));
    for (const auto& c : doc.value(section, json::array()))
        if (pick(c)) return c;
    ADD_FAILURE() << "no such case in " << section;
    return json::object();
}

moderato::PowerDesign design(long long u, long long k, double alpha = 0.05,
                             moderato::Noncentrality c = moderato::Noncentrality::cohen) {
    moderato::PowerDesign d;
    d.tested_terms = u;
    d.total_predictors = k;
    d.alpha = alpha;
    d.convention = c;
    return d;
}

}  // namespace

// u = 2 of k = 5, n = 200, f2 = 0.03, alpha = 0.01, λ = f2·n: the scipy case.
TEST(PowerCli, PowerJsonMatchesReferenceAndCore) {
    const json ref = reference_case("power_cases", [](const json& c) {
        return c.at("tested_terms") == 2 && c.at("total_predictors") == 5 && c.at("convention") == "n";
    });
    const json j = power_json({"--n", "200", "--f2", "0.03", "--tested", "2", "--predictors", "5", "--alpha", "0.01",
                               "--noncentrality", "n"});
    EXPECT_EQ(j.at("mode"), "power");
    EXPECT_EQ(j.at("tested_terms"), 2);
    EXPECT_EQ(j.at("total_predictors"), 5);
    EXPECT_EQ(j.at("output_version"), 2);
    EXPECT_EQ(j.at("sample_size"), 200);
    EXPECT_EQ(j.at("df1").get<double>(), ref.at("df1").get<double>());  // scipy reference
    EXPECT_EQ(j.at("df2").get<double>(), ref.at("df2").get<double>());  // scipy reference
    EXPECT_EQ(j.at("noncentrality_convention"), "n");
    EXPECT_EQ(j.at("noncentrality_formula"), "f2 * n");
    EXPECT_LE(rel(j.at("noncentrality").get<double>(), ref.at("noncentrality").get<double>()),
              1e-12);  // scipy reference
    EXPECT_LE(rel(j.at("critical_value").get<double>(), ref.at("critical_f").get<double>()),
              1e-8);                                                                   // scipy f.isf
    EXPECT_LE(rel(j.at("power").get<double>(), ref.at("power").get<double>()), 1e-8);  // scipy ncf.sf
    EXPECT_NEAR(j.at("partial_r2").get<double>(), 0.03 / 1.03, 1e-16);                 // closed form

    // 17 significant digits: the printed number is the core's double exactly.
    const auto core = moderato::power_of_test(0.03, 200, design(2, 5, 0.01, moderato::Noncentrality::n));
    EXPECT_EQ(j.at("power").get<double>(), core.power);
    EXPECT_EQ(j.at("critical_value").get<double>(), core.critical_f);
}

TEST(PowerCli, SampleSizeJsonMatchesReference) {
    const json ref = reference_case("sample_size_cases", [](const json& c) {
        return c.at("tested_terms") == 2 && c.at("total_predictors") == 6 && c.at("convention") == "cohen";
    });
    const json j =
        power_json({"--power", "0.9", "--f2", "0.05", "--tested", "2", "--predictors", "6", "--alpha", "0.01"});
    EXPECT_EQ(j.at("mode"), "sample_size");
    EXPECT_EQ(j.at("noncentrality_convention"), "cohen");
    EXPECT_EQ(j.at("sample_size").get<long long>(), ref.at("n").get<long long>());          // scan of scipy ncf.sf
    EXPECT_LE(rel(j.at("power").get<double>(), ref.at("power_at_n").get<double>()), 1e-8);  // scipy ncf.sf
    EXPECT_LE(rel(j.at("power_one_fewer").get<double>(), ref.at("power_one_fewer").get<double>()),
              1e-8);  // scipy ncf.sf
    EXPECT_EQ(j.at("target_power").get<double>(), 0.9);
}

TEST(PowerCli, DetectableJsonMatchesReference) {
    const json ref = reference_case(
        "detectable_cases", [](const json& c) { return c.at("tested_terms") == 2 && c.at("total_predictors") == 5; });
    const json j = power_json({"--n", "250", "--power", "0.9", "--detectable", "--tested", "2", "--predictors", "5"});
    EXPECT_EQ(j.at("mode"), "detectable_effect");
    EXPECT_LE(rel(j.at("f2").get<double>(), ref.at("f2").get<double>()), 1e-8);  // scipy brentq on ncf.sf
    EXPECT_NEAR(j.at("power").get<double>(), 0.9, 1e-12);                        // the target (closed form)
}

// f2 from two R² values: (0.30 − 0.27)/(1 − 0.30) = 0.03/0.70 (closed form).
TEST(PowerCli, EffectSizeFromRSquaredPair) {
    const json j = power_json({"--n", "150", "--r2-full", "0.30", "--r2-reduced", "0.27", "--predictors", "4"});
    EXPECT_NEAR(j.at("f2").get<double>(), 0.03 / 0.70, 1e-15);  // closed form
    EXPECT_EQ(j.at("r2_full").get<double>(), 0.30);
    EXPECT_EQ(j.at("r2_reduced").get<double>(), 0.27);
    EXPECT_EQ(j.at("tested_terms"), 1);            // default: one tested term
    EXPECT_EQ(j.at("alpha").get<double>(), 0.05);  // default alpha
}

// The text form says what was assumed and shows the scipy power to 4 decimals:
// u = k = 1, n = 55, f2 = 0.15 → 0.805082588541207 (scipy ncf.sf) → "0.8051".
TEST(PowerCli, TextSaysWhatWasAssumed) {
    const RunResult r = run_cli({"power", "--n", "55", "--f2", "0.15", "--predictors", "1"});
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    EXPECT_NE(r.out.find("Power of the F test for 1 tested term among 1 predictor (plus an intercept)"),
              std::string::npos)
        << r.out;
    EXPECT_NE(r.out.find("  power                  0.8051\n"), std::string::npos) << r.out;  // scipy ncf.sf, rounded
    EXPECT_NE(r.out.find("  degrees of freedom     1 and 53\n"), std::string::npos)
        << r.out;  // closed form: 55 − 1 − 1
    EXPECT_NE(r.out.find("f2 * (df1 + df2 + 1), Cohen's convention"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("Assumes a linear model"), std::string::npos) << r.out;
}

// Bad input: exit code 2, nothing on stdout, the exact message on stderr.
struct BadPower {
    std::vector<std::string> args;
    std::string message;  // the whole of stderr
};

TEST(PowerCli, BadInputExitsTwoWithExactMessage) {
    const std::string usage =
        "usage: moderato-cli power --predictors K [--tested U] [--alpha A] and one of\n"
        "  --n N --f2 X                  power of the test with N observations\n"
        "  --power P --f2 X              smallest N that reaches power P\n"
        "  --n N --power P --detectable  smallest f2 detectable with N observations and power P\n"
        "(--r2-full A --r2-reduced B may replace --f2; --noncentrality cohen|n; --format json|text)\n";
    const std::vector<BadPower> cases = {
        {{"--n", "55", "--f2", "0.15"},
         "moderato-cli: option --predictors is required: the number of predictors in the full model, tested terms "
         "included, intercept excluded\n" +
             usage},
        {{"--f2", "0.15", "--predictors", "3"},
         "moderato-cli: give --n (to compute power) or --power (to compute the sample size)\n" + usage},
        {{"--n", "80", "--power", "0.8", "--f2", "0.15", "--predictors", "3"},
         "moderato-cli: --n and --power together need --detectable (smallest detectable f2); give only --n to "
         "compute power, or only --power to compute the sample size\n" +
             usage},
        {{"--n", "80", "--predictors", "3"},
         "moderato-cli: give the effect size: --f2 X, or --r2-full A with --r2-reduced B\n" + usage},
        {{"--n", "80", "--f2", "0", "--predictors", "3"},
         "moderato-cli: f2 (the effect size) must be a finite number greater than 0, got 0\n"},
        {{"--n", "80", "--f2", "0.1", "--predictors", "3", "--alpha", "1.5"},
         "moderato-cli: alpha (the significance level) must be between 0 and 1 (exclusive), got 1.5\n"},
        {{"--power", "1", "--f2", "0.1", "--predictors", "3"},
         "moderato-cli: the target power must be between 0 and 1 (exclusive), got 1\n"},
        {{"--n", "80", "--f2", "0.1", "--predictors", "3", "--tested", "4"},
         "moderato-cli: the total number of predictors (3) must be at least the number of tested terms (4): the "
         "tested terms are counted among the predictors\n"},
        {{"--n", "4", "--f2", "0.1", "--predictors", "3"},
         "moderato-cli: n = 4 is too small: with 3 predictors and an intercept the test needs n greater than k + 1, "
         "so n must be at least 5\n"},
        {{"--n", "80", "--f2", "0.1", "--predictors", "3", "--tested", "0"},
         "moderato-cli: option --tested needs a whole number from 1 to 100000, got '0'\n"},
        {{"--n", "80", "--r2-full", "0.2", "--r2-reduced", "0.3", "--predictors", "3"},
         "moderato-cli: the reduced model's R² (0.3) exceeds the full model's R² (0.2): the full model contains the "
         "reduced one plus the tested terms, so its R² is at least as large\n"},
        {{"--n", "80", "--r2-full", "0.2", "--predictors", "3"},
         "moderato-cli: --r2-full and --r2-reduced go together: give both (the R² with and without the tested "
         "terms), or give --f2\n"},
        {{"--n", "80", "--r2-full", "0.25", "--r2-reduced", "0.25", "--predictors", "3"},
         "moderato-cli: --r2-full equals --r2-reduced (0.25): the tested terms add nothing (f2 = 0), so there is "
         "no effect to plan for\n"},
        {{"--n", "80", "--f2", "0.1", "--r2-full", "0.3", "--r2-reduced", "0.2", "--predictors", "3"},
         "moderato-cli: give the effect size once: either --f2, or --r2-full with --r2-reduced\n"},
        {{"--n", "80", "--power", "0.8", "--detectable", "--f2", "0.1", "--predictors", "3"},
         "moderato-cli: --detectable computes f2: do not give --f2, --r2-full or --r2-reduced with it\n"},
        {{"--n", "80", "--power", "0.04", "--detectable", "--predictors", "3"},
         "moderato-cli: the target power (0.04) must be greater than alpha (0.05): the test rejects with "
         "probability alpha even when there is no effect\n"},
        {{"--n", "80", "--f2", "0.1", "--predictors", "3", "--noncentrality", "total"},
         "moderato-cli: option --noncentrality must be cohen (lambda = f2 * (df1 + df2 + 1)) or n (lambda = f2 * n), "
         "got 'total'\n"},
        {{"--n", "eighty", "--f2", "0.1", "--predictors", "3"},
         "moderato-cli: option --n needs a whole number from 1 to 1000000000000, got 'eighty'\n"},
    };
    for (const auto& c : cases) {
        std::vector<std::string> args = c.args;
        args.insert(args.begin(), "power");
        const RunResult r = run_cli(args);
        std::string shown;
        for (const auto& a : args) shown += a + " ";
        EXPECT_TRUE(r.exited) << shown << r.describe();
        EXPECT_EQ(r.exit_code, 2) << shown << r.describe();
        EXPECT_EQ(r.out, "") << shown;
        EXPECT_EQ(r.err, c.message) << shown;
    }
}
