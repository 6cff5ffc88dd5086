// Properties of the fitting engine that follow from closed-form identities;
// the data are random (seeded) because the identities hold for any data.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "common/table_builder.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/least_squares.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {

struct Sim {
    std::vector<double> y, x, z, g, w, cl;
};

Sim simulate(std::size_t n, unsigned seed, bool binary_outcome = false) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> N(0, 1);
    std::uniform_real_distribution<double> U(0, 1);
    Sim s;
    for (std::size_t i = 0; i < n; ++i) {
        const double x = N(rng), z = 1 + N(rng), g = U(rng) < 0.4 ? 1 : 0;
        const double eta = 0.3 + 0.8 * x - 0.5 * z + 0.7 * g - 0.6 * x * g;
        s.x.push_back(x);
        s.z.push_back(z);
        s.g.push_back(g);
        s.w.push_back(1 + std::floor(3 * U(rng)));
        s.cl.push_back(std::floor(U(rng) * 25));
        s.y.push_back(binary_outcome ? (U(rng) < 1 / (1 + std::exp(-eta)) ? 1 : 0)
                                     : eta + N(rng) * (1 + 0.5 * std::abs(x)));
    }
    return s;
}

Table table_of(const Sim& s) {
    return make_table({numeric_column("y", s.y), numeric_column("x", s.x), numeric_column("z", s.z),
                       numeric_column("g", s.g), numeric_column("w", s.w), numeric_column("cl", s.cl)});
}

ModelSpec base_spec() {
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"z"};
    s.interactions = {{"x", "g"}};
    return s;
}

}  // namespace

// Closed form: integer weights are frequency weights for the point estimates
// and the weighted residual sum of squares.
TEST(FitProperties, IntegerWeightsEqualReplicatedRows) {
    const Sim s = simulate(300, 11);
    Sim rep;
    for (std::size_t i = 0; i < s.y.size(); ++i)
        for (int k = 0; k < static_cast<int>(s.w[i]); ++k) {
            rep.y.push_back(s.y[i]);
            rep.x.push_back(s.x[i]);
            rep.z.push_back(s.z[i]);
            rep.g.push_back(s.g[i]);
            rep.w.push_back(1);
            rep.cl.push_back(s.cl[i]);
        }
    ModelSpec sw = base_spec();
    sw.weights = "w";
    const FitResult a = fit_model(table_of(s), sw);
    const FitResult b = fit_model(table_of(rep), base_spec());
    for (std::size_t j = 0; j < a.coefficients.size(); ++j)
        EXPECT_LT(rel(a.coefficients[j].estimate, b.coefficients[j].estimate), 1e-12) << a.coefficients[j].term;
    EXPECT_LT(rel(a.rss, b.rss), 1e-12);
    EXPECT_LT(rel(a.r_squared, b.r_squared), 1e-12);
}

// Closed form: an exactly collinear column is aliased and the rest of the fit
// equals the fit without it.
TEST(FitProperties, CollinearColumnIsAliasedNotDropped) {
    Sim s = simulate(200, 12);
    Table t = table_of(s);
    std::vector<double> z2;
    for (double v : s.z) z2.push_back(2 * v);
    t.columns.push_back(numeric_column("z2", z2));
    ModelSpec spec = base_spec();
    spec.predictors = {"z", "z2"};
    const FitResult with = fit_model(t, spec);
    const FitResult without = fit_model(t, base_spec());
    ASSERT_EQ(with.aliased, std::vector<std::string>{"z2"});
    EXPECT_EQ(with.rank, static_cast<int>(without.coefficients.size()));
    const int j = with.index_of("z2");
    EXPECT_TRUE(with.coefficients[static_cast<std::size_t>(j)].aliased);
    EXPECT_TRUE(std::isnan(with.coefficients[static_cast<std::size_t>(j)].estimate));
    for (const auto& c : without.coefficients) {
        const auto& w = with.coefficients[static_cast<std::size_t>(with.index_of(c.term))];
        EXPECT_LT(rel(w.estimate, c.estimate), 1e-11) << c.term;
        EXPECT_LT(rel(w.std_error, c.std_error), 1e-11) << c.term;
    }
    ASSERT_FALSE(with.warnings.empty());
    EXPECT_NE(with.warnings[0].find("'z2'"), std::string::npos);
}

