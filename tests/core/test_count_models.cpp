// Poisson, negative binomial (NB2) and probit models: what the generic
// statsmodels comparison (test_statsmodels_reference.cpp) does not cover —
// the dispersion alpha, the Poisson overdispersion check, effects on the
// outcome's own scale (expected count, rate per unit of exposure,
// probability) with their delta-method standard errors, the interaction on
// that scale, and rate ratios — against the fixtures of
// tests/reference/make_count_reference.py (statsmodels 0.13.5; each value's
// call is named in the fixture's "source"). Then the refusals of bad input.
//
// Tolerances (relative): alpha and its SE 1e-6 (an optimiser on both sides);
// overdispersion statistics 1e-8; outcome-scale effects and SEs 1e-7 (the
// reference differentiates statsmodels predictions numerically; its own
// check against closed forms agrees to 1.1e-9 at worst); rate ratios 1e-8.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>

#include "common/input_error.hpp"
#include "common/reference_fixtures.hpp"
#include "common/table_builder.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/reading/csv.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

struct Case {
    json j;
    Table table;
    ModelSpec spec;
};

Case load(const std::string& name, SeKind se = SeKind::Classical) {
    const fs::path path = reference_fixture(name + ".json");
    Case c;
    c.j = read_fixture_json(path);
    FixtureModel m = fixture_model(c.j, path, se);
    c.table = std::move(m.table);
    c.spec = std::move(m.spec);
    return c;
}

SeKind kind_of(const std::string& name) { return parse_se_kind(name); }

// The InputError `f` throws, checked to hold every one of `words`.
template <typename F>
void expect_input_error(F&& f, std::initializer_list<const char*> words) {
    const std::string message = input_error_of(std::forward<F>(f));
    ASSERT_FALSE(message.empty()) << "no InputError";
    for (const char* w : words) EXPECT_NE(message.find(w), std::string::npos) << "'" << w << "' not in: " << message;
}

}  // namespace

TEST(CountModels, NegativeBinomialAlphaAndItsStandardErrors) {
    for (const std::string name : {"negbin_counts", "randhie_negbin"}) {
        SCOPED_TRACE(name);
        const json disp = load(name).j.at("dispersion");
        for (const auto& [kind, se] : disp.at("std_errors").items()) {
            SCOPED_TRACE(kind);
            Case c = load(name, kind_of(kind));
            const FitResult f = fit_model(c.table, c.spec);
            ASSERT_TRUE(f.dispersion.has_value());
            // statsmodels NegativeBinomial(loglike_method='nb2').fit(method='newton')
            EXPECT_LE(rel(f.dispersion->alpha, disp.at("alpha").get<double>()), 1e-6);
            EXPECT_LE(rel(f.dispersion->std_error, se.get<double>()), 1e-6);
            EXPECT_LT(f.dispersion->ci_lower, f.dispersion->alpha);
            EXPECT_GT(f.dispersion->ci_upper, f.dispersion->alpha);
            EXPECT_TRUE(f.converged);
        }
    }
}

TEST(CountModels, PoissonOverdispersionCheck) {
    for (const std::string name : {"poisson_counts", "poisson_exposure", "randhie_poisson"}) {
        SCOPED_TRACE(name);
        Case c = load(name);
        const FitResult f = fit_model(c.table, c.spec);
        const json& o = c.j.at("overdispersion");
        ASSERT_TRUE(f.overdispersion.has_value());
        // numpy / statsmodels OLS of the auxiliary regression (fixture "source")
        EXPECT_LE(rel(f.overdispersion->pearson_chi2, o.at("pearson_chi2").get<double>()), 1e-8);
        EXPECT_LE(rel(f.overdispersion->pearson_ratio, o.at("pearson_ratio").get<double>()), 1e-8);
        EXPECT_LE(rel(f.overdispersion->alpha_estimate, o.at("coefficient").get<double>()), 1e-8);
        EXPECT_LE(rel(f.overdispersion->test_value, o.at("test_value").get<double>()), 1e-8);
        EXPECT_LE(rel(f.overdispersion->p_value, o.at("p").get<double>()), 1e-6);
        // The caution follows the evidence (common practice: ratio well above 1 or a significant test).
        const bool warned = std::any_of(f.warnings.begin(), f.warnings.end(), [](const std::string& w) {
            return w.find("vary more than a Poisson model allows") != std::string::npos;
        });
        EXPECT_EQ(warned, o.at("p").get<double>() < 0.05 || o.at("pearson_ratio").get<double>() > 1.5);
    }
}

