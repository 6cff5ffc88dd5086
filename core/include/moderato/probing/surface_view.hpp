// What the Surface plot needs beside the grid itself: where the data are in
// the plane of two numeric columns (the convex hull of the observed pairs,
// so the parts of the rectangular grid beyond the data can be marked), and
// the grid on the probability scale for a logistic fit.
#pragma once

#include <Eigen/Dense>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/probing/probe.hpp"

namespace moderato {

struct DataRegion {
    // Hull vertices in counter-clockwise order, not repeated at the end;
    // fewer than three when the points are collinear (a segment or a point).
    std::vector<double> x, z;
    // Whether (x, z) lies inside or on the hull (within a relative tolerance
    // of the hull's size).
    bool contains(double x, double z) const;
};

// Convex hull of the pairs (x[i], z[i]), NaN pairs left out (Andrew's
// monotone chain, after Akl and Toussaint's prefilter drops the points well
// inside the polygon of eight extreme points).
DataRegion convex_hull(const std::vector<double>& x, const std::vector<double>& z);

// The hull of two numeric model columns over the rows the model used (the
// design's main-effect columns). InputError when a column has no main-effect
// column in the design.
DataRegion data_region(const Design& design, const std::string& x, const std::string& z);

// The grid's predictions (on the model's scale) on the outcome's own scale,
// by the family's link: expit (logistic) or Phi (probit) of each entry, a
// probability; exp (Poisson, negative binomial), an expected count per unit
// of any exposure; unchanged for a linear model. Same shape as grid.predicted.
Eigen::MatrixXd surface_probabilities(const SurfaceGrid& grid, Family family = Family::Logistic);

}  // namespace moderato
