// What the binned and smooth estimators take from a fitted model (private to
// core): the focal predictor and moderator columns, the controls, and the
// refusals both estimators share.
#pragma once

#include <Eigen/Dense>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"

namespace moderato::detail {

struct LinearityInputs {
    Eigen::VectorXd focal, moderator;  // n values each
    std::vector<int> controls;         // design columns involving neither
    bool binary_focal = false;
    double moderator_sd = 0;
};

// InputError (naming `what`, e.g. "the binned estimates") for a multilevel
// model; a focal predictor or moderator that is absent, categorical or (the
// moderator) 0/1; and model terms other than the two main effects and their
// product that involve either.
LinearityInputs linearity_inputs(const Design& design, const FitResult& fit, const std::string& focal,
                                 const std::string& moderator, const std::string& what);

// A design over the same rows as `design` (outcome, weights, clusters, rows
// and notes kept) with the given columns, each its own term.
Design derived_design(const Design& design, Eigen::MatrixXd X, const std::vector<std::string>& labels, bool intercept);

// The model specification for fitting a derived design: the same family,
// covariance kind, level and threads; no multilevel part, no Wald tests.
ModelSpec derived_spec(const ModelSpec& spec);

// The finite values, sorted.
std::vector<double> sorted_finite(const std::vector<double>& values);

}  // namespace moderato::detail