TEST(CountModels, OutcomeScaleEffectsMatchDerivativesOfPredictions) {
    int checked = 0;
    for (const std::string name : {"poisson_counts", "poisson_exposure", "negbin_counts", "probit_binary",
                                   "randhie_poisson", "randhie_negbin", "anes96_probit"}) {
        SCOPED_TRACE(name);
        const json oe = load(name).j.at("outcome_effects");
        for (const json& row : oe.at("rows")) {
            const std::string kind = row.at("se").get<std::string>();
            SCOPED_TRACE(kind + " " + row.at("averaging").get<std::string>() + " " +
                         row.at("at_label").get<std::string>());
            Case c = load(name, kind_of(kind));
            const Design d = build_design(c.table, c.spec);
            const FitResult f = fit_design(d, c.spec);
            ScaleRequest req;
            req.focal = oe.at("focal").get<std::string>();
            req.moderator = oe.at("moderator").get<std::string>();
            req.averaging = row.at("averaging") == "sample" ? Averaging::Sample : Averaging::AtValues;
            const EffectPoint e = probability_effect(d, f, req, row.at("at").get<double>());
            // statsmodels predictions differentiated numerically; delta method with its covariance
            EXPECT_LE(rel(e.estimate, row.at("estimate").get<double>()), 1e-7);
            EXPECT_LE(rel(e.std_error, row.at("std_error").get<double>()), 1e-7);
            ++checked;
        }
    }
    EXPECT_GE(checked, 40);
}

TEST(CountModels, InteractionOnTheOutcomeScale) {
    for (const std::string name : {"poisson_counts", "poisson_exposure", "negbin_counts", "probit_binary",
                                   "randhie_poisson", "randhie_negbin", "anes96_probit"}) {
        SCOPED_TRACE(name);
        const json ie = load(name).j.at("interaction_effect");
        for (const auto& [kind, ref] : ie.at("by_se").items()) {
            SCOPED_TRACE(kind);
            Case c = load(name, kind_of(kind));
            const Design d = build_design(c.table, c.spec);
            const FitResult f = fit_design(d, c.spec);
            ScaleRequest req;
            req.focal = ie.at("focal").get<std::string>();
            req.moderator = ie.at("moderator").get<std::string>();
            const InteractionEffect got = probability_interaction(d, f, req);
            // statsmodels predictions, nested central differences (fixture "source")
            EXPECT_LE(rel(got.estimate, ref.at("estimate").get<double>()), 1e-7);
            EXPECT_LE(rel(got.std_error, ref.at("std_error").get<double>()), 1e-6);
        }
    }
}

TEST(CountModels, RateRatiosAtModeratorValues) {
    for (const std::string name : {"poisson_counts", "poisson_exposure", "negbin_counts", "randhie_poisson"}) {
        SCOPED_TRACE(name);
        Case c = load(name);
        const json& rr = c.j.at("rate_ratios");
        const Design d = build_design(c.table, c.spec);
        const FitResult f = fit_design(d, c.spec);
        ProbeSpec ps;
        ps.focal = rr.at("focal").get<std::string>();
        ps.moderator = rr.at("moderator").get<std::string>();
        for (const json& row : rr.at("rows")) ps.at.push_back(row.at("at").get<double>());
        const ProbeResult p = probe(d, f, ps);
        ASSERT_EQ(p.rate_ratios.size(), rr.at("rows").size());
        const double tol = c.spec.family == Family::NegativeBinomial ? 1e-6 : 1e-8;
        for (std::size_t k = 0; k < p.rate_ratios.size(); ++k) {
            const json& row = rr.at("rows")[k];
            // statsmodels t_test of b_focal + b_product * w, exponentiated
            EXPECT_LE(rel(p.rate_ratios[k].ratio, row.at("rate_ratio").get<double>()), tol);
            EXPECT_LE(rel(p.rate_ratios[k].ci_lower, row.at("ci_lower_95").get<double>()), tol);
            EXPECT_LE(rel(p.rate_ratios[k].ci_upper, row.at("ci_upper_95").get<double>()), tol);
        }
    }
}

