// Column summaries: mean, SD, quantiles and histograms checked against
// Python's statistics module and numpy (values printed by
// tests/reference/make_column_summary_reference.py with numpy 1.24.2,
// Python 3.11.2, Debian); level counts counted by hand.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

#include "common/table_builder.hpp"
#include "moderato/reading/column_summary.hpp"
#include "moderato/reading/table.hpp"

using moderato::Column;
using moderato::ColumnKind;
using moderato::ColumnSummary;
using moderato::Histogram;
using moderato::test::numeric_column;

namespace {

const double kNaN = moderato::missing_value();

void expect_histogram(const Histogram& h, const std::vector<double>& edges, const std::vector<std::size_t>& counts) {
    ASSERT_EQ(h.edges.size(), edges.size());
    ASSERT_EQ(h.counts.size(), counts.size());
    for (std::size_t k = 0; k < edges.size(); ++k) EXPECT_DOUBLE_EQ(h.edges[k], edges[k]) << "edge " << k;
    for (std::size_t k = 0; k < counts.size(); ++k) EXPECT_EQ(h.counts[k], counts[k]) << "bin " << k;
}

// The "grid" case of the reference script: 100000 values on a 1/64 grid.
std::vector<double> grid_values() {
    std::vector<double> v;
    for (std::int64_t i = 0; i < 100000; ++i) v.push_back(static_cast<double>((i * 7919) % 10007) / 64.0);
    return v;
}

}  // namespace

TEST(ColumnSummary, NumericColumnWithMissingCellsMatchesStatisticsAndNumpy) {
    const Column c = numeric_column("amount", {12.5, 7.25, kNaN, 3,  18.75, 9.5, 11,   kNaN, 14.25, 6.5,   21,   8.75,
                                               10,   13.5, 4.25, 16, 9,     12,  7.75, 15.5, 5.5,   19.25, 11.75});
    const ColumnSummary s = moderato::summarise_column(c);
    EXPECT_EQ(s.name, "amount");
    EXPECT_EQ(s.kind, ColumnKind::Numeric);
    EXPECT_EQ(s.rows, 23u);
    EXPECT_EQ(s.n, 21u);  // 23 cells, two NaN (counted by hand)
    EXPECT_EQ(s.missing, 2u);
    EXPECT_DOUBLE_EQ(s.mean, 11.285714285714286);  // statistics.mean (exact, rounded)
    EXPECT_DOUBLE_EQ(s.sd, 4.94613846493259);      // statistics.stdev (n - 1)
    EXPECT_EQ(s.min, 3.0);                         // by hand
    EXPECT_EQ(s.max, 21.0);                        // by hand
    EXPECT_DOUBLE_EQ(s.q1, 7.75);                  // numpy.percentile(x, 25), linear
    EXPECT_DOUBLE_EQ(s.median, 11.0);              // numpy.percentile(x, 50)
    EXPECT_DOUBLE_EQ(s.q3, 14.25);                 // numpy.percentile(x, 75)
    // numpy.histogram(x, bins="auto"): Freedman–Diaconis is narrower here.
    expect_histogram(s.histogram, {3, 6, 9, 12, 15, 18, 21}, {3, 4, 5, 4, 2, 3});
}

TEST(ColumnSummary, ZeroInterquartileRangeFallsBackToSturges) {
    std::vector<double> v(20, 5.0);
    for (const double x : {1.0, 9.0, 12.0, 2.5}) v.push_back(x);
    const ColumnSummary s = moderato::summarise_column(numeric_column("spike", v));
    EXPECT_DOUBLE_EQ(s.mean, 5.1875);          // statistics.mean
    EXPECT_DOUBLE_EQ(s.sd, 1.93824494795185);  // statistics.stdev
    EXPECT_DOUBLE_EQ(s.q1, 5.0);               // numpy.percentile
    EXPECT_DOUBLE_EQ(s.q3, 5.0);               // numpy.percentile
    // numpy.histogram(x, bins="auto"): IQR 0, so Sturges' width alone.
    expect_histogram(s.histogram,
                     {1.0, 2.833333333333333, 4.666666666666666, 6.5, 8.333333333333332, 10.166666666666666, 12.0},
                     {2, 0, 20, 0, 1, 1});
}

