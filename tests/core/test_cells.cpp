// The cell table of two categorical factors. Expected values come from exact
// algebra of the saturated model (cell predictions are the cell means; the
// difference in differences is the product coefficient), from closed-form
// standard errors of cell means and log odds, and from statsmodels
// (tests/reference/make_cells_reference.py; fixtures cells_2x3 and
// cells_logit_2x2). Data are seeded random draws: every expected value is
// computed from the drawn data, never taken from our own output.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>

#include "common/reference_fixtures.hpp"
#include "common/table_builder.hpp"
#include "common/tolerance.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/cells.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;
namespace fs = std::filesystem;
using nlohmann::json;

namespace {

// 0.975 quantile of the standard normal (common practice: 1.959963984540054).
constexpr double kZ975 = 1.959963984540054;

double logit(double p) { return std::log(p / (1 - p)); }
double expit(double x) { return 1 / (1 + std::exp(-x)); }

struct Fitted {
    Design d;
    FitResult f;
};

Fitted fit_of(const Table& t, const ModelSpec& s) {
    Design d = build_design(t, s);
    FitResult f = fit_design(d, s);
    return {std::move(d), std::move(f)};
}

ModelSpec two_factor_spec(const std::string& y, const std::string& a, const std::string& b,
                          Family family = Family::Linear, SeKind se = SeKind::Classical) {
    ModelSpec s;
    s.outcome = y;
    s.predictors = {a, b};
    s.interactions = {{a, b}};
    s.family = family;
    s.se = se;
    return s;
}

// A k × m layout with unequal cell sizes and cell-specific means and spreads.
struct Raw {
    std::vector<std::string> a, b;
    std::vector<double> y, w;
};

Raw draw_cells(const std::vector<std::string>& a_levels, const std::vector<std::string>& b_levels,
               const std::vector<std::vector<int>>& sizes, unsigned seed) {
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> N(0, 1);
    std::uniform_real_distribution<double> U(0.5, 3.0);
    Raw r;
    for (std::size_t i = 0; i < a_levels.size(); ++i)
        for (std::size_t j = 0; j < b_levels.size(); ++j)
            for (int k = 0; k < sizes[i][j]; ++k) {
                r.a.push_back(a_levels[i]);
                r.b.push_back(b_levels[j]);
                r.y.push_back(10 + 2.0 * static_cast<double>(i) - 1.5 * static_cast<double>(j) +
                              0.8 * static_cast<double>(i * j) + (1 + 0.4 * static_cast<double>(j)) * N(rng));
                r.w.push_back(U(rng));
            }
    return r;
}

// Count, (weighted) mean and sum of squared deviations of y in cell (la, lb).
struct CellStats {
    std::size_t n = 0;
    double mean = 0, ss = 0;
};

CellStats stats(const Raw& r, const std::string& la, const std::string& lb, bool weighted = false) {
    CellStats s;
    double sw = 0, swy = 0;
    for (std::size_t k = 0; k < r.y.size(); ++k)
        if (r.a[k] == la && r.b[k] == lb) {
            const double w = weighted ? r.w[k] : 1.0;
            ++s.n;
            sw += w;
            swy += w * r.y[k];
        }
    s.mean = swy / sw;
    for (std::size_t k = 0; k < r.y.size(); ++k)
        if (r.a[k] == la && r.b[k] == lb) s.ss += (r.y[k] - s.mean) * (r.y[k] - s.mean);
    return s;
}

// ---------------------------------------------------------------------------
// Closed form: the saturated two-factor model.

void expect_saturated_ols(const std::vector<std::string>& A, const std::vector<std::string>& B,
                          const std::vector<std::vector<int>>& sizes, unsigned seed) {
    const Raw r = draw_cells(A, B, sizes, seed);
    const Table t = make_table({numeric_column("y", r.y), categorical_column("a", r.a), categorical_column("b", r.b)});
    const auto [d, f] = fit_of(t, two_factor_spec("y", "a", "b"));
    const CellTable c = cell_table(d, f, "a", "b");
    ASSERT_EQ(c.row_levels, A);  // levels sort as text and A, B are given sorted
    ASSERT_EQ(c.column_levels, B);
    ASSERT_EQ(c.cells.size(), A.size() * B.size());
    EXPECT_EQ(c.scale, CellScale::Mean);
    EXPECT_STREQ(to_string(c.scale), "mean");
    EXPECT_TRUE(c.held.empty());

    // closed form: residual variance of the saturated model is the pooled
    // within-cell variance, SS_within / (n - k m)
    double ss_within = 0;
    for (const auto& la : A)
        for (const auto& lb : B) ss_within += stats(r, la, lb).ss;
    const double s2 = ss_within / static_cast<double>(r.y.size() - A.size() * B.size());

    for (std::size_t i = 0; i < A.size(); ++i)
        for (std::size_t j = 0; j < B.size(); ++j) {
            SCOPED_TRACE(A[i] + "," + B[j]);
            const CellStats s = stats(r, A[i], B[j]);
            const Cell& cell = c.at(i, j);
            EXPECT_EQ(cell.n, s.n);
            // closed form: OLS on cell indicators reproduces the cell means
            EXPECT_LE(std::abs(cell.estimate - s.mean), 1e-12 * std::abs(s.mean));
            EXPECT_LE(std::abs(cell.observed_mean - s.mean), 1e-12 * std::abs(s.mean));
            // closed form: Var(cell mean) = s^2 / n_ij
            EXPECT_LE(rel(cell.std_error, std::sqrt(s2 / static_cast<double>(s.n))), 1e-10);
            EXPECT_LE(rel(cell.ci_upper - cell.ci_lower, 2 * f.critical_value * cell.std_error), 1e-12);
            EXPECT_TRUE(std::isnan(cell.probability));
        }

    // closed form: a simple effect is a difference of two independent cell
    // means, SE = s sqrt(1/n_1 + 1/n_2)
    ASSERT_EQ(c.row_effects.size(), (A.size() - 1) * B.size());
    for (const auto& e : c.row_effects) {
        SCOPED_TRACE(e.label);
        const CellStats s1 = stats(r, e.level, e.at_level), s0 = stats(r, e.reference, e.at_level);
        EXPECT_EQ(e.factor, "a");
        EXPECT_LE(std::abs(e.estimate - (s1.mean - s0.mean)), 1e-11 * std::abs(s1.mean));
        EXPECT_LE(rel(e.std_error, std::sqrt(s2 * (1.0 / static_cast<double>(s1.n) + 1.0 / static_cast<double>(s0.n)))),
                  1e-10);
        EXPECT_TRUE(std::isnan(e.odds_ratio));
    }
    ASSERT_EQ(c.column_effects.size(), A.size() * (B.size() - 1));
    for (const auto& e : c.column_effects) {
        SCOPED_TRACE(e.label);
        const CellStats s1 = stats(r, e.at_level, e.level), s0 = stats(r, e.at_level, e.reference);
        EXPECT_EQ(e.factor, "b");
        EXPECT_LE(std::abs(e.estimate - (s1.mean - s0.mean)), 1e-11 * std::abs(s1.mean));
        EXPECT_LE(rel(e.std_error, std::sqrt(s2 * (1.0 / static_cast<double>(s1.n) + 1.0 / static_cast<double>(s0.n)))),
                  1e-10);
    }

    // closed form: in the saturated model the difference in differences is
    // the product coefficient, with the same SE and t
    ASSERT_EQ(c.interactions.size(), (A.size() - 1) * (B.size() - 1));
    for (const auto& ic : c.interactions) {
        SCOPED_TRACE(ic.label);
        const int k = f.index_of("a=" + ic.row_level + "×b=" + ic.column_level);
        ASSERT_GE(k, 0);
        const Coefficient& co = f.coefficients[static_cast<std::size_t>(k)];
        const double did = (stats(r, ic.row_level, ic.column_level).mean - stats(r, ic.row_level, B[0]).mean) -
                           (stats(r, A[0], ic.column_level).mean - stats(r, A[0], B[0]).mean);
        EXPECT_LE(std::abs(ic.estimate - did), 1e-10 * std::max(1.0, std::abs(did)));
        EXPECT_LE(rel(ic.estimate, co.estimate), 1e-10);
        EXPECT_LE(rel(ic.std_error, co.std_error), 1e-10);
        EXPECT_LE(rel(ic.statistic, co.statistic), 1e-10);
        EXPECT_LE(rel(ic.p_value, co.p_value), 1e-8);
    }

    // the joint test has one numerator df per product column
    ASSERT_TRUE(c.interaction_test.has_value());
    EXPECT_EQ(c.interaction_test->df1, static_cast<double>((A.size() - 1) * (B.size() - 1)));
    EXPECT_EQ(c.interaction_test->df2, static_cast<double>(r.y.size() - A.size() * B.size()));
    if (A.size() == 2 && B.size() == 2) {
        // closed form: a one-column Wald F is the square of the coefficient's t
        const double tt = c.interactions[0].statistic;
        EXPECT_LE(rel(c.interaction_test->statistic, tt * tt), 1e-10);
    } else {
        // closed form: under the classical covariance the Wald F of the
        // product columns is the extra-sum-of-squares F against the additive
        // model, ((RSS_0 - RSS_1) / q) / (RSS_1 / (n - p))
        ModelSpec add;
        add.outcome = "y";
        add.predictors = {"a", "b"};
        const FitResult f0 = fit_model(t, add);
        const double q = c.interaction_test->df1;
        const double F = ((f0.rss - f.rss) / q) / (f.rss / c.interaction_test->df2);
        EXPECT_LE(rel(c.interaction_test->statistic, F), 1e-9);
    }
}

TEST(CellTable, Saturated2x2MatchesCellMeans) {
    expect_saturated_ols({"no", "yes"}, {"control", "treated"}, {{31, 17}, {22, 40}}, 11);
}

TEST(CellTable, Saturated2x3MatchesCellMeans) {
    expect_saturated_ols({"member", "walk-in"}, {"deep", "none", "small"}, {{25, 33, 18}, {14, 29, 21}}, 12);
}

TEST(CellTable, Saturated3x3MatchesCellMeans) {
    expect_saturated_ols({"coast", "hills", "plains"}, {"a", "b", "c"}, {{12, 9, 15}, {20, 11, 8}, {10, 14, 17}}, 13);
}

// closed form: with HC3 each row of a saturated model has leverage 1/n_ij, so
// Var(cell mean) = sum_cell e^2 / (n_ij - 1)^2.
TEST(CellTable, SaturatedHc3CellVariance) {
    const std::vector<std::string> A{"no", "yes"}, B{"none", "some", "lots"};
    const Raw r = draw_cells(A, B, {{15, 22, 9}, {30, 12, 18}}, 21);
    const Table t = make_table({numeric_column("y", r.y), categorical_column("a", r.a), categorical_column("b", r.b)});
    const auto [d, f] = fit_of(t, two_factor_spec("y", "a", "b", Family::Linear, SeKind::HC3));
    const CellTable c = cell_table(d, f, "a", "b");
    EXPECT_EQ(c.covariance, SeKind::HC3);
    for (const auto& cell : c.cells) {
        SCOPED_TRACE(cell.row_level + "," + cell.column_level);
        const CellStats s = stats(r, cell.row_level, cell.column_level);
        const double m1 = static_cast<double>(s.n) - 1;
        EXPECT_LE(rel(cell.std_error, std::sqrt(s.ss / (m1 * m1))), 1e-10);
    }
}

// closed form: WLS on cell indicators gives the weighted cell means.
TEST(CellTable, WeightedSaturatedGivesWeightedMeans) {
    const std::vector<std::string> A{"f", "g"}, B{"p", "q"};
    const Raw r = draw_cells(A, B, {{20, 26}, {17, 23}}, 31);
    const Table t = make_table({numeric_column("y", r.y), categorical_column("a", r.a), categorical_column("b", r.b),
                                numeric_column("w", r.w)});
    ModelSpec s = two_factor_spec("y", "a", "b");
    s.weights = "w";
    const auto [d, f] = fit_of(t, s);
    const CellTable c = cell_table(d, f, "a", "b");
    for (const auto& cell : c.cells) {
        const CellStats st = stats(r, cell.row_level, cell.column_level, true);
        EXPECT_LE(std::abs(cell.estimate - st.mean), 1e-12 * std::abs(st.mean));
        EXPECT_LE(std::abs(cell.observed_mean - st.mean), 1e-12 * std::abs(st.mean));
    }
}

// Row and column roles swapped: the same cells, transposed.
TEST(CellTable, SwappingFactorsTransposes) {
    const Raw r = draw_cells({"l", "m"}, {"u", "v", "w"}, {{12, 15, 11}, {14, 10, 16}}, 41);
    const Table t = make_table({numeric_column("y", r.y), categorical_column("a", r.a), categorical_column("b", r.b)});
    const auto [d, f] = fit_of(t, two_factor_spec("y", "a", "b"));
    const CellTable ab = cell_table(d, f, "a", "b"), ba = cell_table(d, f, "b", "a");
    ASSERT_EQ(ba.row_levels, ab.column_levels);
    for (std::size_t i = 0; i < ab.row_levels.size(); ++i)
        for (std::size_t j = 0; j < ab.column_levels.size(); ++j) {
            // closed form: the same cell mean (saturated model) either way
            const CellStats s = stats(r, ab.row_levels[i], ab.column_levels[j]);
            EXPECT_LE(std::abs(ba.at(j, i).estimate - s.mean), 1e-12 * std::abs(s.mean));
            EXPECT_EQ(ba.at(j, i).n, s.n);
        }
    // closed form: the joint test does not depend on the order of the factors
    ASSERT_TRUE(ab.interaction_test && ba.interaction_test);
    EXPECT_LE(rel(ba.interaction_test->statistic, ab.interaction_test->statistic), 1e-12);
}

// A numeric 0/1 column serves as a two-level factor with levels "0" and "1".
TEST(CellTable, NumericZeroOneFactor) {
    const Raw r = draw_cells({"0", "1"}, {"east", "west"}, {{18, 24}, {27, 15}}, 51);
    std::vector<double> g;
    for (const auto& v : r.a) g.push_back(v == "1" ? 1.0 : 0.0);
    const Table t = make_table({numeric_column("y", r.y), numeric_column("g", g), categorical_column("b", r.b)});
    const auto [d, f] = fit_of(t, two_factor_spec("y", "g", "b"));
    const CellTable c = cell_table(d, f, "g", "b");
    ASSERT_EQ(c.row_levels, (std::vector<std::string>{"0", "1"}));
    for (const auto& cell : c.cells) {
        const CellStats s = stats(r, cell.row_level, cell.column_level);
        EXPECT_EQ(cell.n, s.n);
        // closed form: saturated model reproduces the cell means
        EXPECT_LE(std::abs(cell.estimate - s.mean), 1e-12 * std::abs(s.mean));
    }
    EXPECT_EQ(c.row_effects.at(1).label, "g=1 vs g=0 at b=west");  // column level outer
    EXPECT_EQ(c.column_effects.at(1).label, "b=west vs b=east at g=1");
    EXPECT_EQ(c.interactions.at(0).label, "(g=1 vs g=0) at b=west minus at b=east");
    // closed form: the 2 × 2 difference in differences is the product coefficient
    const int k = f.index_of("g×b=west");
    ASSERT_GE(k, 0);
    EXPECT_LE(rel(c.interactions.at(0).estimate, f.coefficients[static_cast<std::size_t>(k)].estimate), 1e-10);
}

// An empty cell makes its product column all zeros (aliased): that cell and
// every contrast through it are NaN with a note; the others are still the
// cell means (the remaining indicators still span the non-empty cells).
TEST(CellTable, EmptyCellIsNotEstimable) {
    const Raw r = draw_cells({"a0", "a1"}, {"b0", "b1", "b2"}, {{14, 12, 16}, {13, 0, 15}}, 61);
    const Table t = make_table({numeric_column("y", r.y), categorical_column("a", r.a), categorical_column("b", r.b)});
    const auto [d, f] = fit_of(t, two_factor_spec("y", "a", "b"));
    const CellTable c = cell_table(d, f, "a", "b");
    const Cell& empty = c.at(1, 1);
    EXPECT_EQ(empty.n, 0u);
    EXPECT_FALSE(empty.estimable);
    EXPECT_TRUE(std::isnan(empty.estimate));
    EXPECT_TRUE(std::isnan(empty.std_error));
    EXPECT_TRUE(std::isnan(empty.observed_mean));
    bool noted = false;
    for (const auto& n : c.notes)
        noted |= n.find("cell (a=a1, b=b1) cannot be estimated") != std::string::npos &&
                 n.find("a=a1×b=b1") != std::string::npos;
    EXPECT_TRUE(noted);
    for (const auto& cell : c.cells) {
        if (cell.n == 0) continue;
        EXPECT_TRUE(cell.estimable);
        const CellStats s = stats(r, cell.row_level, cell.column_level);
        EXPECT_LE(std::abs(cell.estimate - s.mean), 1e-10 * std::abs(s.mean));  // closed form
    }
    EXPECT_FALSE(c.interaction_test.has_value());
    EXPECT_FALSE(c.interactions.at(0).estimable);  // (a1, b1)
    EXPECT_TRUE(std::isnan(c.interactions.at(0).estimate));
    EXPECT_TRUE(c.interactions.at(1).estimable);  // (a1, b2)
}

// With a numeric covariate the cells sit at its mean unless held elsewhere;
// moving it shifts every cell by b_x times the move and leaves the simple
// effects alone (no covariate products).
TEST(CellTable, HeldCovariate) {
    std::mt19937_64 rng(71);
    std::normal_distribution<double> N(0, 1);
    std::vector<std::string> a, b;
    std::vector<double> x, y;
    for (int i = 0; i < 200; ++i) {
        a.push_back(i % 2 ? "p" : "q");
        b.push_back(i % 3 == 0 ? "r" : "s");
        x.push_back(3 + N(rng));
        y.push_back(1 + 0.5 * x.back() + (a.back() == "q") - (b.back() == "s") + N(rng));
    }
    const Table t = make_table(
        {numeric_column("y", y), categorical_column("a", a), categorical_column("b", b), numeric_column("x", x)});
    ModelSpec s = two_factor_spec("y", "a", "b");
    s.predictors.push_back("x");
    const auto [d, f] = fit_of(t, s);
    double xbar = 0;
    for (double v : x) xbar += v;
    xbar /= static_cast<double>(x.size());
    const CellTable at_mean = cell_table(d, f, "a", "b");
    ASSERT_EQ(at_mean.held.size(), 1u);
    EXPECT_LE(rel(at_mean.held.at("x"), xbar), 1e-14);  // closed form: the sample mean
    const CellTable at2 = cell_table(d, f, "a", "b", {{"x", 2.0}});
    const CellTable at5 = cell_table(d, f, "a", "b", {{"x", 5.0}});
    const double bx = f.coefficients[static_cast<std::size_t>(f.index_of("x"))].estimate;
    for (std::size_t k = 0; k < at2.cells.size(); ++k)  // closed form: x'b is linear in x
        EXPECT_LE(std::abs((at5.cells[k].estimate - at2.cells[k].estimate) - 3 * bx), 1e-12 * (1 + std::abs(bx)));
    for (std::size_t k = 0; k < at2.row_effects.size(); ++k)
        EXPECT_LE(std::abs(at5.row_effects[k].estimate - at2.row_effects[k].estimate), 1e-12);
    bool noted = false;
    for (const auto& n : at_mean.notes)
        noted |= n.find("x = ") != std::string::npos && n.find("(its mean)") != std::string::npos;
    EXPECT_TRUE(noted);
}

// A three-way product a×b×x: the interaction contrast at x = v is
// b(a×b) + v b(a×b×x) (closed form), and a note says the joint test covers
// only the two-way columns.
TEST(CellTable, ThreeWayProductDependsOnHeldValue) {
    std::mt19937_64 rng(81);
    std::normal_distribution<double> N(0, 1);
    std::vector<std::string> a, b;
    std::vector<double> x, y;
    for (int i = 0; i < 240; ++i) {
        a.push_back(i % 2 ? "u" : "v");
        b.push_back(i % 4 < 2 ? "k" : "m");
        x.push_back(N(rng));
        const double ia = a.back() == "v", ib = b.back() == "m";
        y.push_back(0.3 * ia + 0.2 * ib + 0.6 * ia * ib * (1 + x.back()) + 0.4 * x.back() + N(rng));
    }
    const Table t = make_table(
        {numeric_column("y", y), categorical_column("a", a), categorical_column("b", b), numeric_column("x", x)});
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"a", "b", "x"};
    s.interactions = {{"a", "b", "x"}};
    const auto [d, f] = fit_of(t, s);
    const double b2 = f.beta[f.index_of("a=v×b=m")], b3 = f.beta[f.index_of("a=v×b=m×x")];
    for (double v : {-1.0, 0.0, 1.5}) {
        const CellTable c = cell_table(d, f, "a", "b", {{"x", v}});
        EXPECT_LE(std::abs(c.interactions.at(0).estimate - (b2 + v * b3)), 1e-12 * (1 + std::abs(b2) + std::abs(b3)));
        bool noted = false;
        for (const auto& n : c.notes) noted |= n.find("also enter a×b×x") != std::string::npos;
        EXPECT_TRUE(noted);
    }
}

