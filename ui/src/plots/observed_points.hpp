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
