// Is the interaction linear? The binning estimator and the linearity test
// (Hainmueller, Mummolo & Xu 2019, Political Analysis 27(2)).
//
// The moderator's used values are cut at their j/K quantiles (type 7, linear
// interpolation); bin j holds the values above cut j−1 and at most cut j (the
// first bin also its minimum). One regression holds, for every bin, its
// indicator G_j, G_j·D, G_j·(Z − m_j) and G_j·D·(Z − m_j), where D is the
// focal predictor, Z the moderator and m_j the median of Z in bin j, plus the
// model's controls once, linearly (no common intercept: the indicators carry
// it). Bin j's effect of D is the coefficient of G_j·D, evaluated at m_j.
//
// The linearity test fits the straight-line model (intercept, D, Z, D·Z and
// the controls) plus, for bins 2..K, G_j, G_j·D, G_j·Z and G_j·D·Z, and tests
// those 4(K − 1) terms jointly with the fit's covariance kind (an F with the
// residual df, or G − 1 with clusters, for linear models; chi-square for
// logistic ones).
//
// Controls are the model's design columns that involve neither D nor Z. The
// model must have D and Z only as main effects and in their product.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/estimation/inference.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato {

// The thin-data rule of the binned estimates and the common-support check:
// at least 10 rows per estimated coefficient, the lenient end of the common
// rule of thumb of 10–20 (Harrell 2015, Regression Modeling Strategies, 2nd
// ed., sec. 4.4). A bin estimates 4 coefficients (40 rows); with a 0/1 focal
// predictor each of its two groups estimates a level and a slope (20 rows).
struct ThinRule {
    static constexpr std::size_t rows_per_coefficient = 10;
};

// One bin's effect of the focal predictor, at the bin's median.
struct EffectBin : Inference {
    double moderator_value = 0;   // the median of the moderator in the bin
    double lower = 0, upper = 0;  // the bin's cuts: (lower, upper] (the first bin: [lower, upper])
    double min = 0, max = 0;      // the moderator's observed values in the bin
    std::size_t rows = 0;
    // 0/1 focal predictor: rows with focal 0 and with focal 1.
    std::size_t rows_zero = 0, rows_one = 0;
    // The straight-line model's effect at moderator_value, for comparison.
    Inference linear;
    bool thin = false;  // fewer rows than ThinRule asks for
};

struct LinearityTest {
    double statistic = 0;     // F form (chi-square / df1 for logistic models)
    double df1 = 0, df2 = 0;  // df2 = inf: chi-square(df1)
    double chi_square = 0;
    double p_value = 0;
    SeKind covariance = SeKind::Classical;
};

struct BinnedEffects {
    std::string focal, moderator;
    Family family = Family::Linear;  // logistic: effects on the model (log-odds) scale
    bool binary_focal = false;
    double level = 0.95;
    std::vector<double> cuts;  // the K − 1 inner cuts
    std::vector<EffectBin> bins;
    LinearityTest linearity;
    // The test rejects the straight-line effect at 1 − level.
    bool linear_contradicted = false;
    std::vector<std::string> notes;
    std::vector<std::string> cautions;
};

// InputError for: a multilevel model; a categorical, 0/1 or absent focal
// predictor or moderator; model terms other than the main effects and the
// product that involve them; bins < 2 or more bins than the moderator's
// distinct values allow (the message says how many fit); a bin whose
// coefficients cannot be estimated (it names the bin and its range).
BinnedEffects binned_effects(const Design& design, const FitResult& fit, const ModelSpec& spec,
                             const std::string& focal, const std::string& moderator, int bins = 3);

// "the straight-line effect is not contradicted by the binned estimates (…)"
// and its counterpart, with the test in words.
std::string linearity_sentence(const BinnedEffects& binned);

}  // namespace moderato