// ---------------------------------------------------------------------------
// Logistic: the saturated 2 × 2 model has closed forms on the log-odds scale.

TEST(CellTable, LogisticSaturated2x2) {
    // successes / failures per cell (row a in {n, y}, column b in {c, t})
    const int succ[2][2] = {{30, 45}, {22, 61}}, fail[2][2] = {{50, 25}, {48, 19}};
    const std::string A[2] = {"n", "y"}, B[2] = {"c", "t"};
    std::vector<std::string> a, b;
    std::vector<double> y;
    for (int i = 0; i < 2; ++i)
        for (int j = 0; j < 2; ++j) {
            for (int k = 0; k < succ[i][j]; ++k) a.push_back(A[i]), b.push_back(B[j]), y.push_back(1);
            for (int k = 0; k < fail[i][j]; ++k) a.push_back(A[i]), b.push_back(B[j]), y.push_back(0);
        }
    const Table t = make_table({numeric_column("y", y), categorical_column("a", a), categorical_column("b", b)});
    const auto [d, f] = fit_of(t, two_factor_spec("y", "a", "b", Family::Logistic));
    const CellTable c = cell_table(d, f, "a", "b");
    EXPECT_EQ(c.scale, CellScale::LogOdds);
    EXPECT_STREQ(to_string(c.scale), "log-odds");
    EXPECT_TRUE(std::isinf(c.df));
    for (int i = 0; i < 2; ++i)
        for (int j = 0; j < 2; ++j) {
            const Cell& cell = c.at(static_cast<std::size_t>(i), static_cast<std::size_t>(j));
            const double s = succ[i][j], fl = fail[i][j], p = s / (s + fl);
            EXPECT_EQ(cell.n, static_cast<std::size_t>(s + fl));
            EXPECT_LE(std::abs(cell.observed_mean - p), 1e-15);
            // closed form: the saturated MLE is the cell proportion, and the
            // model-based Var(logit p) = 1/(n p (1-p)) = 1/s + 1/f
            EXPECT_LE(std::abs(cell.probability - p), 1e-9);
            EXPECT_LE(std::abs(cell.estimate - logit(p)), 1e-9);
            const double se = std::sqrt(1 / s + 1 / fl);
            EXPECT_LE(rel(cell.std_error, se), 1e-8);
            // CI: expit of the link interval (z, common practice)
            EXPECT_LE(std::abs(cell.probability_lower - expit(logit(p) - kZ975 * se)), 1e-8);
            EXPECT_LE(std::abs(cell.probability_upper - expit(logit(p) + kZ975 * se)), 1e-8);
            // delta method (closed form): p(1-p) SE(logit p)
            EXPECT_LE(rel(cell.probability_std_error, p * (1 - p) * se), 1e-8);
        }
    // closed form: the row effect at column j is the log odds ratio
    // log(s1 f0 / (f1 s0)), SE sqrt(1/s1 + 1/f1 + 1/s0 + 1/f0) (Woolf, common practice)
    for (const auto& e : c.row_effects) {
        const int j = e.at_level == "c" ? 0 : 1;
        const double lor = std::log(double(succ[1][j]) * fail[0][j] / (double(fail[1][j]) * succ[0][j]));
        EXPECT_LE(std::abs(e.estimate - lor), 1e-8);
        EXPECT_LE(rel(e.odds_ratio, std::exp(lor)), 1e-8);
        EXPECT_LE(
            rel(e.std_error, std::sqrt(1.0 / succ[1][j] + 1.0 / fail[1][j] + 1.0 / succ[0][j] + 1.0 / fail[0][j])),
            1e-8);
    }
    // closed form: the interaction contrast is the log ratio of odds ratios,
    // SE sqrt(sum of 1/count over the eight counts) (Woolf, common practice)
    double v = 0, lror = 0;
    for (int i = 0; i < 2; ++i)
        for (int j = 0; j < 2; ++j) {
            v += 1.0 / succ[i][j] + 1.0 / fail[i][j];
            lror += ((i + j) % 2 ? -1 : 1) * std::log(double(succ[i][j]) / fail[i][j]);
        }
    ASSERT_EQ(c.interactions.size(), 1u);
    EXPECT_LE(std::abs(c.interactions[0].estimate - lror), 1e-8);
    EXPECT_LE(rel(c.interactions[0].std_error, std::sqrt(v)), 1e-8);
    EXPECT_LE(rel(c.interactions[0].odds_ratio_lower, std::exp(lror - kZ975 * std::sqrt(v))), 1e-8);
    // chi-square form of the joint test: statistic = z^2 for one column (closed form)
    ASSERT_TRUE(c.interaction_test.has_value());
    EXPECT_LE(rel(c.interaction_test->chi_square, lror * lror / v), 1e-8);
}

