// Detection of (quasi-)complete separation in logistic models (private).
#pragma once

#include <Eigen/Dense>
#include <optional>
#include <string>

#include "moderato/estimation/design.hpp"

namespace moderato::detail {

struct SeparationFinding {
    std::string message;  // names the column(s) at fault
};

// Looks for single design columns that separate the outcome (a 0/1 column
// whose 1-rows or 0-rows all share one outcome; a column whose values for
// y = 1 all lie above (or below) those for y = 0), then for the multivariate
// symptoms: no convergence, or fitted probabilities numerically 0 or 1 with a
// diverging coefficient.
std::optional<SeparationFinding> find_separation(const Design& d, const Eigen::VectorXd& beta,
                                                 const Eigen::VectorXd& mu, bool converged);

// Count models: a 0/1 design column (an indicator, a level of a categorical
// column, a product of such) whose 1-rows, or whose 0-rows, all have a zero
// count sends an estimate to minus infinity; throws InputError naming the
// column and the rows.
void refuse_zero_cells(const Design& d);

}  // namespace moderato::detail