// Common practice for parallel numerics: fixed blocks reduced in order give
// bit-identical results whatever the thread count.
TEST(FitProperties, ResultsDoNotDependOnThreadCount) {
    const Sim s = simulate(100000, 13);
    FitOptions blocked;
    blocked.extended_budget = 0;  // the blocked double path, where threads matter
    ModelSpec spec = base_spec();
    spec.se = SeKind::HC3;
    spec.threads = 1;
    const FitResult one = fit_model(table_of(s), spec, blocked);
    spec.threads = 2;
    const FitResult two = fit_model(table_of(s), spec, blocked);
    spec.threads = 5;
    const FitResult five = fit_model(table_of(s), spec, blocked);
    EXPECT_FALSE(one.extended_precision);
    for (std::size_t j = 0; j < one.coefficients.size(); ++j) {
        EXPECT_EQ(one.coefficients[j].estimate, two.coefficients[j].estimate);
        EXPECT_EQ(one.coefficients[j].std_error, two.coefficients[j].std_error);
        EXPECT_EQ(one.coefficients[j].estimate, five.coefficients[j].estimate);
        EXPECT_EQ(one.coefficients[j].std_error, five.coefficients[j].std_error);
    }
}

// The blocked double path and the long double path solve the same problem:
// on well-conditioned data they agree far below statistical precision
// (closed form: same least-squares solution).
TEST(FitProperties, DoubleAndExtendedPathsAgree) {
    const Sim s = simulate(5000, 14);
    const Design d = build_design(table_of(s), base_spec());
    LeastSquaresOptions ext, dbl;
    dbl.extended_budget = 0;
    const auto a = least_squares(d.X, d.y, {}, ext);
    const auto b = least_squares(d.X, d.y, {}, dbl);
    ASSERT_TRUE(a.extended_precision);
    ASSERT_FALSE(b.extended_precision);
    for (Eigen::Index j = 0; j < a.coef.size(); ++j) EXPECT_LT(rel(b.coef[j], a.coef[j]), 1e-11);
    EXPECT_LT(rel(b.rss, a.rss), 1e-12);
}

// Large problems may take their factor from the cross-products, which square
// the condition number; that road must be refused where it would lose digits
// the QR keeps. Here a column nearly repeats another (they differ by 1e-6 of
// its size), so the condition number is about 1e6: the double-precision QR
// still carries some 9 digits, the cross-products would carry about 4.
// Reference: the long double QR of the same problem (common practice:
// normal-equations error grows with the squared condition number).
TEST(FitProperties, NearlyAliasedColumnsKeepTheQrAccuracy) {
    const Sim s = simulate(5000, 16);
    Eigen::MatrixXd X(5000, 4);
    Eigen::VectorXd y(5000), w(5000);
    std::mt19937_64 rng(17);
    std::normal_distribution<double> N(0, 1);
    for (Eigen::Index i = 0; i < X.rows(); ++i) {
        const auto r = static_cast<std::size_t>(i);
        X.row(i) << 1.0, s.x[r], s.z[r], s.x[r] + 1e-6 * N(rng);
        y[i] = s.y[r] + 1e-3 * X(i, 3);
        w[i] = s.w[r];
    }
    LeastSquaresOptions ext, dbl;
    dbl.extended_budget = 0;
    for (const Eigen::VectorXd& weights : {Eigen::VectorXd(), w}) {
        const auto a = least_squares(X, y, weights, ext);
        const auto b = least_squares(X, y, weights, dbl);
        ASSERT_FALSE(b.extended_precision);
        ASSERT_EQ(b.kept.size(), 4u);
        for (Eigen::Index j = 0; j < 4; ++j) EXPECT_LT(rel(b.coef[j], a.coef[j]), 1e-6) << j;
        const Eigen::MatrixXd Va = a.inverse_factor * a.inverse_factor.transpose();
        const Eigen::MatrixXd Vb = b.inverse_factor * b.inverse_factor.transpose();
        for (Eigen::Index j = 0; j < 4; ++j) EXPECT_LT(rel(Vb(j, j), Va(j, j)), 1e-6) << j;
    }
}

