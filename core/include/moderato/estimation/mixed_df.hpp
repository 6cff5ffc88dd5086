// Degrees of freedom for tests of a linear mixed model's fixed effects.
//
// Satterthwaite (1946), in the form of Giesbrecht and Burns (1985): for a
// combination c of the fixed effects,
//   df(c) = 2 (c' Phi c)^2 / (g' A g),   g_k = c' (dPhi / dtheta_k) c,
// where Phi = (X' V^-1 X)^-1 is the fixed effects' covariance, theta the
// variance parameters (the random-effects covariance's free entries, then
// the residual variance sigma2) with V = sigma2 I + Z T Z' per group, and A
// the inverse of the negative Hessian of the fit's criterion (REML or ML,
// not profiled) in theta at the estimate. dPhi/dtheta_k = Phi G_k Phi with
// G_k = sum_g X_g' V_g^-1 (dV_g/dtheta_k) V_g^-1 X_g, made from each group's
// cross-products; the Hessian is by central differences of the criterion.
//
// Between–within: a fixed effect of a group-level column (constant within
// every group, the intercept included) is tested with G minus the number of
// such columns; a random slope's column and its products with group-level
// columns (its cross-level interactions) with G minus the number of columns
// of that slope; every other column with n - G minus the number of columns
// that vary within groups. At least 1 each.
#pragma once

#include <Eigen/Dense>
#include <optional>
#include <vector>

#include "moderato/estimation/mixed_criterion.hpp"
#include "moderato/estimation/mixed_fit.hpp"

namespace moderato {

struct SatterthwaiteDf {
    Eigen::MatrixXd phi;                   // p x p fixed-effects covariance at the estimate
    std::vector<Eigen::MatrixXd> g;        // G_k, one per variance parameter
    Eigen::MatrixXd parameter_covariance;  // A
    double df(const Eigen::VectorXd& c) const;
};

// The variance parameters in theta's order: T's free entries (the lower
// triangle column by column, or its diagonal), then sigma2.
Eigen::VectorXd variance_parameters(const MixedFit& fit, RandomCovariance shape);

// The criterion (REML or ML log-likelihood, sigma2 not profiled) at theta;
// NaN where T is not positive definite or sigma2 <= 0.
double mixed_loglik(const MixedCrossproducts& data, const Eigen::VectorXd& theta, RandomCovariance shape,
                    MixedEstimation estimation);

// None when the fit is singular or the Hessian is not negative definite
// (no interior maximum to expand around).
std::optional<SatterthwaiteDf> satterthwaite(const MixedCrossproducts& data, const MixedFit& fit,
                                             const MixedFitOptions& options);

// Each column of X its between–within df; `group` numbers each row's group
// (0..groups-1) and `slope_members[k]` lists the columns of random slope k.
std::vector<double> between_within_df(const Eigen::MatrixXd& X, const std::vector<std::size_t>& group,
                                      std::size_t groups, const std::vector<std::vector<int>>& slope_members);

// Whether column j of X is constant within every group.
bool constant_within_groups(const Eigen::MatrixXd& X, Eigen::Index j, const std::vector<std::size_t>& group,
                            std::size_t groups);

}  // namespace moderato