// ---------------------------------------------------------------------------
// statsmodels reference (tests/reference/make_cells_reference.py).

struct Case {
    json j;
    Fitted fit;
};

Case load(const std::string& name, SeKind se) {
    const fs::path path = reference_fixture(name + ".json");
    json j = read_fixture_json(path);
    const FixtureModel m = fixture_model(j, path, se);
    return {std::move(j), fit_of(m.table, m.spec)};
}

template <class T>
void expect_inference(const T& ours, const json& ref) {
    // statsmodels 0.13 t_test of the same contrast vector: 1e-8 relative
    // (tests/reference/README.md); p-values 1e-6 (different tail code)
    EXPECT_LE(rel(ours.estimate, ref.at("estimate").get<double>()), 1e-8);
    EXPECT_LE(rel(ours.std_error, ref.at("std_error").get<double>()), 1e-8);
    EXPECT_LE(rel(ours.ci_lower, ref.at("ci_lower").get<double>()), 1e-8);
    EXPECT_LE(rel(ours.ci_upper, ref.at("ci_upper").get<double>()), 1e-8);
    if constexpr (requires { ours.statistic; }) {
        EXPECT_LE(rel(ours.statistic, ref.at("statistic").get<double>()), 1e-8);
        EXPECT_LE(rel(ours.p_value, ref.at("p_value").get<double>()), 1e-6);
    }
}

