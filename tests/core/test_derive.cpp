// Derived columns: values by closed form, names, missing cells, and the
// exact messages for inputs that cannot be transformed.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "common/input_error.hpp"
#include "common/table_builder.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reading/derive.hpp"
#include "moderato/reading/table.hpp"
#include "moderato/support/error.hpp"

using moderato::CentreAt;
using moderato::Column;
using moderato::ColumnKind;
using moderato::InputError;
using moderato::Table;
using moderato::test::input_error_of;
using moderato::test::numeric_column;

namespace {

const double kNaN = moderato::missing_value();

Column categorical(const std::string& name, std::vector<std::string> levels, std::vector<std::int32_t> codes) {
    Column c;
    c.name = name;
    c.kind = ColumnKind::Categorical;
    c.levels = std::move(levels);
    c.codes = std::move(codes);
    return c;
}

// Element-wise: NaN where expected NaN, else within `tol` (absolute).
void expect_values(const Column& c, const std::vector<double>& expected, double tol = 0.0) {
    ASSERT_EQ(c.kind, ColumnKind::Numeric);
    ASSERT_EQ(c.numbers.size(), expected.size());
    for (std::size_t i = 0; i < expected.size(); ++i) {
        if (std::isnan(expected[i])) EXPECT_TRUE(std::isnan(c.numbers[i])) << "row " << i;
        else EXPECT_NEAR(c.numbers[i], expected[i], tol) << "row " << i;
    }
}

}  // namespace

TEST(Derive, CentreAtMeanKeepsMissing) {
    const Column x = numeric_column("x", {1, 2, 3, kNaN, 6});
    EXPECT_EQ(moderato::centre_value(x, CentreAt::Mean), 3.0);  // closed form: (1+2+3+6)/4
    const Column c = moderato::centre(x, CentreAt::Mean);
    EXPECT_EQ(c.name, "x_c");
    expect_values(c, {-2, -1, 0, kNaN, 3});  // closed form
}

TEST(Derive, MeanSurvivesALargeOffset) {
    const Column x = numeric_column("x", {1e9 + 1, 1e9 + 2, 1e9 + 3, 1e9 + 6});
    EXPECT_EQ(moderato::centre_value(x, CentreAt::Mean), 1e9 + 3);  // closed form: exact in binary64
}

TEST(Derive, CentreAtMedian) {
    EXPECT_EQ(moderato::centre_value(numeric_column("x", {10, 1, 3, 2}), CentreAt::Median),
              2.5);  // closed form: (2+3)/2
    EXPECT_EQ(moderato::centre_value(numeric_column("x", {5, kNaN, 1, 9}), CentreAt::Median),
              5.0);  // closed form: middle of 1,5,9
    const Column c = moderato::centre(numeric_column("x", {4, kNaN, 1, 9}), CentreAt::Median, 0.0, "xm");
    EXPECT_EQ(c.name, "xm");
    expect_values(c, {0, kNaN, -3, 5});  // closed form: median 4
}

TEST(Derive, CentreAtValue) {
    expect_values(moderato::centre(numeric_column("x", {10, 12, kNaN}), CentreAt::Value, 10.0),
                  {0, 2, kNaN});  // closed form
    EXPECT_EQ(input_error_of([] { moderato::centre(numeric_column("x", {1}), CentreAt::Value, std::nan("")); }),
              "the centring value for column 'x' must be a finite number");
}

TEST(Derive, CentreNeedsValues) {
    EXPECT_EQ(input_error_of([] {
                  moderato::centre(numeric_column("x", {kNaN, kNaN}), CentreAt::Mean);
              }),
              "column 'x' has no values (every cell is missing); it cannot be centred");
}

TEST(Derive, StandardiseUsesSampleSd) {
    // mean 5, sum of squares 32, n - 1 = 7
    const Column z = moderato::standardise(numeric_column("z", {2, 4, 4, 4, 5, 5, 7, 9, kNaN}));
    EXPECT_EQ(z.name, "z_std");
    const double sd = std::sqrt(32.0 / 7.0);  // closed form
    expect_values(z, {-3 / sd, -1 / sd, -1 / sd, -1 / sd, 0, 0, 2 / sd, 4 / sd, kNaN}, 1e-15);
}