// The same on a well-conditioned weighted problem, where the large-problem
// road may use the cross-products: the two answers agree to 1e-11 in the
// coefficients and in (X'WX)^{-1}, and the weighted RSS to 1e-12
// (closed form: one least-squares solution).
TEST(FitProperties, WeightedDoubleAndExtendedPathsAgree) {
    const Sim s = simulate(5000, 18);
    const Design d = build_design(table_of(s), base_spec());
    const Eigen::VectorXd w = Eigen::Map<const Eigen::VectorXd>(s.w.data(), static_cast<Eigen::Index>(s.w.size()));
    LeastSquaresOptions ext, dbl;
    dbl.extended_budget = 0;
    const auto a = least_squares(d.X, d.y, w, ext);
    const auto b = least_squares(d.X, d.y, w, dbl);
    ASSERT_FALSE(b.extended_precision);
    for (Eigen::Index j = 0; j < a.coef.size(); ++j) EXPECT_LT(rel(b.coef[j], a.coef[j]), 1e-11);
    const Eigen::MatrixXd Va = a.inverse_factor * a.inverse_factor.transpose();
    const Eigen::MatrixXd Vb = b.inverse_factor * b.inverse_factor.transpose();
    EXPECT_LT((Vb - Va).cwiseAbs().maxCoeff() / Va.cwiseAbs().maxCoeff(), 1e-11);
    EXPECT_LT(rel(b.rss, a.rss), 1e-12);
}

// Closed forms: HC1 = n/(n-k) HC0; CR1 with one row per cluster equals HC1;
// a one-term Wald F equals t squared; with one product term the R²-change F
// equals the classical t squared of that term.
TEST(FitProperties, CovarianceAndTestIdentities) {
    Sim s = simulate(400, 15);
    std::vector<double> own(s.y.size());
    for (std::size_t i = 0; i < own.size(); ++i) own[i] = static_cast<double>(i);
    Table t = table_of(s);
    t.columns.push_back(numeric_column("row", own));
    ModelSpec spec = base_spec();
    spec.se = SeKind::HC0;
    const FitResult hc0 = fit_model(t, spec);
    spec.se = SeKind::HC1;
    const FitResult hc1 = fit_model(t, spec);
    spec.se = SeKind::Cluster;
    spec.cluster = "row";
    const FitResult cr1 = fit_model(t, spec);
    const double n = 400, k = 5;
    for (std::size_t j = 0; j < hc0.coefficients.size(); ++j) {
        EXPECT_LT(rel(hc1.coefficients[j].std_error, hc0.coefficients[j].std_error * std::sqrt(n / (n - k))), 1e-12);
        EXPECT_LT(rel(cr1.coefficients[j].std_error, hc1.coefficients[j].std_error), 1e-11);
    }
    spec = base_spec();
    spec.wald_tests = {{"x×g"}};
    const FitResult cl = fit_model(t, spec);
    const auto& c = cl.coefficients[static_cast<std::size_t>(cl.index_of("x×g"))];
    ASSERT_EQ(cl.wald_tests.size(), 1u);
    EXPECT_LT(rel(cl.wald_tests[0].statistic, c.statistic * c.statistic), 1e-10);
    EXPECT_LT(rel(cl.wald_tests[0].p_value, c.p_value), 1e-9);
    ASSERT_TRUE(cl.comparison.has_value());
    EXPECT_LT(rel(cl.comparison->f_statistic, c.statistic * c.statistic), 1e-9);
    EXPECT_LT(rel(cl.comparison->p_value, c.p_value), 1e-8);
}

