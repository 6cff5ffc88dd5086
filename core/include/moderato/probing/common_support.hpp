// Where are the data? The moderator's distribution per group of a 0/1 focal
// predictor, or the joint distribution of a continuous focal predictor and the
// moderator, and the stretches of the moderator with too few rows for a local
// effect.
//
// Rule: the moderator's range is cut into B equal-width intervals, B = n/40
// clamped to 5..20 (about 40 rows an interval on average). An interval is
// thin when it holds fewer than 2 × ThinRule::rows_per_coefficient rows (a
// local straight line in the focal predictor: 2 coefficients) or, with a 0/1
// focal predictor, fewer than ThinRule::rows_per_coefficient rows in either
// group (each group's local level). Adjacent thin intervals merge.
#pragma once

#include <Eigen/Dense>
#include <cstddef>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/probing/probe.hpp"

namespace moderato {

struct CommonSupport {
    std::string focal, moderator;
    bool binary_focal = false;
    std::size_t rows = 0;
    std::vector<double> moderator_edges;  // B + 1
    // 0/1 focal: counts per interval for focal 0 and focal 1.
    std::vector<std::size_t> counts_zero, counts_one;
    // Continuous focal: counts, moderator intervals × focal intervals
    // (focal_edges: B + 1 equal-width edges over its range).
    std::vector<double> focal_edges;
    Eigen::MatrixXi joint;
    std::vector<Region> thin;  // merged thin stretches of the moderator
    std::string rule;          // the rule in words
};

// InputError for a focal predictor or moderator that is not a numeric model
// column.
CommonSupport common_support(const Design& design, const std::string& focal, const std::string& moderator);

}  // namespace moderato
