// The Surface plot's helpers. The observed region of two numeric columns
// (convex hull), checked against hand-worked geometry: the hull of points on
// and inside a square is the square, points outside it are outside,
// collinear data give a segment. The probability scale against the closed
// form 1 / (1 + exp(-eta)).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <numbers>
#include <random>
#include <set>
#include <string>
#include <utility>
#include <vector>

#include "common/table_builder.hpp"
#include "moderato/probing/surface_view.hpp"
#include "moderato/support/error.hpp"

using namespace moderato;
using namespace moderato::test;

TEST(SurfaceView, HullOfASquareWithInnerPoints) {
    // corners (0,0) (4,0) (4,2) (0,2), edge midpoints and inner points (by hand)
    const std::vector<double> x{0, 4, 4, 0, 2, 2, 1, 3, 2, 4, std::nan("")};
    const std::vector<double> z{0, 0, 2, 2, 1, 0, 1.5, 0.5, 2, 1, 5};
    const DataRegion r = convex_hull(x, z);
    ASSERT_EQ(r.x.size(), 4u);
    std::set<std::pair<double, double>> corners;
    for (std::size_t i = 0; i < 4; ++i) corners.insert({r.x[i], r.z[i]});
    EXPECT_EQ(corners, (std::set<std::pair<double, double>>{{0, 0}, {4, 0}, {4, 2}, {0, 2}}));
    // counter-clockwise: positive shoelace area = 8
    double area2 = 0;
    for (std::size_t i = 0; i < 4; ++i) area2 += r.x[i] * r.z[(i + 1) % 4] - r.x[(i + 1) % 4] * r.z[i];
    EXPECT_DOUBLE_EQ(area2 / 2, 8.0);
    EXPECT_TRUE(r.contains(2, 1));
    EXPECT_TRUE(r.contains(0, 0));  // a vertex
    EXPECT_TRUE(r.contains(4, 1));  // on an edge
    EXPECT_FALSE(r.contains(4.01, 1));
    EXPECT_FALSE(r.contains(-0.01, 1));
    EXPECT_FALSE(r.contains(2, 2.01));
}

TEST(SurfaceView, TriangleExcludesTheOppositeCorner) {
    // points under the line x + z = 1 in the unit square (by hand)
    const DataRegion r = convex_hull({0, 1, 0, 0.2, 0.3}, {0, 0, 1, 0.2, 0.1});
    ASSERT_EQ(r.x.size(), 3u);
    EXPECT_TRUE(r.contains(0.4, 0.4));
    EXPECT_FALSE(r.contains(0.6, 0.6));
    EXPECT_FALSE(r.contains(1, 1));
}

TEST(SurfaceView, CollinearPointsGiveASegment) {
    const DataRegion r = convex_hull({0, 1, 2, 3}, {0, 2, 4, 6});
    EXPECT_EQ(r.x.size(), 2u);
    EXPECT_TRUE(r.contains(1.5, 3));
    EXPECT_FALSE(r.contains(1.5, 3.5));
}

namespace {

// Andrew's monotone chain on every point, without the prefilter that
// convex_hull applies (the reference: the same definition of a hull vertex,
// collinear boundary points left out).
std::vector<std::pair<double, double>> reference_hull(std::vector<std::pair<double, double>> pts) {
    std::sort(pts.begin(), pts.end());
    pts.erase(std::unique(pts.begin(), pts.end()), pts.end());
    if (pts.size() < 3) return pts;
    const auto cross = [](const auto& o, const auto& a, const auto& b) {
        return (a.first - o.first) * (b.second - o.second) - (a.second - o.second) * (b.first - o.first);
    };
    std::vector<std::pair<double, double>> h(2 * pts.size());
    std::size_t k = 0;
    for (const auto& p : pts) {
        while (k >= 2 && cross(h[k - 2], h[k - 1], p) <= 0) --k;
        h[k++] = p;
    }
    for (std::size_t i = pts.size() - 1, t = k + 1; i-- > 0;) {
        while (k >= t && cross(h[k - 2], h[k - 1], pts[i]) <= 0) --k;
        h[k++] = pts[i];
    }
    h.resize(k - 1);
    return h;
}

void expect_reference_hull(const std::vector<double>& x, const std::vector<double>& z, const std::string& what) {
    std::vector<std::pair<double, double>> pts;
    for (std::size_t i = 0; i < x.size(); ++i) pts.emplace_back(x[i], z[i]);
    const auto want = reference_hull(pts);
    const DataRegion r = convex_hull(x, z);
    ASSERT_EQ(r.x.size(), want.size()) << what;
    for (std::size_t i = 0; i < want.size(); ++i) {
        EXPECT_EQ(r.x[i], want[i].first) << what << ", vertex " << i;
        EXPECT_EQ(r.z[i], want[i].second) << what << ", vertex " << i;
    }
}

}  // namespace

