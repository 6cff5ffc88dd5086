// The Surface plot's helpers. The observed region of two numeric columns
// (convex hull), checked against hand-worked geometry: the hull of points on
// and inside a square is the square, points outside it are outside,
// collinear data give a segment. The probability scale against the closed
// form 1 / (1 + exp(-eta)).
#include <gtest/gtest.h>

#include <cmath>
#include <set>

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
