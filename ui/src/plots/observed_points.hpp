// The observed rows made ready to draw, once per run and where the rows are
// (a worker for big data, ProbeEngine::prepareExtras), so that a plot's
// redraw on the UI thread never walks a million rows.
//
// LinesPoints: the focal predictor and the outcome per group; up to a limit
// the points themselves, above it a grid of counts per group over the
// points' own range (drawn as translucent colour maps).
// SurfacePoints: the focal predictor and the moderator, thinned to one row
// per cell of a grid of about screen resolution above a limit.
#pragma once

#include <cstddef>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "moderato/estimation/design.hpp"

namespace moderato::ui {

struct LinesPoints {
    std::size_t rows = 0;  // finite points in all
    int groups = 1;
    bool binned = false;
    // Not binned: per group, the points.
    std::vector<std::vector<double>> x, y;
    // Binned: per group, counts on a binsX × binsY grid (row-major along x;
    // bin (i, j) is centred at xRange.first + i·dx, yRange.first + j·dy).
    static constexpr int kBinsX = 240, kBinsY = 160;
    std::vector<std::vector<int>> counts;
    std::pair<double, double> xRange{0, 0}, yRange{0, 0};  // the finite points' extent
};

// `group` holds a group index ≥ 0 per row (empty: one group). Rows with a
// non-finite coordinate are left out. Above `maxPoints` rows: binned.
LinesPoints makeLinesPoints(const std::vector<double>& x, const std::vector<double>& y, const std::vector<int>& group,
                            std::size_t maxPoints = 20000);

// Whether the points' focal values are discrete: at most `maxValues`
// distinct values, all whole numbers (a count, a rating, a 0/1 flag).
// False when binned.
bool discreteFocal(const LinesPoints& points, int maxValues = 12);
// How far a point may be moved sideways when jittered: 0.15 of the smallest
// gap between distinct focal values (0 with fewer than two values).
double jitterWidth(const LinesPoints& points);
// `x` moved sideways by up to ± `width`, each point by an offset fixed by
// its group and position (a seeded hash, not a random device), so every
// draw and every export of the same data is the same.
std::vector<double> jittered(const std::vector<double>& x, int group, double width);

struct SurfacePoints {
    std::size_t rows = 0;  // rows before thinning
    std::vector<double> x, z;
};

// Above 20,000 rows, one row per cell of a 150 × 100 grid (cells of about
// 4 px at plot size; the dots are 4 px wide, so a dense cloud stays filled).
SurfacePoints makeSurfacePoints(const std::vector<double>& x, const std::vector<double>& z);
// The same of the design's main columns of predictors `x` and `z` (in the
// design's own units, as a surface grid is); nullptr when either has none.
std::shared_ptr<const SurfacePoints> makeSurfacePoints(const Design& d, const std::string& x, const std::string& z);

}  // namespace moderato::ui
