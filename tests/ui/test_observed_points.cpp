// The observed rows made ready to draw (plots/observed_points): the Lines
// plot's points per group below the limit and its grid of counts above it,
// the Surface plot's thinned rows. Checked against the definitions: every
// finite row is counted once in its group, in the bin whose centre is
// nearest (centres at the range ends, as a QCPColorMap places its cells);
// thinning keeps only input rows, at most one per grid cell.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <cmath>
#include <cstdint>
#include <limits>
#include <memory>
#include <numeric>
#include <set>
#include <utility>
#include <vector>

#include "plots/lines_plot.hpp"
#include "plots/observed_points.hpp"

using namespace moderato::ui;

namespace {

// A small LCG (Knuth MMIX constants): reproducible without <random>.
struct Lcg {
    std::uint64_t state = 20261204;
    double uniform() {
        state = state * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(state >> 11) / 9007199254740992.0;
    }
};

struct Rows {
    std::vector<double> x, y;
    std::vector<int> group;
};

Rows randomRows(std::size_t n, int groups) {
    Lcg r;
    Rows out;
    for (std::size_t i = 0; i < n; ++i) {
        out.x.push_back(-3 + 8 * r.uniform());
        out.y.push_back(10 + 4 * r.uniform() + out.x.back());
        out.group.push_back(static_cast<int>(i % static_cast<std::size_t>(groups)));
    }
    return out;
}

}  // namespace

TEST(ObservedPoints, BelowTheLimitEveryFiniteRowIsKeptInItsGroup) {
    Rows rows = randomRows(500, 3);
    rows.x[7] = std::numeric_limits<double>::quiet_NaN();
    rows.y[8] = std::numeric_limits<double>::infinity();
    const LinesPoints p = makeLinesPoints(rows.x, rows.y, rows.group);
    EXPECT_FALSE(p.binned);
    EXPECT_EQ(p.rows, 498u);
    ASSERT_EQ(p.groups, 3);
    std::vector<std::size_t> seen(3, 0);
    for (std::size_t i = 0; i < rows.x.size(); ++i) {
        if (i == 7 || i == 8) continue;
        const auto g = static_cast<std::size_t>(rows.group[i]);
        const std::size_t k = seen[g]++;
        ASSERT_LT(k, p.x[g].size());
        EXPECT_EQ(p.x[g][k], rows.x[i]);
        EXPECT_EQ(p.y[g][k], rows.y[i]);
    }
    for (std::size_t g = 0; g < 3; ++g) EXPECT_EQ(seen[g], p.x[g].size());
}

TEST(ObservedPoints, AboveTheLimitEachRowIsCountedOnceInTheNearestBin) {
    Rows rows = randomRows(30001, 2);
    rows.y[5] = std::numeric_limits<double>::quiet_NaN();
    const LinesPoints p = makeLinesPoints(rows.x, rows.y, rows.group, 20000);
    ASSERT_TRUE(p.binned);
    EXPECT_EQ(p.rows, 30000u);
    ASSERT_EQ(p.counts.size(), 2u);
    double x0 = 1e300, x1 = -1e300, y0 = 1e300, y1 = -1e300;
    std::vector<std::vector<int>> expected(2, std::vector<int>(LinesPoints::kBinsX * LinesPoints::kBinsY, 0));
    for (std::size_t i = 0; i < rows.x.size(); ++i) {
        if (i == 5) continue;
        x0 = std::min(x0, rows.x[i]);
        x1 = std::max(x1, rows.x[i]);
        y0 = std::min(y0, rows.y[i]);
        y1 = std::max(y1, rows.y[i]);
    }
    EXPECT_EQ(p.xRange, std::make_pair(x0, x1));
    EXPECT_EQ(p.yRange, std::make_pair(y0, y1));
    const double dx = (x1 - x0) / (LinesPoints::kBinsX - 1), dy = (y1 - y0) / (LinesPoints::kBinsY - 1);
    for (std::size_t i = 0; i < rows.x.size(); ++i) {
        if (i == 5) continue;
        const long bx = std::lround((rows.x[i] - x0) / dx), by = std::lround((rows.y[i] - y0) / dy);
        ++expected[static_cast<std::size_t>(rows.group[i])][static_cast<std::size_t>(by * LinesPoints::kBinsX + bx)];
    }
    std::size_t total = 0;
    for (std::size_t g = 0; g < 2; ++g) {
        total += static_cast<std::size_t>(std::accumulate(p.counts[g].begin(), p.counts[g].end(), 0));
        std::size_t differ = 0;
        for (std::size_t c = 0; c < expected[g].size(); ++c) differ += expected[g][c] != p.counts[g][c];
        // A row exactly half-way between two centres may round either way after scaling.
        EXPECT_LE(differ, 4u) << "group " << g;
    }
    EXPECT_EQ(total, 30000u);
}

