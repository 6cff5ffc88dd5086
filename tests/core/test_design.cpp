// Design-matrix construction: terms, labels, hierarchy, dummy coding,
// listwise deletion. Expected values are derived by hand from the inputs
// (closed form) or follow the labelling contract of ARCHITECTURE.md.
#include <gtest/gtest.h>

#include <cmath>

#include "common/input_error.hpp"
#include "common/table_builder.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;

namespace {
std::vector<std::string> labels(const Design& d) {
    std::vector<std::string> out;
    for (const auto& c : d.columns) out.push_back(c.label);
    return out;
}
const double NA = missing_value();
}  // namespace

TEST(Design, ThreeWayProductAddsEveryLowerOrderTermInOrder) {
    const Table t = make_table(
        {numeric_column("y", {1, 2, 3, 4, 5, 6, 7, 9, 8, 10}), numeric_column("x", {1, 2, 1, 3, 2, 5, 4, 3, 6, 2}),
         numeric_column("z", {2, 1, 3, 2, 5, 1, 4, 6, 2, 3}), numeric_column("w", {5, 3, 1, 4, 2, 6, 3, 1, 2, 4})});
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "z", "w"}};
    const Design d = build_design(t, s);
    EXPECT_EQ(labels(d), (std::vector<std::string>{"intercept", "x", "z", "w", "x×z", "x×w", "z×w", "x×z×w"}));
    ASSERT_FALSE(d.notes.empty());
    EXPECT_NE(d.notes[0].find("lower-order terms added"), std::string::npos);
    // closed form: the x×z×w column is the elementwise product
    for (Eigen::Index i = 0; i < 10; ++i) EXPECT_EQ(d.X(i, 7), d.X(i, 1) * d.X(i, 2) * d.X(i, 3));
    EXPECT_EQ(d.product_columns(), (std::vector<int>{4, 5, 6, 7}));
}

TEST(Design, RepeatedColumnIsAPowerAndNotAProduct) {
    const Table t = make_table({numeric_column("y", {1, 2, 3, 4, 5, 6}), numeric_column("x", {1, 2, 3, 4, 5, 7})});
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"x", "x"}};
    const Design d = build_design(t, s);
    EXPECT_EQ(labels(d), (std::vector<std::string>{"intercept", "x", "x^2"}));
    EXPECT_EQ(d.X(5, 2), 49.0);
    EXPECT_TRUE(d.product_columns().empty());
}

TEST(Design, CategoricalIsDummyCodedWithSortedLevelsAndChosenReference) {
    const Table t = make_table(
        {numeric_column("y", {1, 2, 3, 4, 5, 6, 7, 8}), numeric_column("x", {1, 3, 2, 5, 4, 6, 8, 7}),
         categorical_column("region", {"Plains", "Coast", "Hills", "Coast", "Plains", "Hills", "Coast", "Plains"})});
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"region", "x"}};
    Design d = build_design(t, s);
    // reference: first sorted level (common practice)
    EXPECT_EQ(labels(d), (std::vector<std::string>{"intercept", "region=Hills", "region=Plains", "x", "region=Hills×x",
                                                   "region=Plains×x"}));
    EXPECT_EQ(d.X(0, 2), 1.0);  // row 0 is Plains
    EXPECT_EQ(d.X(0, 5), 1.0);  // Plains × x = 1
    EXPECT_EQ(d.X(2, 4), 2.0);  // Hills × x at x = 2
    s.reference_levels["region"] = "Plains";
    d = build_design(t, s);
    EXPECT_EQ(labels(d)[1], "region=Coast");
    EXPECT_EQ(labels(d)[2], "region=Hills");
}

