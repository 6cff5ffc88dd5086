// Regression diagnostics of a fitted model: leverage, standardised and
// studentised residuals, Cook's distance, Pearson and deviance residuals for
// a generalized fit (logistic, probit, Poisson, negative binomial), normal plotting positions for the quantile plot,
// binned residual means, and the rows that common rules of thumb flag.
//
// Definitions (p = rank of the design, the estimable columns only; w_i the
// fit's weights, 1 when there are none):
//   leverage       h_i = v_i x_i' (X' V X)^{-1} x_i with v_i = w_i (linear) or
//                  w_i (dmu/deta)^2 / V(mu_i) (generalized: the IRLS weights
//                  at the estimate; V(mu) = mu (1 - mu) for 0/1 outcomes, mu
//                  for Poisson, mu + alpha mu^2 for the negative binomial);
//                  computed from the QR factor of V^{1/2} X.
//   Pearson        linear sqrt(w_i) e_i; generalized sqrt(w_i) (y_i - mu_i) / sqrt(V(mu_i))
//   deviance       generalized: sign(y_i - mu_i) sqrt(w_i d_i), d_i the unit deviance
//   standardised   Pearson / sqrt(phi (1 - h_i)) with phi = sum w e^2 / (n - p)
//                  (linear) or 1 (generalized) — "internally studentised"
//   studentised    linear only: Pearson / sqrt(s_(i)^2 (1 - h_i)) with the
//                  variance s_(i)^2 of the fit without row i — "externally
//                  studentised" (t with n - p - 1 df under the model)
//   Cook's D       standardised^2 h_i / (p (1 - h_i))
// A row with leverage 1 (it alone fixes a coefficient) has NaN residual
// measures and Cook's distance; it is flagged for its leverage.
//
// A multilevel fit: the residuals are conditional ones (y minus the fixed
// part and the row's group effects), and the standardised, studentised and
// quantile-plot residual is e_i / sigma, sigma the fit's residual SD.
// Leverage and Cook's distance are least-squares measures that do not carry
// over to such a fit: they are NaN, and rows are flagged by the residual
// rule alone, largest |residual| first.
#pragma once

#include <Eigen/Dense>
#include <cstddef>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"

namespace moderato {

// Rules of thumb for flagging rows (common practice, not tests).
struct DiagnosticRules {
    double residual_limit = 3.0;     // |studentised| (linear) or |standardised Pearson| (logistic) above this
    double leverage_multiple = 3.0;  // leverage above this times p / n
    double cooks_numerator = 4.0;    // Cook's distance above this divided by n
};

enum DiagnosticFlag : unsigned {
    FlagResidual = 1u,
    FlagLeverage = 2u,
    FlagCooks = 4u,
};

struct FlaggedRow {
    std::size_t observation = 0;  // index among the used rows (0-based)
    std::size_t table_row = 0;    // Design::rows[observation]
    unsigned flags = 0;           // DiagnosticFlag bits
};

struct Diagnostics {
    Family family = Family::Linear;
    bool weighted = false;
    bool multilevel = false;  // conditional residuals; no leverage or Cook's distance
    std::size_t n = 0;
    int p = 0;         // rank of the design
    double scale = 1;  // phi: residual variance (linear), 1 (logistic)

    Eigen::VectorXd fitted;     // fitted value (linear) or fitted probability (logistic)
    Eigen::VectorXd residuals;  // response residual y - fitted
    Eigen::VectorXd pearson;
    Eigen::VectorXd deviance;  // logistic only (empty for linear)
    Eigen::VectorXd leverage;
    Eigen::VectorXd standardised;           // internally studentised (Pearson based)
    Eigen::VectorXd standardised_deviance;  // logistic only: deviance / sqrt(1 - h)
    Eigen::VectorXd studentised;            // linear only: externally studentised
    Eigen::VectorXd cooks_distance;