TEST(ObservedPoints, OneRepeatedPointStillLandsInABin) {
    const std::vector<double> x(25000, 2.5), y(25000, -1.0);
    const LinesPoints p = makeLinesPoints(x, y, {}, 20000);
    ASSERT_TRUE(p.binned);
    EXPECT_EQ(p.counts[0][0], 25000);
}

TEST(ObservedPoints, SurfaceRowsAreThinnedToInputRowsOnePerCell) {
    const Rows rows = randomRows(40000, 1);
    const SurfacePoints s = makeSurfacePoints(rows.x, rows.y);
    EXPECT_EQ(s.rows, 40000u);
    ASSERT_FALSE(s.x.empty());
    EXPECT_LE(s.x.size(), 151u * 101u);  // a 150 × 100 grid, the far edges inclusive
    std::set<std::pair<double, double>> input;
    for (std::size_t i = 0; i < rows.x.size(); ++i) input.insert({rows.x[i], rows.y[i]});
    for (std::size_t i = 0; i < s.x.size(); ++i) EXPECT_TRUE(input.count({s.x[i], s.z[i]}));
    const SurfacePoints few = makeSurfacePoints({1, 2, 3}, {4, 5, 6});
    EXPECT_EQ(few.x, (std::vector<double>{1, 2, 3}));
}

TEST(ObservedPoints, LinesPlotDrawsTheGridAndTakesInThePointsRange) {
    Rows rows = randomRows(30000, 1);
    rows.y[0] = 95.0;  // far above every line
    LinesPlot plot;
    LinesPlotData d;
    d.lines.push_back({QStringLiteral("line"), {{-3, 12, 0.1, 11.8, 12.2}, {5, 20, 0.1, 19.8, 20.2}}, 0});
    d.xRange = {-3.2, 5.2};
    d.showPoints = true;
    d.points = std::make_shared<const LinesPoints>(makeLinesPoints(rows.x, rows.y, {}));
    plot.setData(d);
    EXPECT_EQ(plot.pointsMode(), 2);
    EXPECT_GE(plot.figurePlot()->yAxis->range().upper, 95.0);
    // Below the limit: every row drawn, in x order although the rows are not.
    const Rows few = randomRows(500, 1);
    d.points = std::make_shared<const LinesPoints>(makeLinesPoints(few.x, few.y, {}));
    plot.setData(d);
    EXPECT_EQ(plot.pointsMode(), 1);
    EXPECT_LT(plot.figurePlot()->yAxis->range().upper, 95.0);
    QCPGraph* points = nullptr;
    for (int i = 0; i < plot.figurePlot()->graphCount(); ++i)
        if (plot.figurePlot()->graph(i)->lineStyle() == QCPGraph::lsNone) points = plot.figurePlot()->graph(i);
    ASSERT_TRUE(points);
    ASSERT_EQ(points->data()->size(), 500);
    for (int i = 1; i < 500; ++i) EXPECT_LE(points->data()->at(i - 1)->key, points->data()->at(i)->key);
}