// The labelling contract (ARCHITECTURE.md): a numeric factor by its name,
// a power as name^k, a level indicator as name=level; a product's factors in
// any order name the same column.
TEST(Design, AtomLabelsAndColumnsFoundByTheirFactors) {
    EXPECT_EQ(atom_label(Atom{"x", "", 1}), "x");
    EXPECT_EQ(atom_label(Atom{"x", "", 3}), "x^3");
    EXPECT_EQ(atom_label(Atom{"region", "North", 1}), "region=North");
    const Table t = make_table(
        {numeric_column("y", {1, 2, 3, 4, 5, 6, 7, 8}), numeric_column("x", {1, 3, 2, 5, 4, 6, 8, 7}),
         categorical_column("region", {"Plains", "Coast", "Hills", "Coast", "Plains", "Hills", "Coast", "Plains"})});
    ModelSpec s;
    s.outcome = "y";
    s.interactions = {{"region", "x"}, {"x", "x"}};
    const Design d = build_design(t, s);
    for (std::size_t j = 0; j < d.columns.size(); ++j) {
        std::string label;
        for (const Atom& a : d.columns[j].atoms) label += (label.empty() ? "" : "×") + atom_label(a);
        if (!d.columns[j].atoms.empty()) {
            EXPECT_EQ(label, d.columns[j].label);
        }
        EXPECT_EQ(d.column_of(d.columns[j].atoms), static_cast<int>(j)) << d.columns[j].label;
    }
    const int product = d.column_index("region=Plains×x");
    ASSERT_GE(product, 0);
    EXPECT_EQ(d.column_of({{"x", "", 1}, {"region", "Plains", 1}}), product);
    EXPECT_EQ(d.column_of({{"x", "", 2}}), d.column_index("x^2"));
    EXPECT_EQ(d.column_of({{"x", "", 1}, {"region", "Coast", 1}}), -1);  // the reference level has no column
    EXPECT_EQ(d.column_of({{"y", "", 1}}), -1);
}

TEST(Design, NumericLookingLevelsSortByValue) {
    Column c = categorical_column("dose", {"10", "2", "1"});
    EXPECT_EQ(sorted_levels(c), (std::vector<std::string>{"1", "2", "10"}));
}

TEST(Design, ListwiseDeletionReportsWhy) {
    const Table t =
        make_table({numeric_column("y", {1, NA, 3, 4, 5, 6, 7}), numeric_column("x", {1, 2, NA, NA, 5, 6, 8}),
                    numeric_column("unused", {NA, NA, NA, NA, NA, NA, NA})});
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x"};
    const Design d = build_design(t, s);
    EXPECT_EQ(d.n(), 4u);
    EXPECT_EQ(d.n_excluded, 3u);
    ASSERT_EQ(d.exclusions.size(), 2u);
    EXPECT_EQ(d.exclusions[0].column, "y");
    EXPECT_EQ(d.exclusions[0].rows, 1u);
    EXPECT_EQ(d.exclusions[1].column, "x");
    EXPECT_EQ(d.exclusions[1].rows, 2u);
    EXPECT_EQ(d.rows, (std::vector<std::size_t>{0, 4, 5, 6}));
}

TEST(Design, NoInterceptAndWeightsAndClusters) {
    const Table t =
        make_table({numeric_column("y", {1, 2, 3, 4, 5}), numeric_column("x", {2, 1, 4, 3, 5}),
                    numeric_column("w", {1, 2, 1, 2, 1}), categorical_column("g", {"a", "b", "a", "c", "b"})});
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x"};
    s.intercept = false;
    s.weights = "w";
    s.cluster = "g";
    s.se = SeKind::Cluster;
    const Design d = build_design(t, s);
    EXPECT_EQ(labels(d), (std::vector<std::string>{"x"}));
    EXPECT_EQ(d.weights.size(), 5);
    EXPECT_EQ(d.n_clusters, 3);
    EXPECT_EQ(d.cluster, (std::vector<int>{0, 1, 0, 2, 1}));
}