    // The residual each plot shows and the rules use, and what it is called.
    // Linear: studentised ("externally studentised residual"); logistic:
    // standardised Pearson residual.
    const Eigen::VectorXd& check_residual() const { return generalized(family) ? standardised : studentised; }
    std::string check_residual_name;
    // For the residual-against-fitted plot: linear unweighted: residuals
    // ("residual"); weighted: Pearson ("weighted residual √w·e"); logistic:
    // Pearson ("Pearson residual").
    const Eigen::VectorXd& plot_residual() const { return family == Family::Linear && !weighted ? residuals : pearson; }
    std::string plot_residual_name;
    std::string fitted_name;  // "fitted value" / "fitted probability"

    // For the normal quantile plot: linear: the studentised residuals;
    // logistic: the standardised deviance residuals (closer to normal than
    // Pearson ones for 0/1 data).
    const Eigen::VectorXd& quantile_residual() const {
        return generalized(family) ? standardised_deviance : studentised;
    }
    std::string quantile_residual_name;

    DiagnosticRules rules;
    double residual_threshold = 0, leverage_threshold = 0, cooks_threshold = 0;
    // Plain statements of the three rules ("|externally studentised residual| > 3", ...).
    std::string residual_rule, leverage_rule, cooks_rule;
    // Rows meeting any rule, most influential first (Cook's distance
    // descending; rows with leverage 1 first).
    std::vector<FlaggedRow> flagged;
    std::vector<std::string> notes;
};

// Diagnostics of a fit of `design` (as fit_design returned it). Aliased
// columns are left out (p = rank). InputError if the fit and design disagree
// in size.
Diagnostics diagnostics(const Design& design, const FitResult& fit, const DiagnosticRules& rules = {});

// Which rules a row meets (DiagnosticFlag bits), with the thresholds of `d`.
unsigned diagnostic_flags(const Diagnostics& d, std::size_t observation);

// The |standardised residual| at which a row with leverage h (0 < h < 1)
// has Cook's distance `cooks` in a model of rank p: sqrt(cooks p (1 - h) / h)
// (for the contour lines of the influence plot).
double cooks_contour(double cooks, int p, double leverage);

// The normal quantile plot of `values` (NaNs left out): the values sorted
// ascending with the standard normal quantile of Blom's plotting position
// (i - 3/8) / (n + 1/4), i = 1..n, beside each.
struct QuantilePlot {
    std::string rule = "Blom plotting positions (i - 3/8) / (n + 1/4)";
    std::vector<std::size_t> order;   // index into `values` of the i-th smallest
    std::vector<double> observed;     // sorted values
    std::vector<double> theoretical;  // normal quantiles
};
QuantilePlot normal_quantile_plot(const Eigen::VectorXd& values);
double blom_position(std::size_t i, std::size_t n);  // i 1-based

// Means of `residual` and `fitted` in `bins` groups of (nearly) equal size
// taken in order of `fitted` (binned residual plot; for a 0/1 outcome the raw
// residuals are two bands and only their local means are readable). NaNs
// left out; fewer bins when there are fewer values.
//
// Each bin's mean residual also gets an interval at `level`: mean ± t ·
// s / √m, with m the bin's count, s its standard deviation (divisor m − 1)
// and t the t quantile at 1 − (1 − level)/2 with m − 1 degrees of freedom
// (NaN for a bin of one value). It is a guide to whether the mean residual
// there departs from zero, not a test: residuals are not independent, and
// across many bins about a share 1 − level of the intervals miss zero by
// chance alone.
struct BinnedResiduals {
    double level = 0.95;
    std::vector<double> fitted_mean, residual_mean;
    std::vector<double> residual_lower, residual_upper;  // the interval of each bin's mean
    std::vector<std::size_t> count;
};
BinnedResiduals binned_residuals(const Eigen::VectorXd& fitted, const Eigen::VectorXd& residual, int bins,
                                 double level = 0.95);

}  // namespace moderato