// Closed form: with two predictors, VIF = 1 / (1 - r²), r their correlation.
TEST(FitProperties, VifOfTwoPredictors) {
    const Sim s = simulate(250, 16);
    std::vector<double> u;
    for (std::size_t i = 0; i < s.x.size(); ++i) u.push_back(s.x[i] + 0.7 * s.z[i]);
    Table t = table_of(s);
    t.columns.push_back(numeric_column("u", u));
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "u"};
    const FitResult f = fit_model(t, spec);
    double mx = 0, mu = 0;
    for (std::size_t i = 0; i < u.size(); ++i) {
        mx += s.x[i];
        mu += u[i];
    }
    mx /= static_cast<double>(u.size());
    mu /= static_cast<double>(u.size());
    double sxy = 0, sxx = 0, syy = 0;
    for (std::size_t i = 0; i < u.size(); ++i) {
        sxy += (s.x[i] - mx) * (u[i] - mu);
        sxx += (s.x[i] - mx) * (s.x[i] - mx);
        syy += (u[i] - mu) * (u[i] - mu);
    }
    const double r2 = sxy * sxy / (sxx * syy);
    EXPECT_LT(rel(f.coefficients[1].vif, 1 / (1 - r2)), 1e-10);
    EXPECT_LT(rel(f.coefficients[2].vif, 1 / (1 - r2)), 1e-10);
    EXPECT_TRUE(std::isnan(f.coefficients[0].vif));
}

namespace {

// 1 / (1 - r^2) of two columns (the VIF of either in a model with just these two slopes; definition).
double two_column_vif(const std::vector<double>& a, const std::vector<double>& b) {
    const double n = static_cast<double>(a.size());
    long double ma = 0, mb = 0, sab = 0, saa = 0, sbb = 0;
    for (std::size_t i = 0; i < a.size(); ++i) ma += a[i], mb += b[i];
    ma /= n, mb /= n;
    for (std::size_t i = 0; i < a.size(); ++i) {
        sab += (a[i] - ma) * (b[i] - mb);
        saa += (a[i] - ma) * (a[i] - ma);
        sbb += (b[i] - mb) * (b[i] - mb);
    }
    return static_cast<double>(saa * sbb / (saa * sbb - sab * sab));
}

}  // namespace

// A count model's VIFs describe its predictors, not its working weights:
// the same as for a linear model of the same columns (definition above),
// by the centred cross-products and, for a nearly collinear pair, by the
// least-squares factor they fall back to.
TEST(FitProperties, VifOfACountModelIsThatOfItsPredictors) {
    const Sim s = simulate(400, 18);
    for (const double tie : {0.7, 2e-5}) {
        std::vector<double> u, k;
        for (std::size_t i = 0; i < s.x.size(); ++i) {
            u.push_back(s.x[i] + tie * s.z[i]);
            k.push_back(std::floor(std::abs(s.y[i])));
        }
        Table t = table_of(s);
        t.columns.push_back(numeric_column("u", u));
        t.columns.push_back(numeric_column("k", k));
        ModelSpec spec;
        spec.outcome = "k";
        spec.predictors = {"x", "u"};
        spec.family = Family::Poisson;
        const FitResult f = fit_model(t, spec);
        const double want = two_column_vif(s.x, u);
        const double tol = tie > 0.1 ? 1e-10 : 1e-5;  // r^2 itself keeps fewer digits near 1
        EXPECT_LT(rel(f.coefficients[1].vif, want), tol) << "tie " << tie << ", VIF " << want;
        EXPECT_LT(rel(f.coefficients[2].vif, want), tol) << "tie " << tie;
        EXPECT_TRUE(std::isnan(f.coefficients[0].vif));
    }
}

