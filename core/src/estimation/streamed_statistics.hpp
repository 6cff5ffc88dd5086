// A streamed fit's result from what its passes gathered (private to core):
// the coefficients, covariance, fit statistics, nested comparison, Wald tests
// and VIF, read off the triangular factor and the pass-C sums, with the same
// formulas as fit.cpp.
#pragma once

#include <Eigen/Dense>
#include <cstddef>

#include "estimation/qr_steps.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/least_squares.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato::detail {

struct StreamedSums {
    std::size_t n = 0;
    long double sum_log_w = 0;  // sum of log weights (0 without weights)
    LeastSquaresResult ls;      // rank, kept, coef, inverse factor, qty
    MatL factor;                // of the scaled, weighted [X | y]
    std::vector<double> scales;
    bool residual_rss = false;  // pass C summed the RSS from the residuals
    double rss = 0;
    Eigen::MatrixXd sandwich;  // kept x kept, for the robust kinds
    int n_clusters = 0;
};

// `layout`: the design without rows (columns, terms, notes, exclusions).
FitResult streamed_result(const Design& layout, const ModelSpec& spec, const FitOptions& options,
                          const StreamedSums& sums);

}  // namespace moderato::detail
