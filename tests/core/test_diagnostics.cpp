// Regression diagnostics against statsmodels 0.13.5
// (tests/reference/make_diagnostics_reference.py; fixtures diag_ols, diag_wls,
// diag_logit, diag_aliased: OLSInfluence hat_matrix_diag,
// resid_studentized_internal/external, cooks_distance; GLM(Binomial)
// influence, resid_pearson, resid_deviance; ProbPlot(a = 3/8)), and against
// closed forms: the hat matrix has trace p, a two-group design has leverage
// 1/n_g, Cook's distance is the change in fitted values when the row is
// deleted, and the externally studentised residual uses the residual
// variance of that deletion fit. Flag lists are checked against the rules
// applied independently to the reference numbers.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <set>

#include "common/reference_fixtures.hpp"
#include "common/table_builder.hpp"
#include "moderato/estimation/diagnostics.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

struct Case {
    json j;
    Design d;
    FitResult f;
};

Case load(const std::string& name) {
    const fs::path path = reference_fixture(name + ".json");
    json j = read_fixture_json(path);
    const json& s = j.at("spec");
    ModelSpec spec;
    spec.outcome = s.at("outcome").get<std::string>();
    spec.predictors = s.at("predictors").get<std::vector<std::string>>();
    spec.interactions = s.at("interactions").get<std::vector<std::vector<std::string>>>();
    spec.family = parse_family(s.at("family").get<std::string>());
    if (!s.at("weights").is_null()) spec.weights = s.at("weights").get<std::string>();
    const Table t = read_csv((path.parent_path() / j.at("data").get<std::string>()).string(), CsvOptions{});
    Design d = build_design(t, spec);
    FitResult f = fit_design(d, spec);
    return {std::move(j), std::move(d), std::move(f)};
}

// Relative to the value, or to a hundredth of the largest |value| for values
// near zero (residuals cross zero).
void expect_vector(const Eigen::VectorXd& ours, const json& ref, double tol, const char* what) {
    SCOPED_TRACE(what);
    ASSERT_EQ(static_cast<std::size_t>(ours.size()), ref.size());
    double big = 0;
    for (const auto& v : ref) big = std::max(big, std::abs(v.get<double>()));
    double worst = 0;
    std::size_t at = 0;
    for (std::size_t i = 0; i < ref.size(); ++i) {
        const double r = ref[i].get<double>();
        const double e = std::abs(ours[static_cast<Eigen::Index>(i)] - r) / std::max(std::abs(r), 1e-2 * big);
        if (!(e <= worst)) {
            worst = e;
            at = i;
        }
    }
    EXPECT_LE(worst, tol) << "worst at observation " << at;
}

void expect_vector(const std::vector<double>& ours, const json& ref, double tol, const char* what) {
    expect_vector(Eigen::Map<const Eigen::VectorXd>(ours.data(), static_cast<Eigen::Index>(ours.size())), ref, tol,
                  what);
}

// The rows the three rules flag, from the reference numbers (common practice:
// |residual| > 3, leverage > 3p/n, Cook's distance > 4/n).
std::map<std::size_t, unsigned> expected_flags(const json& r, const char* residual_key) {
    const auto n = r.at("n").get<double>();
    const auto p = r.at("rank").get<double>();
    std::map<std::size_t, unsigned> out;
    for (std::size_t i = 0; i < r.at("leverage").size(); ++i) {
        unsigned f = 0;
        if (std::abs(r.at(residual_key)[i].get<double>()) > 3.0) f |= FlagResidual;
        if (r.at("leverage")[i].get<double>() > 3.0 * p / n) f |= FlagLeverage;
        if (r.at("cooks_distance")[i].get<double>() > 4.0 / n) f |= FlagCooks;
        if (f) out[i] = f;
    }
    return out;
}