void compare_with_statsmodels(const std::string& name, SeKind se, const std::string& se_name) {
    SCOPED_TRACE(name + " " + se_name);
    const Case k = load(name, se);
    const json& ref = k.j.at("cells").at("by_se").at(se_name);
    const CellTable c = cell_table(k.fit.d, k.fit.f, ref.at("row_factor").get<std::string>(),
                                   ref.at("column_factor").get<std::string>());
    EXPECT_EQ(c.row_levels, ref.at("row_levels").get<std::vector<std::string>>());
    EXPECT_EQ(c.column_levels, ref.at("column_levels").get<std::vector<std::string>>());
    for (const auto& [col, v] : ref.at("held").items())  // numpy mean (statsmodels script)
        EXPECT_LE(rel(c.held.at(col), v.get<double>()), 1e-13) << col;
    const bool logistic = k.fit.f.family == Family::Logistic;

    ASSERT_EQ(c.cells.size(), ref.at("cells").size());
    for (std::size_t q = 0; q < c.cells.size(); ++q) {
        const json& r = ref.at("cells")[q];
        const Cell& cell = c.cells[q];
        SCOPED_TRACE(cell.row_level + "," + cell.column_level);
        ASSERT_EQ(cell.row_level, r.at("row_level").get<std::string>());
        ASSERT_EQ(cell.column_level, r.at("column_level").get<std::string>());
        EXPECT_EQ(cell.n, r.at("n").get<std::size_t>());  // counted in numpy
        EXPECT_LE(rel(cell.observed_mean, r.at("observed_mean").get<double>()), 1e-12);
        expect_inference(cell, r);
        if (logistic) {  // scipy expit of statsmodels' link interval, checked against GLM get_prediction
            EXPECT_LE(rel(cell.probability, r.at("probability").get<double>()), 1e-8);
            EXPECT_LE(rel(cell.probability_lower, r.at("probability_lower").get<double>()), 1e-8);
            EXPECT_LE(rel(cell.probability_upper, r.at("probability_upper").get<double>()), 1e-8);
        }
    }
    auto effects = [&](const std::vector<SimpleEffect>& ours, const json& theirs) {
        ASSERT_EQ(ours.size(), theirs.size());
        for (std::size_t q = 0; q < ours.size(); ++q) {
            SCOPED_TRACE(ours[q].label);
            ASSERT_EQ(ours[q].level, theirs[q].at("level").get<std::string>());
            ASSERT_EQ(ours[q].at_level, theirs[q].at("at_level").get<std::string>());
            expect_inference(ours[q], theirs[q]);
        }
    };
    effects(c.row_effects, ref.at("row_effects"));
    effects(c.column_effects, ref.at("column_effects"));
    ASSERT_EQ(c.interactions.size(), ref.at("interactions").size());
    for (std::size_t q = 0; q < c.interactions.size(); ++q) {
        const json& r = ref.at("interactions")[q];
        SCOPED_TRACE(c.interactions[q].label);
        ASSERT_EQ(c.interactions[q].row_level, r.at("row_level").get<std::string>());
        ASSERT_EQ(c.interactions[q].column_level, r.at("column_level").get<std::string>());
        expect_inference(c.interactions[q], r);
    }
    // statsmodels wald_test of the product columns (F form; chi-square for Logit)
    const json& w = ref.at("wald");
    ASSERT_TRUE(c.interaction_test.has_value());
    EXPECT_EQ(c.interaction_test->df1, w.at("df_num").get<double>());
    if (logistic) {
        EXPECT_LE(rel(c.interaction_test->chi_square, w.at("statistic").get<double>()), 1e-8);
    } else {
        EXPECT_EQ(c.interaction_test->df2, w.at("df_denom").get<double>());
        EXPECT_LE(rel(c.interaction_test->statistic, w.at("statistic").get<double>()), 1e-8);
    }
    EXPECT_LE(rel(c.interaction_test->p_value, w.at("p_value").get<double>()), 1e-6);
}