TEST(ColumnSummary, ManyValuesOnBinEdgesMatchNumpyWithAndWithoutTheBinCap) {
    std::vector<double> v = grid_values();
    const ColumnSummary s = moderato::summarise_column(numeric_column("grid", v), 40);
    EXPECT_DOUBLE_EQ(s.mean, 78.1726434375);     // statistics.mean
    EXPECT_NEAR(s.sd, 45.1377088083429, 1e-12);  // statistics.stdev
    EXPECT_DOUBLE_EQ(s.q1, 39.078125);           // numpy.percentile
    EXPECT_DOUBLE_EQ(s.median, 78.171875);       // numpy.percentile
    EXPECT_DOUBLE_EQ(s.q3, 117.265625);          // numpy.percentile
    // "auto" asks for 47 bins; the cap of 40 gives numpy.histogram(x, bins=40).
    std::vector<double> edges40;
    for (int k = 0; k <= 40; ++k) edges40.push_back(k * (156.34375 / 40));  // numpy.linspace(0, 156.34375, 41)
    expect_histogram(s.histogram, edges40,
                     {2508, 2499, 2498, 2498, 2499, 2497, 2509, 2498, 2497, 2500, 2497, 2499, 2498, 2508,
                      2499, 2497, 2499, 2498, 2498, 2499, 2507, 2499, 2498, 2498, 2499, 2497, 2509, 2498,
                      2498, 2499, 2497, 2499, 2499, 2508, 2499, 2497, 2499, 2498, 2498, 2509});
    // Without the cap: numpy.histogram(x, bins="auto") counts.
    std::sort(v.begin(), v.end());
    const Histogram h = moderato::auto_histogram(v, 1000);
    const std::vector<std::size_t> auto_counts{2128, 2130, 2127, 2130, 2127, 2130, 2127, 2130, 2127, 2119, 2128, 2129,
                                               2128, 2129, 2128, 2129, 2128, 2129, 2118, 2128, 2129, 2129, 2128, 2129,
                                               2128, 2129, 2128, 2129, 2118, 2128, 2129, 2128, 2129, 2128, 2129, 2128,
                                               2129, 2118, 2130, 2127, 2130, 2127, 2130, 2128, 2129, 2128, 2129};
    ASSERT_EQ(h.counts, auto_counts);
    EXPECT_DOUBLE_EQ(h.edges[1], 3.3264627659574466);   // numpy edge 1
    EXPECT_DOUBLE_EQ(h.edges[46], 153.01728723404256);  // numpy edge 46
    EXPECT_EQ(h.edges.back(), 156.34375);               // numpy: the last edge is the maximum exactly
}

TEST(ColumnSummary, ConstantColumnGetsOneUnitBinAndZeroSd) {
    const ColumnSummary s = moderato::summarise_column(numeric_column("k", {2.5, 2.5, kNaN, 2.5}));
    EXPECT_EQ(s.n, 3u);
    EXPECT_EQ(s.sd, 0.0);                            // statistics.stdev([2.5] * 3)
    expect_histogram(s.histogram, {2.0, 3.0}, {3});  // numpy.histogram(x, bins="auto")
}

TEST(ColumnSummary, TooFewValuesLeaveUndefinedStatisticsAsNaN) {
    const ColumnSummary none = moderato::summarise_column(numeric_column("x", {kNaN, kNaN}));
    EXPECT_EQ(none.n, 0u);
    EXPECT_EQ(none.missing, 2u);
    EXPECT_TRUE(std::isnan(none.mean));
    EXPECT_TRUE(std::isnan(none.median));
    EXPECT_TRUE(none.histogram.counts.empty());
    const ColumnSummary one = moderato::summarise_column(numeric_column("x", {4.0}));
    EXPECT_EQ(one.mean, 4.0);         // closed form
    EXPECT_TRUE(std::isnan(one.sd));  // the n - 1 divisor needs two values (statistics.stdev raises)
    EXPECT_EQ(one.median, 4.0);
}