void expect_flags(const Diagnostics& d, const Design& design, const std::map<std::size_t, unsigned>& expected) {
    std::map<std::size_t, unsigned> ours;
    for (const auto& r : d.flagged) {
        ours[r.observation] = r.flags;
        EXPECT_EQ(r.table_row, design.rows[r.observation]);
    }
    EXPECT_EQ(ours, expected);
    // most influential first
    for (std::size_t k = 1; k < d.flagged.size(); ++k)
        EXPECT_GE(d.cooks_distance[static_cast<Eigen::Index>(d.flagged[k - 1].observation)],
                  d.cooks_distance[static_cast<Eigen::Index>(d.flagged[k].observation)]);
}

constexpr double kTol = 1e-8;  // tests/reference/README.md: the 1e-8 budget belongs to the C++ code

}  // namespace

TEST(DiagnosticsReference, OlsMatchesStatsmodelsOlsInfluence) {
    const Case c = load("diag_ols");
    const json& r = c.j.at("diagnostics");  // statsmodels 0.13.5 OLSInfluence
    const Diagnostics d = diagnostics(c.d, c.f);
    EXPECT_EQ(d.p, r.at("rank").get<int>());
    expect_vector(d.leverage, r.at("leverage"), kTol, "hat_matrix_diag");
    expect_vector(d.standardised, r.at("standardised"), kTol, "resid_studentized_internal");
    expect_vector(d.studentised, r.at("studentised"), kTol, "resid_studentized_external");
    expect_vector(d.cooks_distance, r.at("cooks_distance"), kTol, "cooks_distance");
    expect_vector(d.fitted, r.at("fitted"), kTol, "fitted");
    expect_vector(d.residuals, r.at("residuals"), kTol, "residuals");
    expect_vector(d.pearson, r.at("pearson"), kTol, "resid");
    // ProbPlot(a = 3/8) of the externally studentised residuals
    const QuantilePlot q = normal_quantile_plot(d.quantile_residual());
    expect_vector(q.observed, r.at("qq").at("observed"), kTol, "qq sorted_data");
    expect_vector(q.theoretical, r.at("qq").at("theoretical"), 1e-12, "qq theoretical_quantiles");
    const auto expected = expected_flags(r, "studentised");
    // the planted outlier (row 17) and high-leverage row (row 42) are among them
    ASSERT_TRUE(expected.count(17) && expected.count(42));
    EXPECT_TRUE(expected.at(17) & FlagResidual);
    EXPECT_TRUE(expected.at(42) & FlagLeverage);
    expect_flags(d, c.d, expected);
}

TEST(DiagnosticsReference, WeightedMatchesStatsmodelsWhitenedFit) {
    const Case c = load("diag_wls");
    const json& r = c.j.at("diagnostics");  // statsmodels 0.13.5 OLSInfluence of the whitened fit
    const Diagnostics d = diagnostics(c.d, c.f);
    EXPECT_TRUE(d.weighted);
    expect_vector(d.leverage, r.at("leverage"), kTol, "hat_matrix_diag");
    expect_vector(d.standardised, r.at("standardised"), kTol, "resid_studentized_internal");
    expect_vector(d.studentised, r.at("studentised"), kTol, "resid_studentized_external");
    expect_vector(d.cooks_distance, r.at("cooks_distance"), kTol, "cooks_distance");
    expect_vector(d.pearson, r.at("pearson"), kTol, "sqrt(w) e");
    expect_vector(d.residuals, r.at("residuals"), kTol, "y - fitted");
    expect_vector(d.plot_residual(), r.at("pearson"), kTol, "plotted residual is sqrt(w) e");
    expect_flags(d, c.d, expected_flags(r, "studentised"));
}