TEST(CellTableStatsmodels, Ols2x3Hc3) { compare_with_statsmodels("cells_2x3", SeKind::HC3, "hc3"); }
TEST(CellTableStatsmodels, Ols2x3Classical) { compare_with_statsmodels("cells_2x3", SeKind::Classical, "classical"); }
TEST(CellTableStatsmodels, Logit2x2) { compare_with_statsmodels("cells_logit_2x2", SeKind::Classical, "classical"); }

// ---------------------------------------------------------------------------
// Bad input: each with the message the user sees.

struct CellTableBadInput : ::testing::Test {
    Fitted m;
    void SetUp() override {
        std::mt19937_64 rng(91);
        std::normal_distribution<double> N(0, 1);
        std::vector<std::string> a, b, c;
        std::vector<double> x, y;
        for (int i = 0; i < 120; ++i) {
            a.push_back(i % 2 ? "a1" : "a0");
            b.push_back(i % 3 ? "b1" : "b0");
            c.push_back(i % 5 < 2 ? "c1" : "c0");
            x.push_back(N(rng));
            y.push_back(N(rng));
        }
        const Table t = make_table({numeric_column("y", y), categorical_column("a", a), categorical_column("b", b),
                                    categorical_column("c", c), numeric_column("x", x)});
        ModelSpec s;
        s.outcome = "y";
        s.predictors = {"a", "b", "c", "x"};
        s.interactions = {{"a", "b"}, {"a", "x"}};
        m = fit_of(t, s);
    }
    std::string message(const std::string& r, const std::string& c, const std::map<std::string, double>& held = {}) {
        try {
            cell_table(m.d, m.f, r, c, held);
        } catch (const InputError& e) {
            return e.what();
        }
        return "no error";
    }
};