// The outcome scale of a model with an exposure is the rate per one unit of
// it: doubling every exposure halves nothing but the intercept's rate
// (from the definition of an offset).
TEST(CountModels, ExposureScalesTheRateNotTheEffects) {
    Case c = load("poisson_exposure");
    const FitResult f1 = fit_model(c.table, c.spec);
    Column& months = *c.table.find("months");
    for (double& v : months.numbers) v *= 2;
    const FitResult f2 = fit_model(c.table, c.spec);
    EXPECT_NEAR(f2.beta[0], f1.beta[0] - std::log(2.0), 1e-10);
    for (Eigen::Index j = 1; j < f1.beta.size(); ++j) EXPECT_NEAR(f2.beta[j], f1.beta[j], 1e-10);
    EXPECT_NEAR(f2.log_likelihood, f1.log_likelihood, 1e-8 * std::abs(f1.log_likelihood));
}

TEST(CountModels, BadInputIsRefusedWithTheRowNamed) {
    Table t = make_table({numeric_column("y", {0, 2, 1, -1, 3, 0, 4, 1}),
                          numeric_column("x", {0.1, 0.5, -0.3, 0.8, 1.2, -1.0, 0.4, 0.0}),
                          numeric_column("t", {1, 2, 1, 1, 0, 2, 1, 1})});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.family = Family::Poisson;
    // a negative count (row 4)
    expect_input_error([&] { fit_model(t, spec); }, {"must be a count", "line 5 of test.csv", "holds -1"});
    t.find("y")->numbers[3] = 1;
    // a zero exposure (row 5)
    spec.exposure = "t";
    expect_input_error([&] { fit_model(t, spec); }, {"exposure 't' must be positive", "line 6 of test.csv"});
    // an exposure for a 0/1 family
    spec.family = Family::Probit;
    expect_input_error([&] { fit_model(t, spec); }, {"exposure", "poisson and negative-binomial"});
    spec.exposure.clear();
    // a probit outcome that is not 0/1
    expect_input_error([&] { fit_model(t, spec); }, {"probit outcome 'y' must be 0 or 1", "line 3 of test.csv"});
    // a constant outcome
    spec.family = Family::Poisson;
    for (double& v : t.find("y")->numbers) v = 2;
    expect_input_error([&] { fit_model(t, spec); }, {"outcome 'y' is 2 in all 8 rows"});
}

TEST(CountModels, NonWholeCountsAreFittedWithAWarning) {
    const Table t = make_table({numeric_column("y", {0, 2.5, 1, 1, 3, 0, 4, 1, 2, 0}),
                                numeric_column("x", {0.1, 0.5, -0.3, 0.8, 1.2, -1.0, 0.4, 0.0, 0.3, -0.5})});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x"};
    spec.family = Family::Poisson;
    const FitResult f = fit_model(t, spec);
    ASSERT_FALSE(f.warnings.empty());
    EXPECT_NE(f.warnings.front().find("not a whole count in 1 row (first line 3 of test.csv: 2.5)"), std::string::npos)
        << f.warnings.front();
}

// A level whose rows all have a zero count: the maximum-likelihood estimate
// of its coefficient is minus infinity (any direction that lowers only those
// rows' means raises the likelihood), so the fit is refused, naming it.
TEST(CountModels, AllZeroCellIsRefusedNamingTheLevel) {
    const Table t = make_table({numeric_column("y", {0, 0, 0, 0, 3, 1, 4, 1, 2, 5, 2, 1}),
                                categorical_column("site", {"north", "north", "north", "north", "east", "east", "east",
                                                            "east", "west", "west", "west", "west"}),
                                numeric_column("x", {0.1, 0.5, -0.3, 0.8, 1.2, -1.0, 0.4, 0.0, 0.3, -0.5, 0.9, 1.1})});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"site", "x"};
    spec.reference_levels["site"] = "east";
    spec.family = Family::NegativeBinomial;
    expect_input_error([&] { fit_model(t, spec); }, {"all-zero cell", "site=north", "minus infinity"});
}

// Probit separation is found as for logistic models: a column whose 1-rows
// all have y = 1.
TEST(CountModels, ProbitSeparationIsFound) {
    const Table t = make_table({numeric_column("y", {1, 1, 1, 0, 1, 0, 0, 1, 0, 1, 0, 0}),
                                numeric_column("g", {1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0}),
                                numeric_column("x", {0.1, 0.5, -0.3, 0.8, 1.2, -1.0, 0.4, 0.0, 0.3, -0.5, 0.9, 1.1})});
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"g", "x"};
    spec.family = Family::Probit;
    const FitResult f = fit_model(t, spec);
    EXPECT_TRUE(f.separation);
}