TEST(DiagnosticsReference, LogisticMatchesStatsmodelsGlmInfluence) {
    const Case c = load("diag_logit");
    const json& r = c.j.at("diagnostics");  // statsmodels 0.13.5 GLM(Binomial) influence
    const Diagnostics d = diagnostics(c.d, c.f);
    EXPECT_EQ(d.family, Family::Logistic);
    EXPECT_TRUE(d.studentised.size() == 0);
    EXPECT_EQ(d.scale, 1.0);
    // the IRLS fit converges to ~1e-10 relative; the influence measures follow
    expect_vector(d.leverage, r.at("leverage"), kTol, "hat_matrix_diag");
    expect_vector(d.pearson, r.at("pearson"), kTol, "resid_pearson");
    expect_vector(d.deviance, r.at("deviance"), kTol, "resid_deviance");
    expect_vector(d.standardised, r.at("standardised"), kTol, "resid_studentized");
    expect_vector(d.standardised_deviance, r.at("standardised_deviance"), kTol, "deviance / sqrt(1 - h)");
    expect_vector(d.cooks_distance, r.at("cooks_distance"), kTol, "cooks_distance");
    expect_vector(d.fitted, r.at("fitted"), kTol, "fitted probability");
    const QuantilePlot q = normal_quantile_plot(d.quantile_residual());
    expect_vector(q.observed, r.at("qq").at("observed"), kTol, "qq sorted_data");
    expect_vector(q.theoretical, r.at("qq").at("theoretical"), 1e-12, "qq theoretical_quantiles");
    expect_flags(d, c.d, expected_flags(r, "standardised"));
}

TEST(DiagnosticsReference, AliasedColumnIsLeftOut) {
    const Case c = load("diag_aliased");
    ASSERT_EQ(c.f.aliased.size(), 1u);
    EXPECT_EQ(c.f.aliased.front(), "x3");
    const json& r = c.j.at("diagnostics");  // statsmodels 0.13.5 OLSInfluence without x3
    const Diagnostics d = diagnostics(c.d, c.f);
    EXPECT_EQ(d.p, 3);
    expect_vector(d.leverage, r.at("leverage"), kTol, "hat_matrix_diag");
    expect_vector(d.studentised, r.at("studentised"), kTol, "resid_studentized_external");
    expect_vector(d.cooks_distance, r.at("cooks_distance"), kTol, "cooks_distance (p = rank)");
    expect_flags(d, c.d, expected_flags(r, "studentised"));
}

// ---------------------------------------------------------------------------
// Closed forms.

namespace {

struct Drawn {
    Table t;
    ModelSpec spec;
};

Drawn drawn(unsigned seed, int n, bool weighted) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> N(0, 1);
    std::uniform_real_distribution<double> U(0.5, 3.0);
    std::vector<double> x(n), z(n), y(n), w(n);
    for (int i = 0; i < n; ++i) {
        x[i] = N(rng);
        z[i] = 2 + N(rng);
        w[i] = U(rng);
        y[i] = 1 + x[i] - 0.5 * z[i] + 0.3 * x[i] * z[i] + N(rng) / std::sqrt(w[i]);
    }
    Drawn d{
        make_table({numeric_column("y", y), numeric_column("x", x), numeric_column("z", z), numeric_column("w", w)}),
        {}};
    d.spec.outcome = "y";
    d.spec.predictors = {"x", "z"};
    d.spec.interactions = {{"x", "z"}};
    if (weighted) d.spec.weights = "w";
    return d;
}

}  // namespace

TEST(DiagnosticsClosedForm, LeveragesSumToTheRank) {
    // trace of the hat matrix = p (closed form)
    for (bool weighted : {false, true}) {
        const Drawn dr = drawn(7, 80, weighted);
        const Design d = build_design(dr.t, dr.spec);
        const Diagnostics g = diagnostics(d, fit_design(d, dr.spec));
        EXPECT_NEAR(g.leverage.sum(), 4.0, 1e-12);
        EXPECT_GT(g.leverage.minCoeff(), 0.0);
        EXPECT_LT(g.leverage.maxCoeff(), 1.0);
    }
}

TEST(DiagnosticsClosedForm, TwoGroupLeverageIsOneOverGroupSize) {
    // y ~ g with g 0/1: the hat matrix averages within groups, h = 1/n_g (closed form)
    std::vector<double> g, y;
    for (int i = 0; i < 7; ++i) g.push_back(1), y.push_back(i * 0.7);
    for (int i = 0; i < 13; ++i) g.push_back(0), y.push_back(1 + i * 0.3);
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"g"};
    const Design d = build_design(make_table({numeric_column("y", y), numeric_column("g", g)}), s);
    const Diagnostics diag = diagnostics(d, fit_design(d, s));
    for (Eigen::Index i = 0; i < 20; ++i) EXPECT_NEAR(diag.leverage[i], i < 7 ? 1.0 / 7 : 1.0 / 13, 1e-14);
}

