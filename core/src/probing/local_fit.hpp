// Kernel-weighted local fits of the smooth estimator (private to core).
//
// At a moderator value z0 the local design row of row i is
//   [1, D_i − mean(D), (Z_i − z0)/s, (D_i − mean(D))(Z_i − z0)/s, controls_i scaled],
// with s the moderator's SD and each control centred and scaled: these
// shifts and scales leave the coefficient of D — the effect at z0 — as it is
// in the unscaled regression on [1, D, Z − z0, D(Z − z0), controls], and keep
// the normal equations well conditioned. Weights: exp(−((Z − z0)/h)²/2) times
// the model's weights times the row's multiplicity (bootstrap draws).
#pragma once

#include <Eigen/Dense>
#include <array>
#include <cstddef>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "probing/linearity_inputs.hpp"

namespace moderato::detail {

struct LocalData {
    Eigen::VectorXd d, z, y, w;  // centred focal, moderator, outcome, model weights (1 when none)
    Eigen::MatrixXd controls;    // n × c, centred and scaled
    double scale = 1;            // the moderator's SD
    bool logistic = false;
    bool binary = false;  // D is 0/1 (then d > 0 exactly for D = 1)
    Eigen::Index p() const { return 4 + controls.cols(); }
};

LocalData local_data(const Design& design, const LinearityInputs& in, bool logistic);

// Rows with multiplicities (a bootstrap draw, a training fold).
struct RowSet {
    std::vector<Eigen::Index> rows;
    std::vector<double> times;
    void add(Eigen::Index i, double t) {
        rows.push_back(i);
        times.push_back(t);
    }
    static RowSet all(std::size_t n);
};

// The local coefficients at z0 (p entries; all NaN when the local fit is
// singular or, for logistic models, does not converge). [1] is the effect.
Eigen::VectorXd local_fit(const LocalData& L, double z0, double h, const RowSet& rows);

// The prediction for row i (probability for logistic models) from the local
// fits at the two grid points around its moderator value, interpolated
// linearly between them.
double interpolated_prediction(const LocalData& L, const std::vector<double>& grid,
                               const std::vector<Eigen::VectorXd>& fits, Eigen::Index i);

// Kish's effective rows of the kernel weights at z0: all rows, rows with
// D = 0 and with D = 1 (the last two 0 unless D is 0/1).
std::array<double, 3> effective_rows(const LocalData& L, double z0, double h);

}  // namespace moderato::detail
