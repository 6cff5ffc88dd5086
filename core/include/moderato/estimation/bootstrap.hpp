// The bootstrap engine of the probing workbench: case resampling, or cluster
// resampling when the design has cluster ids; percentile and BCa intervals
// (Efron 1987) for any statistic of a fitted model (conditional effects, a
// Johnson–Neyman boundary, a crossover point, ...).
//
// Reproducibility: replicate r draws its resample from its own generator,
// std::mt19937_64 seeded with the (r+1)-th output of a SplitMix64 sequence
// started at `seed`; indices are mapped from raw 64-bit output by rejection
// (no std::uniform_int_distribution, whose algorithm differs between standard
// libraries). Results are stored by replicate index, so they are bit-identical
// for any thread count and any standard library.
//
// The replicate Design handed to the statistic holds the resampled rows of
// X, y, weights and `rows` (the table row of each drawn observation, repeated
// as drawn), with the original columns, terms, categoricals (levels kept even
// when a level was not drawn), intercept flag, outcome, exclusions and notes,
// so labels and column indices match the original. Its `summaries` (mean, sd,
// min, max) are RECOMPUTED over the replicate's rows (plug-in principle: a
// statistic evaluated "at the mean of z" is re-evaluated at the replicate's
// mean). A statistic meant for fixed moderator values must capture them from
// the original design. (A summary whose column has no plain design column,
// which build_design never produces, keeps the original value.)
// With cluster resampling, the replicate's clusters are numbered 0..G-1 in
// draw order, so a cluster drawn twice counts as two clusters; cluster_names
// repeat the original name with "#2", "#3"... for repeated draws.
#pragma once

#include <Eigen/Dense>
#include <cstdint>
#include <functional>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/model.hpp"
#include "moderato/support/error.hpp"  // moderato::Cancelled

namespace moderato {

struct BootstrapOptions {
    int replicates = 2000;  // at least 100
    std::uint64_t seed = 1;
    unsigned threads = 0;  // 0: all hardware threads; the numbers do not depend on it
    double level = 0.95;   // of the percentile and BCa intervals
    // Called on the calling thread after each wave of fits with the fits done
    // and the total (replicates + jackknife fits for the BCa acceleration);
    // return false to cancel: bootstrap() then throws moderato::Cancelled.
    std::function<bool(int done, int total)> progress;
};

// statistic(design_of_replicate, fit_of_replicate) -> m numbers. NaN (or an
// infinite value) means "undefined in this replicate". It is also evaluated on
// the full sample (the estimate) and on the jackknife designs. It is called
// concurrently from several threads: it must not modify shared state. It may
// throw InputError (counted as a failure of that replicate); any other
// exception aborts the bootstrap.
using BootstrapStatistic = std::function<Eigen::VectorXd(const Design&, const FitResult&)>;

struct BootstrapInterval {
    static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    double estimate = kNaN;   // statistic on the full sample
    double std_error = kNaN;  // SD of the valid replicates (divisor B - 1)
    double percentile_lower = kNaN, percentile_upper = kNaN;
    double bca_lower = kNaN, bca_upper = kNaN;  // NaN where BCa is undefined (see warnings)
    // The quantile levels behind the BCa endpoints (the percentile interval
    // uses (1 - level)/2 and its complement).
    double bca_lower_level = kNaN, bca_upper_level = kNaN;
    double bias_correction_z0 = kNaN;
    double acceleration = kNaN;
    int valid_replicates = 0;  // replicates with a finite value of this statistic
};

// What a replicate draws with replacement: rows, or whole clusters.
enum class Resampling { Cases, Clusters };

struct BootstrapResult {
    int requested = 0;
    // Replicates whose fit succeeded and whose statistic is finite in every
    // value; requested = completed + sum of the failure counts.
    int completed = 0;
    // Reason -> count, in order of first occurrence (by replicate index), e.g.
    // "constant column in the resample ('grp=rare')", "rank deficient
    // (aliased terms)", "logistic fit did not converge", "separation in the
    // logistic fit", "statistic undefined (NaN or infinite)". A replicate
    // whose statistic is undefined in some values still contributes its finite
    // values to their intervals.
    std::vector<std::pair<std::string, int>> failures;
    std::vector<BootstrapInterval> intervals;  // m, one per statistic value
    Eigen::MatrixXd replicates;                // R x m; rows of failed fits are NaN
    Resampling resampling = Resampling::Cases;
    int units = 0;  // rows (cases) or clusters the replicates draw from
    // The jackknife behind the acceleration leaves out one of `jackknife_groups`
    // groups of units at a time: unit i is in group i mod jackknife_groups
    // (one unit per group up to 200 units; a delete-d jackknife above).
    int jackknife_groups = 0;
    double level = 0.95;
    std::vector<std::string> warnings;
};

// "cases" or "clusters (G = 40)".
std::string resampling_text(const BootstrapResult& result);
// "leave one row out (n = 80)", "leave one cluster out (G = 40)", or
// "grouped: 200 groups (row i in group i mod 200)".
std::string jackknife_text(const BootstrapResult& result);

// Throws InputError for fewer than 100 replicates, a level outside (0, 1),
// fewer than 10 rows or fewer than twice as many rows as coefficients, fewer
// than 5 clusters for cluster resampling, and a full-sample fit the bootstrap
// cannot use (aliased terms; a logistic fit that did not converge or shows
// separation). Throws Cancelled when the progress callback says stop.
// The model's Wald tests (spec.wald_tests) and the nested comparison are not
// computed in the replicate fits; the full-sample fit passed to the statistic
// is made the same way.
BootstrapResult bootstrap(const Design& d, const ModelSpec& spec, const BootstrapStatistic& statistic,
                          const BootstrapOptions& options);

// Building blocks, public so that they can be checked on their own.

// Sample quantile of sorted finite values, type 7 of Hyndman & Fan (1996):
// linear interpolation between order statistics at h = (N - 1) p. NaN if empty.
double quantile_type7(const std::vector<double>& sorted, double p);

// BCa acceleration from jackknife values (Efron 1987; Efron & Tibshirani 1993,
// ch. 14): a = sum u^3 / (6 (sum u^2)^(3/2)), u_i = mean - value_i.
// Non-finite values are ignored; 0 when all values agree; NaN for fewer than 2.
double jackknife_acceleration(const std::vector<double>& jackknife_values);

// Percentile and BCa intervals from replicate values (non-finite ones are
// ignored), the full-sample estimate and the acceleration. z0 =
// Phi^-1(#{t* < t} / B), ties counted half. BCa endpoints are the type-7
// quantiles at Phi(z0 + (z0 + z_q) / (1 - a (z0 + z_q))) for q = (1 -
// level)/2 and 1 - q; NaN when z0 is infinite (the estimate lies outside all
// replicates) or 1 - a (z0 + z_q) <= 0.
BootstrapInterval bootstrap_interval(const std::vector<double>& values, double estimate, double acceleration,
                                     double level);

}  // namespace moderato