TEST(DiagnosticsClosedForm, DeletionIdentitiesHoldAgainstRefits) {
    // Cook's D_i = |X b - X b_(i)|^2_W / (p s^2) and the externally studentised
    // residual uses s_(i) of the refit without row i (definitions).
    for (bool weighted : {false, true}) {
        SCOPED_TRACE(weighted ? "weighted" : "unweighted");
        const Drawn dr = drawn(11, 40, weighted);
        const Design d = build_design(dr.t, dr.spec);
        const FitResult f = fit_design(d, dr.spec);
        const Diagnostics g = diagnostics(d, f);
        const double p = 4, n = 40;
        const double s2 = g.scale;
        for (int i : {0, 7, 23, 39}) {
            Design di = d;
            const Eigen::Index m = d.X.rows() - 1;
            di.X.resize(m, d.X.cols());
            di.y.resize(m);
            if (weighted) di.weights.resize(m);
            for (Eigen::Index r = 0, k = 0; r < d.X.rows(); ++r) {
                if (r == i) continue;
                di.X.row(k) = d.X.row(r);
                di.y[k] = d.y[r];
                if (weighted) di.weights[k] = d.weights[r];
                ++k;
            }
            di.rows.resize(static_cast<std::size_t>(m));
            const FitResult fi = fit_design(di, dr.spec);
            const Eigen::VectorXd diff = d.X * (f.beta - fi.beta);
            double num = 0;
            for (Eigen::Index r = 0; r < d.X.rows(); ++r) num += (weighted ? d.weights[r] : 1.0) * diff[r] * diff[r];
            EXPECT_NEAR(g.cooks_distance[i], num / (p * s2), 1e-10 * num / (p * s2));
            const double s2i = fi.rss / (n - 1 - p);
            const double wi = weighted ? d.weights[i] : 1.0;
            const double t = std::sqrt(wi) * f.residuals[i] / std::sqrt(s2i * (1 - g.leverage[i]));
            EXPECT_NEAR(g.studentised[i], t, 1e-10 * std::abs(t));
        }
    }
}

TEST(DiagnosticsClosedForm, RowWithLeverageOneIsFlaggedWithoutResidual) {
    // A level seen in one row only: its dummy fixes that row's fit, h = 1 (closed form).
    std::vector<double> x, y;
    std::vector<std::string> grp;
    for (int i = 0; i < 30; ++i) {
        x.push_back(i);
        y.push_back(2 + 0.5 * i + ((i * 7) % 5 - 2) * 0.3);
        grp.push_back(i == 12 ? "solo" : (i % 2 ? "a" : "b"));
    }
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x", "grp"};
    const Design d =
        build_design(make_table({numeric_column("y", y), numeric_column("x", x), categorical_column("grp", grp)}), s);
    const Diagnostics g = diagnostics(d, fit_design(d, s));
    EXPECT_NEAR(g.leverage[12], 1.0, 1e-12);
    EXPECT_TRUE(std::isnan(g.studentised[12]));
    EXPECT_TRUE(std::isnan(g.cooks_distance[12]));
    ASSERT_FALSE(g.flagged.empty());
    EXPECT_EQ(g.flagged.front().observation, 12u);  // leverage 1 sorts first
    EXPECT_TRUE(g.flagged.front().flags & FlagLeverage);
    for (Eigen::Index i = 0; i < 30; ++i) {
        if (i != 12) {
            EXPECT_TRUE(std::isfinite(g.studentised[i])) << i;
        }
    }
}