TEST(Derive, StandardiseRejectsConstantAndTooShortColumns) {
    EXPECT_EQ(input_error_of([] {
                  moderato::standardise(numeric_column("z", {3, 3, kNaN, 3}));
              }),
              "column 'z' is constant (every value is 3); it cannot be standardised");
    EXPECT_EQ(input_error_of([] {
                  moderato::standardise(numeric_column("z", {3, kNaN}));
              }),
              "column 'z' has 1 value; standardising needs at least 2 non-missing values");
}

TEST(Derive, LogAndItsErrorNamesTheLine) {
    const Column l = moderato::log_column(numeric_column("x", {1, std::exp(1.0), kNaN}), Table{});
    EXPECT_EQ(l.name, "log(x)");
    expect_values(l, {0, 1, kNaN}, 1e-15);  // closed form: log(e) = 1

    const Table t = moderato::read_csv_text("id,x\n1,2\n\n2,0\n3,-1\n", "spend.csv");
    EXPECT_EQ(input_error_of([&] { moderato::log_column(t.at("x"), t); }),
              "column 'x' has the value 0 at line 4 of spend.csv, but log needs values above 0; use log1p for data "
              "with zeros, or add a constant first");
}

TEST(Derive, Log1pAndItsErrorWithoutLines) {
    const Column l = moderato::log1p_column(numeric_column("n", {0, std::exp(1.0) - 1, kNaN}), Table{});
    EXPECT_EQ(l.name, "log1p(n)");
    expect_values(l, {0, 1, kNaN}, 1e-15);  // closed form: log(1 + (e - 1)) = 1
    Table plain;
    EXPECT_EQ(input_error_of([&] {
                  moderato::log1p_column(numeric_column("n", {0, -1.5}), plain);
              }),
              "column 'n' has the value -1.5 at row 2, but log1p needs values above -1; add a constant first");
}

TEST(Derive, SquareAndProduct) {
    const Column sq = moderato::square(numeric_column("x", {-2, kNaN, 3}));
    EXPECT_EQ(sq.name, "x^2");
    expect_values(sq, {4, kNaN, 9});  // closed form
    const Column p = moderato::product(numeric_column("a", {2, kNaN, -1}), numeric_column("b", {3, 1, kNaN}));
    EXPECT_EQ(p.name, "a\u00D7b");
    expect_values(p, {6, kNaN, kNaN});  // closed form: missing if either is missing
    EXPECT_EQ(input_error_of([] {
                  moderato::product(numeric_column("a", {1, 2}), numeric_column("b", {1}));
              }),
              "columns 'a' and 'b' have different lengths (2 and 1); a product needs columns of the same table");
}

TEST(Derive, DummyIndicator) {
    const Column region = categorical("region", {"North", "South", "East"}, {0, 1, -1, 2, 0});
    const Column d = moderato::dummy(region, "North");
    EXPECT_EQ(d.name, "region=North");
    expect_values(d, {1, 0, kNaN, 0, 1});  // closed form
    EXPECT_EQ(input_error_of([&] { moderato::dummy(region, "Nort"); }),
              "column 'region' has no level 'Nort'; levels are: East, North, South");
}

TEST(Derive, KindMismatchesAreErrors) {
    const Column region = categorical("region", {"a"}, {0});
    EXPECT_EQ(input_error_of([&] { moderato::centre(region, CentreAt::Mean); }),
              "column 'region' is categorical; centring needs a numeric column (dummy-code it, or choose another "
              "column)");
    EXPECT_EQ(input_error_of([&] { moderato::product(numeric_column("x", {1}), region); }),
              "column 'region' is categorical; a product needs a numeric column (dummy-code it, or choose another "
              "column)");
    EXPECT_EQ(input_error_of([] { moderato::dummy(numeric_column("x", {1}), "1"); }),
              "column 'x' is numeric; dummy coding needs a categorical column");
}
