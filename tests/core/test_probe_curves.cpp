// Curves for the probing plots: prediction lines against statsmodels'
// get_prediction (tests/reference/make_prediction_reference.py; the live run
// in the build folder when statsmodels is installed, else the committed
// fixture), and the effect band against the closed form of a two-way model.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "common/reference_fixtures.hpp"
#include "common/tolerance.hpp"
#include "moderato/probing/probe_curves.hpp"
#include "moderato/reading/csv.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;
using nlohmann::json;

TEST(ProbeCurves, PredictionLinesMatchStatsmodelsGetPrediction) {
    const json ref = read_fixture_json(reference_fixture("prediction_lines.json"));
    const fs::path data_dir = committed_fixture_dir();
    int checked = 0;
    for (const json& c : ref.at("cases")) {
        SCOPED_TRACE(c.at("case").get<std::string>() + " " + c.at("se").get<std::string>() + " " +
                     ref.at("source").get<std::string>());
        const Table table = read_csv((data_dir / c.at("data").get<std::string>()).string(), CsvOptions{});
        ModelSpec spec;
        spec.outcome = c.at("outcome");
        spec.predictors = c.at("predictors").get<std::vector<std::string>>();
        spec.interactions = {c.at("interaction").get<std::vector<std::string>>()};
        spec.family = parse_family(c.at("family").get<std::string>());
        spec.se = parse_se_kind(c.at("se").get<std::string>());
        const Design d = build_design(table, spec);
        const FitResult fit = fit_design(d, spec);
        std::map<std::string, double> held;
        for (const auto& [col, v] : c.at("held").items()) held[col] = v.get<double>();
        const auto xs = c.at("x").get<std::vector<double>>();
        const bool probability = spec.family == Family::Logistic;
        // typical_values holds every column the case does not fix at its mean,
        // as the reference does (c1 at its mean is also given explicitly).
        const auto line = prediction_line(d, fit, c.at("focal"), typical_values(d, held), xs, probability);
        ASSERT_EQ(line.size(), xs.size());
        const auto mean = c.at("mean").get<std::vector<double>>();
        const auto se = c.at("mean_se").get<std::vector<double>>();
        const auto lo = c.at("mean_ci_lower").get<std::vector<double>>();
        const auto hi = c.at("mean_ci_upper").get<std::vector<double>>();
        // Logistic: both sides iterate to 1e-12, so about 9 digits agree.
        const double tol = probability ? 1e-7 : 1e-9;
        for (std::size_t i = 0; i < xs.size(); ++i) {
            EXPECT_EQ(line[i].x, xs[i]);
            EXPECT_LE(rel(line[i].estimate, mean[i]), tol) << "x = " << xs[i];
            EXPECT_LE(rel(line[i].std_error, se[i]), tol) << "x = " << xs[i];
            EXPECT_LE(rel(line[i].lower, lo[i]), tol) << "x = " << xs[i];
            EXPECT_LE(rel(line[i].upper, hi[i]), tol) << "x = " << xs[i];
            ++checked;
        }
    }
    EXPECT_EQ(checked, 8 * 7);
}

TEST(ProbeCurves, EffectBandIsTheClosedFormOfATwoWayModel) {
    const fs::path data_dir = committed_fixture_dir();
    const Table table = read_csv((data_dir / "ols_continuous_3way.csv").string(), CsvOptions{});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "z", "c1"};
    spec.interactions = {{"x", "z"}};
    spec.se = SeKind::HC3;
    const Design d = build_design(table, spec);
    const FitResult fit = fit_design(d, spec);
    const EffectFunction f = effect_function(d, fit, "x", "z", typical_values(d));
    const int b1 = fit.index_of("x"), b3 = fit.index_of("x×z");
    ASSERT_GE(b1, 0);
    ASSERT_GE(b3, 0);
    const auto ms = even_grid(-3, 2, 11);
    ASSERT_EQ(ms.size(), 11u);
    EXPECT_EQ(ms.front(), -3.0);
    EXPECT_EQ(ms.back(), 2.0);
    const double q = 2.5;
    const auto band = effect_band(f, ms, q);
    for (std::size_t i = 0; i < ms.size(); ++i) {
        const double m = ms[i];
        // closed form: effect b1 + b3 m, variance V11 + 2 m V13 + m^2 V33
        const double effect = fit.beta[b1] + fit.beta[b3] * m;
        const double var = fit.covariance(b1, b1) + 2 * m * fit.covariance(b1, b3) + m * m * fit.covariance(b3, b3);
        EXPECT_NEAR(band[i].estimate, effect, 1e-12 * (1 + std::abs(effect)));
        EXPECT_NEAR(band[i].std_error, std::sqrt(var), 1e-12);
        EXPECT_NEAR(band[i].lower, effect - q * std::sqrt(var), 1e-11);
        EXPECT_NEAR(band[i].upper, effect + q * std::sqrt(var), 1e-11);
        const EffectPoint e = effect_at(f, m, fit, {-1, 1});
        EXPECT_NEAR(e.estimate, effect, 1e-12 * (1 + std::abs(effect)));
        // closed form: t = effect / SE, interval effect -+ t(0.975, n - p) SE
        EXPECT_NEAR(e.statistic, effect / std::sqrt(var), 1e-9);
        EXPECT_NEAR(e.ci_lower, effect - fit.critical_value * std::sqrt(var), 1e-11);
        EXPECT_EQ(e.beyond_data, m < -1 || m > 1);
    }
}

TEST(ProbeCurves, LinesAtTwoModeratorValuesMeetWhereTheModeratorEffectIsZero) {
    // Closed form: in y = b0 + b1 x + b2 z + b3 xz + ..., lines at any two z meet at x = -b2 / b3.
    const fs::path data_dir = committed_fixture_dir();
    const Table table = read_csv((data_dir / "ols_continuous_3way.csv").string(), CsvOptions{});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "z", "c1"};
    spec.interactions = {{"x", "z"}};
    const Design d = build_design(table, spec);
    const FitResult fit = fit_design(d, spec);
    const double x0 = -fit.beta[fit.index_of("z")] / fit.beta[fit.index_of("x×z")];
    const auto a = prediction_line(d, fit, "x", typical_values(d, {{"z", -1.0}}), {x0});
    const auto b = prediction_line(d, fit, "x", typical_values(d, {{"z", 2.0}}), {x0});
    EXPECT_NEAR(a[0].estimate, b[0].estimate, 1e-10 * (1 + std::abs(a[0].estimate)));
    const auto c = prediction_line(d, fit, "x", typical_values(d, {{"z", 2.0}}), {x0 + 1});
    const auto e = prediction_line(d, fit, "x", typical_values(d, {{"z", -1.0}}), {x0 + 1});
    EXPECT_GT(std::abs(c[0].estimate - e[0].estimate), 1e-3);
}