TEST(DiagnosticsClosedForm, FlaggedRowsNameTheirTableRowsPastMissingValues) {
    // Rows with a missing value are not used: the flagged observation maps to
    // its own table row (and so to its file line).
    Drawn dr = drawn(5, 60, false);
    Column& x = *dr.t.find("x");
    x.numbers[3] = missing_value();
    x.numbers[10] = missing_value();
    Column& y = *dr.t.find("y");
    y.numbers[40] += 25;  // an outlier at table row 40 (observation 38)
    const Design d = build_design(dr.t, dr.spec);
    ASSERT_EQ(d.n(), 58u);
    const Diagnostics g = diagnostics(d, fit_design(d, dr.spec));
    bool found = false;
    for (const auto& r : g.flagged)
        if (r.table_row == 40) {
            found = true;
            EXPECT_EQ(r.observation, 38u);
            EXPECT_TRUE(r.flags & FlagResidual);
        }
    EXPECT_TRUE(found);
    EXPECT_EQ(dr.t.row_location(40), "line 42");  // header on line 1
}

TEST(DiagnosticsClosedForm, RulesAreStated) {
    const Drawn dr = drawn(3, 50, false);
    const Design d = build_design(dr.t, dr.spec);
    const Diagnostics g = diagnostics(d, fit_design(d, dr.spec));
    EXPECT_DOUBLE_EQ(g.leverage_threshold, 3.0 * 4 / 50);  // 3p/n, common practice
    EXPECT_DOUBLE_EQ(g.cooks_threshold, 4.0 / 50);         // 4/n, common practice
    EXPECT_DOUBLE_EQ(g.residual_threshold, 3.0);
    EXPECT_EQ(g.residual_rule, "|externally studentised residual| > 3");
    // Written by report_text's rule, four significant digits with trailing zeros (12/50 = 0.24, 4/50 = 0.08).
    EXPECT_EQ(g.leverage_rule, "leverage > 3p/n = 0.2400");
    EXPECT_EQ(g.cooks_rule, "Cook's distance > 4/n = 0.08000");
}

TEST(DiagnosticsClosedForm, BlomPositionsAndQuantiles) {
    // (i - 3/8) / (n + 1/4), Blom 1958 (common practice)
    EXPECT_DOUBLE_EQ(blom_position(1, 10), 0.625 / 10.25);
    EXPECT_DOUBLE_EQ(blom_position(10, 10), 9.625 / 10.25);
    Eigen::VectorXd v(5);
    v << 3.0, std::nan(""), -1.0, 2.0, 0.5;
    const QuantilePlot q = normal_quantile_plot(v);
    ASSERT_EQ(q.order, (std::vector<std::size_t>{2, 4, 3, 0}));
    EXPECT_EQ(q.observed, (std::vector<double>{-1.0, 0.5, 2.0, 3.0}));
    // symmetric positions give quantiles of opposite sign; Φ^{-1}(0.5) = 0
    EXPECT_NEAR(q.theoretical[0], -q.theoretical[3], 1e-15);
    EXPECT_NEAR(q.theoretical[1], -q.theoretical[2], 1e-15);
    // Φ^{-1}(0.625/4.25): scipy 1.10 norm.ppf(0.625/4.25) = -1.0491313979639707
    EXPECT_NEAR(q.theoretical[0], -1.0491313979639707, 1e-13);
    Eigen::VectorXd odd(3);
    odd << 1, 2, 3;
    EXPECT_EQ(normal_quantile_plot(odd).theoretical[1], 0.0);
}

TEST(DiagnosticsClosedForm, BinnedResidualMeans) {
    // Means within equal-count bins in order of the fitted value (arithmetic).
    Eigen::VectorXd fitted(7), res(7);
    fitted << 0.9, 0.1, 0.5, 0.3, 0.7, 0.2, 0.8;
    res << 9, 1, 5, 3, 7, 2, 8;
    const BinnedResiduals b = binned_residuals(fitted, res, 3);
    // sorted by fitted: 0.1 0.2 | 0.3 0.5 | 0.7 0.8 0.9 (positions [0,2) [2,4) [4,7))
    ASSERT_EQ(b.count, (std::vector<std::size_t>{2, 2, 3}));
    EXPECT_DOUBLE_EQ(b.residual_mean[0], 1.5);
    EXPECT_DOUBLE_EQ(b.residual_mean[1], 4.0);
    EXPECT_DOUBLE_EQ(b.residual_mean[2], 8.0);
    EXPECT_DOUBLE_EQ(b.fitted_mean[2], (0.7 + 0.8 + 0.9) / 3);
    EXPECT_EQ(binned_residuals(fitted, res, 20).count.size(), 7u);
}

