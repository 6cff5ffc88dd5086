// Is the interaction linear? The kernel (local linear) estimator of the
// focal predictor's effect across the moderator (Hainmueller, Mummolo & Xu
// 2019, Political Analysis 27(2)).
//
// At each point z0 of an even grid over the moderator's observed range, a
// weighted regression of the outcome on [1, D, Z − z0, D·(Z − z0), controls]
// with Gaussian weights exp(−((Z − z0)/h)²/2) (times the model's weights)
// gives the effect: the coefficient of D. Logistic models fit a weighted
// logistic regression there (the model, log-odds, scale).
//
// The bandwidth is given or chosen by K-fold cross-validation over a grid of
// candidates: rows are split into folds by a seeded permutation; each
// candidate fits the grid on the other folds, interpolates the coefficients
// linearly to each held-out row's moderator value and scores the squared
// prediction error (of the probability for logistic models); the candidate
// with the smallest mean wins.
//
// Pointwise intervals: a seeded bootstrap (cases, or whole clusters when the
// model has them) refits the whole curve at the chosen bandwidth; percentile
// intervals. Replicate r draws from its own random stream (as in
// bootstrap.hpp), so the numbers do not depend on the thread count.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/probe.hpp"

namespace moderato {

struct SmoothOptions {
    static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    int points = 50;          // grid points over the observed range, at least 50
    double bandwidth = kNaN;  // NaN: chosen by cross-validation
    int folds = 5;
    int candidates = 20;     // bandwidths tried: geometric from 0.05 to 3 moderator SDs
    int replicates = 200;    // bootstrap replicates for the band; 0: no band
    std::uint64_t seed = 1;  // folds and bootstrap
    double level = 0.95;
    unsigned threads = 0;
    // Called on the calling thread with work done and total; false cancels
    // (smooth_effects then throws Cancelled).
    std::function<bool(int done, int total)> progress;
};

enum class BandwidthMethod { Given, CrossValidation };
const char* to_string(BandwidthMethod method);  // "given", "cross-validation"

struct SmoothPoint {
    static constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
    double moderator_value = 0;
    double effect = kNaN;            // NaN where the local fit is singular
    double low = kNaN, high = kNaN;  // percentile interval; NaN without a bootstrap
    // Kish's effective number of rows, (Σw)² / Σw², of the kernel weights.
    double effective_rows = 0;
    // With a 0/1 focal predictor: the same for rows with focal 0 and 1.
    double effective_zero = 0, effective_one = 0;
    bool thin = false;  // below ThinRule (binned_effects.hpp) for the local fit
};

struct BandwidthScore {
    double bandwidth = 0, score = 0;  // mean squared prediction error; inf if a fold failed
};

struct SmoothEffects {
    std::string focal, moderator;
    Family family = Family::Linear;
    bool binary_focal = false;
    double bandwidth = 0;
    BandwidthMethod method = BandwidthMethod::Given;
    int folds = 0;
    std::vector<BandwidthScore> scores;  // cross-validation only
    std::uint64_t seed = 0;
    int replicates = 0;         // asked for
    int failed_replicates = 0;  // with a singular local fit at some point
    double level = 0.95;
    std::vector<SmoothPoint> points;
    std::vector<std::string> notes;
    std::vector<std::string> cautions;
};

// InputError for: the same models binned_effects refuses; fewer than 50
// points; a bandwidth ≤ 0 or not finite; fewer than 2 folds or more folds
// than rows; replicates between 1 and 99.
SmoothEffects smooth_effects(const Design& design, const FitResult& fit, const std::string& focal,
                             const std::string& moderator, const SmoothOptions& options = {});

}  // namespace moderato