// Closed form: at the maximum-likelihood estimate the score X'(y - p) is zero.
TEST(FitProperties, LogisticSolvesTheScoreEquations) {
    const Sim s = simulate(3000, 17, true);
    ModelSpec spec = base_spec();
    spec.family = Family::Logistic;
    const Table t = table_of(s);
    const FitResult f = fit_model(t, spec);
    ASSERT_TRUE(f.converged);
    EXPECT_TRUE(f.warnings.empty());
    const Design d = build_design(t, spec);
    const Eigen::VectorXd score = d.X.transpose() * f.residuals;
    EXPECT_LT(score.cwiseAbs().maxCoeff(), 1e-8);
    EXPECT_NEAR(f.deviance, -2 * f.log_likelihood, 1e-9);
    EXPECT_GT(f.mcfadden_r2, 0);
    EXPECT_LT(f.mcfadden_r2, 1);
}

// Common practice: a column that alone separates the outcome means no finite
// estimate; the fit must say so and name the column.
TEST(FitProperties, LogisticSeparationIsNamed) {
    Sim s = simulate(400, 18, true);
    for (std::size_t i = 0; i < s.y.size(); ++i)
        if (s.g[i] == 1) s.y[i] = 1;  // every g = 1 row has y = 1: quasi-complete
    ModelSpec spec;
    spec.outcome = "y";
    spec.predictors = {"x", "g"};
    spec.family = Family::Logistic;
    const FitResult f = fit_model(table_of(s), spec);
    ASSERT_FALSE(f.warnings.empty());
    EXPECT_EQ(f.warnings.back(),
              "quasi-complete separation by 'g': every row with g = 1 has y = 1; the estimates and standard errors "
              "are not reliable");

    Sim c = simulate(200, 19, true);
    for (std::size_t i = 0; i < c.y.size(); ++i) c.y[i] = c.x[i] > 0.2 ? 1 : 0;  // complete separation by x
    spec.predictors = {"x", "z"};
    const FitResult g = fit_model(table_of(c), spec);
    ASSERT_FALSE(g.warnings.empty());
    EXPECT_NE(g.warnings.back().find("complete separation by 'x'"), std::string::npos) << g.warnings.back();
}

TEST(FitProperties, FewClustersWarn) {
    const Sim s = simulate(300, 20);
    ModelSpec spec = base_spec();
    spec.cluster = "cl";
    spec.se = SeKind::Cluster;
    const FitResult f = fit_model(table_of(s), spec);
    EXPECT_EQ(f.df_inference, 24.0);  // G - 1 with 25 clusters: common practice (CR1 with t(G-1))
    ASSERT_FALSE(f.warnings.empty());
    EXPECT_EQ(f.warnings[0], "only 25 clusters: cluster-robust standard errors are unreliable with fewer than 30");
}

// Closed form (definition of the R²-change test): F = ((RSS_r - RSS_f) / q) /
// (RSS_f / df_f) from two separate fits; checked both where the product
// columns come last (read off the factorisation) and where a cubic term
// follows them (refit).
TEST(FitProperties, RSquaredChangeTestMatchesTwoSeparateFits) {
    const Sim s = simulate(350, 21);
    const Table t = table_of(s);
    for (int degree : {1, 3}) {
        ModelSpec full = base_spec();
        full.polynomial["z"] = degree;
        ModelSpec reduced;
        reduced.outcome = "y";
        reduced.predictors = {"z", "x", "g"};
        reduced.polynomial["z"] = degree;
        const FitResult a = fit_model(t, full);
        const FitResult b = fit_model(t, reduced);
        ASSERT_TRUE(a.comparison.has_value());
        const double F = ((b.rss - a.rss) / 1.0) / (a.rss / a.df_residual);
        EXPECT_LT(rel(a.comparison->f_statistic, F), 1e-9) << "degree " << degree;
        EXPECT_LT(rel(a.comparison->r_squared_reduced, b.r_squared), 1e-12) << "degree " << degree;
        EXPECT_EQ(a.comparison->df1, 1.0);
    }
}
