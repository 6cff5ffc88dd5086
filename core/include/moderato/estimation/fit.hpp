// Fitting a specified model: OLS/WLS by pivoted Householder QR, logistic
// regression by Newton/IRLS; covariance of the chosen kind; fit statistics;
// the nested comparison without the product terms; Wald tests; VIF.
#pragma once

#include <Eigen/Dense>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/inference.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/estimation/multilevel_result.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

struct Coefficient : Inference {
    std::string term;
    bool aliased = false;  // estimate and the rest are NaN when aliased
    double vif = 0;        // NaN where it does not apply (intercept, no-intercept model, aliased)
    double df = std::numeric_limits<double>::quiet_NaN();  // its own test df (multilevel fits); NaN: the fit's
};

struct WaldTest {
    std::vector<std::string> terms;
    double statistic = 0;     // F form (chi-square / q for logistic models)
    double df1 = 0, df2 = 0;  // df2 = inf: chi-square(df1) reference
    double chi_square = 0;    // q * statistic
    double p_value = 0;
    SeKind covariance = SeKind::Classical;  // the covariance kind used
};

// The model with and without all product terms, fitted on the same rows.
struct NestedComparison {
    std::vector<std::string> dropped_terms;
    // linear: R-squared change F test (classical)
    double r_squared_reduced = 0, r_squared_change = 0;
    double f_statistic = 0, df1 = 0, df2 = 0, p_value = 0;
    // logistic: likelihood-ratio test
    double lr_statistic = 0, lr_p_value = 0;
    // Wald test of the same terms with the chosen covariance
    WaldTest wald;
};

// The negative binomial's dispersion: variance mu + alpha mu^2.
struct Dispersion {
    double alpha = std::numeric_limits<double>::quiet_NaN();
    double std_error = std::numeric_limits<double>::quiet_NaN();  // under the fit's covariance kind
    double ci_lower = std::numeric_limits<double>::quiet_NaN();   // alpha exp(-+ q se / alpha)
    double ci_upper = std::numeric_limits<double>::quiet_NaN();
};

// Whether a Poisson model's counts vary more than it allows: Pearson's
// chi-square over its residual df, and the Cameron & Trivedi (1990)
// regression test of Var = mu + alpha mu^2 against alpha = 0 (the t of the
// no-intercept OLS of ((y - mu)^2 - y) / mu on mu; one-sided p from the
// normal).
struct Overdispersion {
    double pearson_chi2 = 0, df = 0, pearson_ratio = 0;
    double alpha_estimate = 0;  // the auxiliary regression's coefficient
    double test_value = 0, p_value = 1;
    bool evident() const { return p_value < 0.05 || pearson_ratio > 1.5; }
};

// How a fit streamed its file (streamed_fit.hpp): passes over the file and
// the rows of a chunk.
struct StreamedFit {
    std::size_t passes = 0;
    std::size_t chunk_rows = 0;
};

struct FitResult {
    Family family = Family::Linear;
    SeKind se = SeKind::Classical;
    double level = 0.95;
    std::size_t n = 0, n_excluded = 0;
    std::vector<Exclusion> exclusions;
    std::vector<Coefficient> coefficients;
    Eigen::VectorXd beta;        // p; NaN for aliased
    Eigen::MatrixXd covariance;  // p x p; NaN rows/columns for aliased
    std::vector<std::string> aliased;
    int rank = 0;
    double df_residual = 0;
    double df_inference = 0;    // t df for intervals (n - rank, G - 1 for cluster; inf for logistic)
    double critical_value = 0;  // t or z quantile for the CIs
    int n_clusters = 0;

    // linear
    double r_squared = 0, adj_r_squared = 0, residual_sd = 0, rss = 0, tss = 0;
    // overall test of all non-intercept terms: F (linear, chosen covariance) or LR chi-square (logistic)
    double f_statistic = 0, f_df1 = 0, f_df2 = 0, f_p_value = 0;
    double log_likelihood = 0, aic = 0, bic = 0;
    // generalized families (deviance = -2 log-likelihood for 0/1 outcomes;
    // a count model's is against the saturated model, and its null deviance NaN)
    double deviance = 0, null_deviance = 0, mcfadden_r2 = 0, null_log_likelihood = 0;
    double lr_statistic = 0, lr_df = 0, lr_p_value = 0;
    int iterations = 0;
    bool converged = true;
    bool separation = false;                       // (quasi-)complete separation detected
    std::string exposure;                          // count models: the exposure column, or empty
    std::optional<Dispersion> dispersion;          // negative binomial
    std::optional<Overdispersion> overdispersion;  // Poisson

    std::optional<NestedComparison> comparison;
    std::vector<WaldTest> wald_tests;
    std::vector<std::string> notes;
    std::vector<std::string> warnings;
    bool extended_precision = false;
    // Multilevel fits: the random part. df_inference is then the df used
    // for probing (that of the product terms under the chosen rule).
    std::optional<MultilevelResult> multilevel;
    // A fit streamed from its file: fitted and residuals are then empty.
    std::optional<StreamedFit> streamed;

    Eigen::VectorXd fitted;     // the mean: fitted values, probabilities or expected counts (with the exposure)
    Eigen::VectorXd residuals;  // y - fitted (response residuals)

    // Model terms before dummy expansion ("x×region") and their columns.
    std::vector<std::pair<std::string, std::vector<int>>> terms;

    int index_of(const std::string& term) const;  // -1 if absent
};

struct FitOptions {
    bool compare_without_products = true;
    int max_iterations = 100;  // logistic
    // Problems with n * (p + 1)^2 up to this are solved in long double
    // (see least_squares.hpp); 0 forces the blocked double-precision path.
    double extended_budget = 2e7;
};

// `estimate` with its standard error, tested with the fit's reference
// distribution (t with df_inference, or z) at the fit's level.
Inference infer(double estimate, double std_error, const FitResult& fit);
// The same with its own df (inf: z).
Inference infer_with_df(double estimate, double std_error, double df, double level);

// Builds the design and fits it. Throws InputError for bad specifications.
FitResult fit_model(const Table& table, const ModelSpec& spec, const FitOptions& options = {});
// Fits a design already built (a multilevel model when the specification
// names groups).
FitResult fit_design(const Design& design, const ModelSpec& spec, const FitOptions& options = {});

// Joint Wald test that the named coefficients are all zero, with the fit's
// covariance. A name is a coefficient label or a term label (all of a
// categorical term's columns), with the factors of a product in any order.
// InputError for an unknown or aliased term.
WaldTest wald_test(const FitResult& fit, const std::vector<std::string>& terms);

}  // namespace moderato