TEST_F(CellTableBadInput, NumericFactor) {
    const std::string msg = message("a", "x");
    EXPECT_EQ(msg.substr(0, msg.find(" (it holds")), "column factor 'x' is numeric");
    EXPECT_NE(msg.find("declare 'x' categorical"), std::string::npos) << msg;
}

TEST_F(CellTableBadInput, NoProductTerm) {
    EXPECT_EQ(message("a", "c"), "'a' and 'c' share no product term; add an interaction of a and c");
    EXPECT_EQ(message("b", "c"), "'b' and 'c' share no product term; add an interaction of b and c");
}

TEST_F(CellTableBadInput, SameFactorTwice) {
    EXPECT_EQ(message("a", "a"), "row and column factor are both 'a'; choose two different factors for the cell table");
}

TEST_F(CellTableBadInput, UnknownOrEmptyFactor) {
    EXPECT_EQ(message("a", "zz"),
              "column factor 'zz' is not in the model; add it (with an interaction with the other factor) and refit");
    EXPECT_EQ(message("", "b"), "the cell table needs a row factor; choose a categorical column of the model");
}

TEST_F(CellTableBadInput, HeldValues) {
    EXPECT_EQ(message("a", "b", {{"a", 1}}),
              "'a' is a factor of the cell table and cannot also be held at a value; drop it from the held values");
    EXPECT_EQ(message("a", "b", {{"c", 2}}), "held level 2 of 'c' is not a level index; give 0 to 1 (c0, c1)");
    EXPECT_EQ(message("a", "b", {{"w", 2}}), "held column 'w' is not in the model; hold only model columns");
    EXPECT_EQ(message("a", "b", {{"c", 1}, {"x", -0.5}}), "no error");
}

}  // namespace