TEST(SurfaceView, HullEqualsTheMonotoneChainOnEveryPoint) {
    // Many points, where the prefilter drops most of them: the same vertices
    // in the same order as the plain algorithm (reference above).
    std::mt19937_64 rng(20261205);
    std::normal_distribution<double> normal;
    std::uniform_real_distribution<double> unit;
    std::vector<double> x, z;
    for (int i = 0; i < 200000; ++i) x.push_back(normal(rng)), z.push_back(3 + 1000 * normal(rng));
    expect_reference_hull(x, z, "normal cloud, scales 1 and 1000");
    x.clear(), z.clear();
    for (int i = 0; i < 100000; ++i) x.push_back(unit(rng)), z.push_back(unit(rng));
    expect_reference_hull(x, z, "uniform square");
    x.clear(), z.clear();
    for (int i = 0; i < 50000; ++i)  // whole numbers: duplicates and collinear boundary points
        x.push_back(std::floor(30 * unit(rng))), z.push_back(std::floor(30 * unit(rng)));
    expect_reference_hull(x, z, "30 x 30 grid");
    x.clear(), z.clear();
    for (int i = 0; i < 2000; ++i) {  // every point a hull vertex: none may be dropped
        const double a = 2 * std::numbers::pi * unit(rng);
        x.push_back(std::cos(a)), z.push_back(std::sin(a));
    }
    expect_reference_hull(x, z, "points on a circle");
}

TEST(SurfaceView, FromTheDesignUsesTheUsedRows) {
    // a row with a missing outcome is not used, so its (x, z) is not in the region
    const Table t =
        make_table({numeric_column("y", {1, 2, 3, 4, std::nan(""), 2.5}), numeric_column("x", {0, 1, 0, 1, 10, 0.5}),
                    numeric_column("z", {0, 0, 1, 1, 10, 0.7})});
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x", "z"};
    s.interactions = {{"x", "z"}};
    const Design d = build_design(t, s);
    const DataRegion r = data_region(d, "x", "z");
    EXPECT_EQ(r.x.size(), 4u);
    EXPECT_FALSE(r.contains(10, 10));
    EXPECT_TRUE(r.contains(0.5, 0.5));
    EXPECT_THROW(data_region(d, "x", "nope"), InputError);
}

TEST(SurfaceView, ProbabilitiesAreTheInverseLogit) {
    SurfaceGrid g;
    g.predicted.resize(2, 3);
    g.predicted << 0, 1, -1, 40, -40, std::log(3.0);
    const Eigen::MatrixXd p = surface_probabilities(g);
    ASSERT_EQ(p.rows(), 2);
    ASSERT_EQ(p.cols(), 3);
    EXPECT_DOUBLE_EQ(p(0, 0), 0.5);                         // closed form
    EXPECT_NEAR(p(0, 1), 1 / (1 + std::exp(-1.0)), 1e-16);  // closed form
    EXPECT_NEAR(p(0, 1) + p(0, 2), 1.0, 1e-15);             // symmetry
    EXPECT_NEAR(p(1, 2), 0.75, 1e-15);                      // odds 3 -> 3/4
    EXPECT_GT(p(1, 1), 0.0);                                // no underflow to 0 at -40 ...
    EXPECT_NEAR(p(1, 1), std::exp(-40.0), 1e-30);           // ... expit(-40) ~ e^-40
}