TEST(ColumnSummary, QuantilesInterpolateBetweenOrderStatistics) {
    // numpy.percentile([1, 2, 4, 8], [0, 10, 25, 50, 90, 100]) = 1, 1.3, 1.75, 3, 6.8, 8
    const std::vector<double> v{1, 2, 4, 8};
    EXPECT_DOUBLE_EQ(moderato::quantile_sorted(v, 0.0), 1.0);
    EXPECT_DOUBLE_EQ(moderato::quantile_sorted(v, 0.10), 1.3);
    EXPECT_DOUBLE_EQ(moderato::quantile_sorted(v, 0.25), 1.75);
    EXPECT_DOUBLE_EQ(moderato::quantile_sorted(v, 0.50), 3.0);
    EXPECT_DOUBLE_EQ(moderato::quantile_sorted(v, 0.90), 6.8);
    EXPECT_DOUBLE_EQ(moderato::quantile_sorted(v, 1.0), 8.0);
    EXPECT_TRUE(std::isnan(moderato::quantile_sorted({}, 0.5)));
}

// Selection gives the same order statistics as sorting (the definition), so
// the same quantiles to the last bit, with ties, at the ends and for tiny n.
TEST(ColumnSummary, QuantilesBySelectionEqualSortedOnes) {
    std::uint64_t state = 20261205;
    const auto next = [&] {
        state = state * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(state >> 40) / 1e3;
    };
    const std::vector<double> ps{0.0, 0.1, 0.1, 0.5, 0.9, 0.999, 1.0};
    // Above 32,768 values the selection goes through buckets: ties, a
    // skewed spread and a range that overflows (back to plain selection).
    for (std::size_t n : {1u, 2u, 3u, 7u, 10u, 101u, 5000u, 40000u, 100001u}) {
        std::vector<double> v(n);
        for (double& x : v) x = std::floor(next() / 50);  // many ties
        if (n == 100001u)
            for (double& x : v) x = std::exp(x / 2000);  // long right tail: most values in a few buckets
        std::vector<double> sorted = v;
        std::sort(sorted.begin(), sorted.end());
        const std::vector<double> got = moderato::quantiles_by_selection(v, ps);
        for (std::size_t k = 0; k < ps.size(); ++k)
            EXPECT_EQ(got[k], moderato::quantile_sorted(sorted, ps[k])) << n << " " << ps[k];
    }
    std::vector<double> wide(50000, 1.0);
    wide[7] = -1.5e308;
    wide[9] = 1.7e308;  // max - min overflows to infinity
    std::vector<double> sorted = wide;
    std::sort(sorted.begin(), sorted.end());
    const std::vector<double> got = moderato::quantiles_by_selection(wide, ps);
    for (std::size_t k = 0; k < ps.size(); ++k) EXPECT_EQ(got[k], moderato::quantile_sorted(sorted, ps[k])) << ps[k];
}

TEST(ColumnSummary, CategoricalColumnCountsEachLevel) {
    Column c;
    c.name = "region";
    c.kind = ColumnKind::Categorical;
    c.levels = {"north", "south", "east", "west"};
    c.codes = {0, 1, 1, -1, 2, 0, 1, -1, 0, 1};
    const ColumnSummary s = moderato::summarise_column(c);
    EXPECT_EQ(s.kind, ColumnKind::Categorical);
    EXPECT_EQ(s.rows, 10u);
    EXPECT_EQ(s.n, 8u);
    EXPECT_EQ(s.missing, 2u);
    EXPECT_EQ(s.levels, c.levels);
    // Counted by hand: north 3, south 4, east 1, west 0 (a level with no cells).
    EXPECT_EQ(s.level_counts, (std::vector<std::size_t>{3, 4, 1, 0}));
    EXPECT_TRUE(std::isnan(s.mean));
    EXPECT_TRUE(s.histogram.counts.empty());
}