TEST(DiagnosticsClosedForm, BinnedResidualIntervals) {
    // mean ± t(0.975, m - 1) s / sqrt(m) within each bin (closed form), with
    // the t quantiles from scipy 1.10: t.ppf(0.975, 1) = 12.706204736432095,
    // t.ppf(0.975, 2) = 4.302652729911275, t.ppf(0.95, 2) = 2.919985580355516.
    Eigen::VectorXd fitted(7), res(7);
    fitted << 0.9, 0.1, 0.5, 0.3, 0.7, 0.2, 0.8;
    res << 9, 1, 5, 3, 7, 2, 8;
    const BinnedResiduals b = binned_residuals(fitted, res, 3);
    EXPECT_EQ(b.level, 0.95);
    ASSERT_EQ(b.residual_lower.size(), 3u);
    ASSERT_EQ(b.residual_upper.size(), 3u);
    // bin 0 holds 1 and 2: s = sqrt(0.5), half width 12.7062 * sqrt(0.5) / sqrt(2) = 12.7062 / 2
    EXPECT_NEAR(b.residual_lower[0], 1.5 - 12.706204736432095 / 2, 1e-9);
    EXPECT_NEAR(b.residual_upper[0], 1.5 + 12.706204736432095 / 2, 1e-9);
    // bin 1 holds 3 and 5: s = sqrt(2), half width 12.7062 * sqrt(2) / sqrt(2)
    EXPECT_NEAR(b.residual_upper[1], 4.0 + 12.706204736432095, 1e-9);
    // bin 2 holds 7, 8 and 9: s = 1, half width 4.30265 / sqrt(3)
    EXPECT_NEAR(b.residual_lower[2], 8.0 - 4.302652729911275 / std::sqrt(3.0), 1e-9);
    EXPECT_NEAR(b.residual_upper[2], 8.0 + 4.302652729911275 / std::sqrt(3.0), 1e-9);
    // Another level: the 90 % interval of bin 2.
    const BinnedResiduals b90 = binned_residuals(fitted, res, 3, 0.90);
    EXPECT_NEAR(b90.residual_upper[2] - 8.0, 2.919985580355516 / std::sqrt(3.0), 1e-9);
    // A bin of one value has no interval.
    const BinnedResiduals single = binned_residuals(fitted, res, 7);
    EXPECT_TRUE(std::isnan(single.residual_lower[0]));
    EXPECT_TRUE(std::isnan(single.residual_upper[0]));
    EXPECT_DOUBLE_EQ(single.residual_mean[0], 1.0);
}

TEST(DiagnosticsClosedForm, CooksContourGivesThatDistance) {
    // Plugging the contour back into D = r^2 h / (p (1 - h)) (the definition).
    for (double h : {0.01, 0.2, 0.5, 0.9})
        for (double D : {0.5, 1.0}) {
            const double r = cooks_contour(D, 5, h);
            EXPECT_NEAR(r * r * h / (5 * (1 - h)), D, 1e-14);
        }
    EXPECT_TRUE(std::isnan(cooks_contour(1, 3, 0)));
    EXPECT_TRUE(std::isnan(cooks_contour(1, 3, 1)));
}

TEST(DiagnosticsClosedForm, MismatchedFitIsRefused) {
    const Drawn dr = drawn(3, 30, false);
    const Design d = build_design(dr.t, dr.spec);
    FitResult f = fit_design(d, dr.spec);
    f.fitted.resize(5);
    EXPECT_THROW(diagnostics(d, f), InputError);
}