TEST(Design, ErrorsNameTheColumnAndLine) {
    const Table t = make_table({numeric_column("y", {1, 2, 3, 4}), numeric_column("x", {1, 1, 1, 1}),
                                numeric_column("w", {1, -2, 1, 1}), numeric_column("b", {0, 1, 2, 1}),
                                numeric_column("z", {3, 1, 2, 5})});
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x"};
    try {
        build_design(t, s);
        FAIL() << "constant predictor accepted";
    } catch (const InputError& e) {
        EXPECT_STREQ(e.what(),
                     "predictor 'x' is constant (every used row holds 1); it cannot be estimated alongside the "
                     "intercept — drop it or use --no-intercept");
    }
    s.predictors = {"z"};
    s.weights = "w";
    try {
        build_design(t, s);
        FAIL() << "negative weight accepted";
    } catch (const InputError& e) {
        EXPECT_STREQ(e.what(),
                     "weights 'w' must be positive: line 3 of test.csv holds -2; fix that row or choose another "
                     "weights column");
    }
    s.weights.clear();
    s.outcome = "b";
    s.family = Family::Logistic;
    try {
        build_design(t, s);
        FAIL() << "non-binary logistic outcome accepted";
    } catch (const InputError& e) {
        EXPECT_STREQ(e.what(), "logistic outcome 'b' must be 0 or 1: line 4 of test.csv holds 2");
    }
}

// ------------------------------------------------ the size of the design

namespace {

// n rows: y = i mod 7, x = i mod 5, and "shop" with level "s<i mod L>" (so
// min(n, L) levels, each in the first rows it can be).
Table shops_table(std::size_t n, std::size_t levels) {
    Column y, x, shop;
    y.name = "y";
    x.name = "x";
    shop.name = "shop";
    shop.kind = ColumnKind::Categorical;
    for (std::size_t i = 0; i < n; ++i) {
        y.numbers.push_back(static_cast<double>(i % 7));
        x.numbers.push_back(static_cast<double>(i % 5));
        shop.codes.push_back(static_cast<std::int32_t>(i % levels));
    }
    for (std::size_t l = 0; l < std::min(n, levels); ++l) shop.levels.push_back("s" + std::to_string(l));
    return make_table({y, x, shop});
}

ModelSpec moderated_by_shop() {
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x", "shop"};
    s.interactions = {{"x", "shop"}};
    return s;
}

}  // namespace

TEST(DesignLimits, AHundredThousandLevelModeratorIsRefusedNamingTheColumn) {
    // 100,000 rows, each its own shop: x, shop and x×shop need
    // 1 + 1 + 99,999 + 99,999 = 200,000 columns (by construction), and the
    // matrix would be 100,000 × 200,000 doubles (160 GB) if it were made.
    const Table t = shops_table(100'000, 100'000);
    const std::string msg = input_error_of([&] { build_design(t, moderated_by_shop()); });
    EXPECT_EQ(msg,
              "categorical column 'shop' has 100,000 levels among the used rows, and each level but the reference "
              "is a design column in every term it enters; the model needs 200,000 design columns, over the limit "
              "of 2,000. Use a column with fewer levels as the moderator (or group its levels)");
}

TEST(DesignLimits, TooManyCellsAreRefusedEvenWithinTheColumnLimit) {
    // 1,000 shops: 1 + 1 + 999 + 999 = 2,000 columns, at the column limit;
    // 300,000 rows × 2,000 = 6·10⁸ cells, over the 3·10⁸ limit (by construction).
    static_assert(DesignLimits::max_columns == 2'000 && DesignLimits::max_cells == 300'000'000);
    const Table t = shops_table(300'000, 1'000);
    const std::string msg = input_error_of([&] { build_design(t, moderated_by_shop()); });
    EXPECT_NE(msg.find("the design matrix would hold 600,000,000 cells (300,000 rows × 2,000 columns), over the limit "
                       "of 300,000,000 cells. Fit fewer rows or fewer columns"),
              std::string::npos)
        << msg;
}

TEST(DesignLimits, AManyLevelModeratorWithinTheLimitsIsBuilt) {
    // 500 shops on 2,000 rows: 1 + 1 + 499 + 499 = 1,000 columns (by construction).
    const Table t = shops_table(2'000, 500);
    const Design d = build_design(t, moderated_by_shop());
    EXPECT_EQ(d.p(), 1'000u);
    EXPECT_EQ(d.n(), 2'000u);
}
