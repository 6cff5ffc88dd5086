// Probing a fitted model: the conditional effect of the focal predictor as a
// function of the moderator, pick-a-point tables, Johnson–Neyman regions, the
// simultaneous band, and the crossover point of the simple regression lines
// with its Fieller interval.
#pragma once

#include <Eigen/Dense>
#include <array>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/probing/multiplicity.hpp"
#include "moderato/probing/scale.hpp"
#include "moderato/probing/slope_contrasts.hpp"

namespace moderato {

struct Region {
    double lo = -std::numeric_limits<double>::infinity();
    double hi = std::numeric_limits<double>::infinity();
};

// The focal predictor's effect (`estimate`) at one moderator value.
struct EffectPoint : Inference {
    double moderator_value = 0;
    std::string level;         // categorical moderator: the level (moderator_value is its index)
    bool beyond_data = false;  // moderator value outside the observed range
};

// The conditional effect of `focal` is a polynomial in the moderator value m:
// effect(m) = sum_k m^k g_k' b, with g_k fixed vectors over the coefficients.
// Its variance is g(m)' V g(m) for the fit's covariance V.
class EffectFunction {
public:
    EffectFunction() = default;
    EffectFunction(std::vector<Eigen::VectorXd> g, const Eigen::VectorXd& beta, const Eigen::MatrixXd& cov);

    int degree() const { return static_cast<int>(g_.size()) - 1; }
    // The g_k vectors: they depend on the held values only, not on the data,
    // so a refit (e.g. a bootstrap replicate) reuses them with its own b and V.
    const std::vector<Eigen::VectorXd>& basis() const { return g_; }
    Eigen::VectorXd gradient(double m) const;  // g(m)
    double effect(double m) const;
    double variance(double m) const;
    // Coefficients of effect(m) = sum a_k m^k and of var(m) = sum v_kl m^(k+l).
    const std::vector<double>& effect_coefficients() const { return a_; }
    const Eigen::MatrixXd& variance_coefficients() const { return v_; }

private:
    std::vector<Eigen::VectorXd> g_;
    std::vector<double> a_;
    Eigen::MatrixXd v_;
};

// What the significant set looks like, or how it was found.
enum class RegionsKind {
    Everywhere,       // every moderator value
    Nowhere,          // no moderator value
    OneBoundary,      // a half line (the degenerate linear case)
    Outside,          // outside two boundaries
    Between,          // between two boundaries
    PolynomialRoots,  // higher degree: between the real roots of a polynomial
    Scan,             // probability scale: a scan of the moderator over scan_from..scan_to
};

// Where an effect differs from zero at a critical value q: the set of m with
// effect(m)^2 > q^2 var(m).
struct SignificanceRegions {
    double critical_value = 0;
    std::vector<double> boundaries;   // sorted
    std::vector<Region> significant;  // disjoint, sorted; +-inf for unbounded
    RegionsKind kind = RegionsKind::Nowhere;
    double scan_from = 0, scan_to = 0;  // Scan: the range scanned
};

// "significant everywhere", "significant nowhere", "one boundary (degenerate
// case)", "significant outside the two boundaries", "significant between the
// two boundaries", "roots of a polynomial", "scan of the moderator from A to B".
std::string kind_text(const SignificanceRegions& regions);

// Exact for effects linear in m (roots of a quadratic, every case); for
// higher degrees, the real roots of the polynomial effect^2 - q^2 var (from
// its companion matrix) polished by a bracketing root finder.
SignificanceRegions significance_regions(const EffectFunction& f, double critical_value);

struct ProbeSpec {
    std::string focal;
    std::string moderator;
    std::string second_moderator;                                    // empty: none
    double second_value = std::numeric_limits<double>::quiet_NaN();  // NaN: its mean
    double focal_value = std::numeric_limits<double>::quiet_NaN();   // for a squared focal: NaN = its mean
    std::vector<double> at;                                          // moderator values; empty: defaults
    // Values added to the defaults (the workbench's pins); all in ascending
    // order, a pin equal to a default counted once. Not used with `at`.
    std::vector<double> pinned;
    Adjustment adjustment = Adjustment::Holm;  // for the pairwise slope contrasts of a categorical moderator
};

// The Fieller interval of a crossover point: Bounded [lo, hi]; Unbounded
// (-inf, lo] U [hi, inf); WholeLine; None (the lines do not cross).
enum class FiellerInterval { Bounded, Unbounded, WholeLine, None };
const char* to_string(FiellerInterval interval);  // "bounded", "unbounded", "whole line", "none"

// Disordinal: the lines cross inside the observed focal range; Ordinal: they
// do not (they cross outside it, or not at all).
enum class CrossoverForm { Disordinal, Ordinal };
const char* to_string(CrossoverForm form);  // "disordinal", "ordinal"

struct Crossover {
    double focal_value = std::numeric_limits<double>::quiet_NaN();
    double ci_lower = std::numeric_limits<double>::quiet_NaN(), ci_upper = std::numeric_limits<double>::quiet_NaN();
    FiellerInterval ci_kind = FiellerInterval::None;
    bool within_observed_range = false;
    CrossoverForm form = CrossoverForm::Ordinal;
    std::string groups;  // which lines: "g=0 vs g=1", "z at 1.2 vs 3.4"
    // Where the two groups' predictions differ (the Johnson–Neyman technique
    // applied to the group gap over the focal predictor).
    SignificanceRegions gap_regions;
    EffectFunction gap;  // the group gap over the focal predictor
};

// Predicted outcome (link scale) over a grid of two numeric predictors, the
// others held at `values`; for the Surface plot.
struct SurfaceGrid {
    std::string x, z;
    std::vector<double> x_values, z_values;
    Eigen::MatrixXd predicted;  // z_values.size() x x_values.size()
    Eigen::MatrixXd std_error;
};
SurfaceGrid surface_grid(const Design& design, const FitResult& fit, const std::string& x, const std::string& z,
                         int nx = 41, int nz = 41, const std::map<std::string, double>& values = {});

// How an interaction on the probability scale is measured: CrossPartial
// (focal and moderator continuous), SlopeDifference (one of them 0/1),
// DoubleDifference (both 0/1).
enum class InteractionMeasure { CrossPartial, SlopeDifference, DoubleDifference };
// "cross-partial derivative", "difference in slopes", "double difference"
const char* to_string(InteractionMeasure measure);

// An interaction effect on the probability scale (see response_scale.hpp).
struct InteractionEffect : Inference {
    InteractionMeasure kind = InteractionMeasure::CrossPartial;
};

// The moderator values of the effects when none were chosen: the mean and
// ± 1 SD; the 10th, 50th and 90th percentiles for a skewed moderator (see
// default_moderator_values); 0 and 1 for a 0/1 moderator. Chosen: the
// values were given.
enum class ProbePoints { MeanSd, Percentiles, ZeroOne, Chosen };

// A multilevel fit with a random slope for the focal predictor: each
// group's own slope varies around the conditional effect (the fixed part,
// a typical group's) with the random slope's SD, so a new group's slope
// falls within effect ± critical_value × sd with the result's probability
// (critical_value: the normal quantile).
struct GroupSlopeSpread {
    double sd = 0, critical_value = 0;
};

// A count model's focal effect as a ratio, exp(effect on the log scale): the
// factor by which the expected count (or rate) changes for one unit more of
// the focal predictor (from 0 to 1 for a 0/1 one) at a moderator value, with
// the exponentiated interval.
struct RateRatio {
    double moderator_value = 0;
    std::string level;  // categorical moderator
    double ratio = 0, ci_lower = 0, ci_upper = 0;
};

struct ProbeResult {
    std::string outcome, focal, moderator;
    ProbeScale scale = ProbeScale::Model;                 // Outcome: the outcome's own scale
    Averaging averaging = Averaging::Sample;              // outcome scale only
    std::optional<InteractionEffect> interaction_effect;  // outcome scale
    bool categorical_moderator = false;
    // A numeric moderator that takes only the values 0 and 1 among the used
    // rows: its effects at 0 and 1 are reported, no region of significance.
    bool binary_moderator = false;
    bool binary_focal = false;  // the focal predictor takes only 0 and 1 among the used rows
    double level = 0.95, df = 0, critical_t = 0;
    std::pair<double, double> observed_range{0, 0};  // moderator, used rows
    std::pair<double, double> focal_range{0, 0};
    double moderator_mean = 0, moderator_sd = 0;
    double moderator_skew = 0;
    std::array<double, 3> moderator_percentiles{0, 0, 0};  // 10th, 50th, 90th
    ProbePoints points = ProbePoints::MeanSd;
    std::vector<EffectPoint> effects;
    std::optional<SignificanceRegions> johnson_neyman;  // continuous moderator only
    std::vector<bool> jn_beyond_data;                   // per boundary
    std::optional<SignificanceRegions> simultaneous;
    std::vector<Crossover> crossovers;
    // The joint test that the focal predictor's effect does not depend on the
    // moderator (all their product terms zero), with the fit's covariance.
    std::optional<WaldTest> interaction_test;
    // Categorical moderator: every pair of levels, the second's effect minus
    // the first's, on the result's scale; p-values adjusted by `adjustment`.
    std::vector<SlopeContrast> slope_contrasts;
    Adjustment adjustment = Adjustment::Holm;
    std::vector<std::string> notes;
    std::vector<std::string> cautions;  // what a reader must not overlook
    EffectFunction effect_function;     // for plots and the slider
    std::optional<GroupSlopeSpread> group_slopes;
    std::vector<RateRatio> rate_ratios;  // count models, at the effects' moderator values
};

// Whether a numeric moderator's default values are its percentiles rather
// than mean ± 1 SD: when |skew| > 1, or when mean − 1 SD or mean + 1 SD lies
// outside the observed range (a value no row has would be probed). The
// threshold of 1 is a common rule of thumb for a markedly skewed variable.
bool use_percentiles(const NumericSummary& moderator);

// InputError for: a focal column not in any product term, a moderator not in
// the model, a categorical focal predictor, unknown columns.
ProbeResult probe(const Design& design, const FitResult& fit, const ProbeSpec& spec);

// Rewrites the result's cautions for what it now holds (scale, ranges,
// band); call after changing a result.
void refresh_cautions(ProbeResult& result, const FitResult& fit);

EffectPoint effect_point(double moderator_value, const Inference& inference);

// The effect function of `focal` in a fitted design with the moderator free
// and every other column held at `values` (column -> value; categorical
// columns -> level index; absent numeric columns at their means).
EffectFunction effect_function(const Design& design, const FitResult& fit, const std::string& focal,
                               const std::string& moderator, const std::map<std::string, double>& values);

// The design row x(values) with prediction x' b: every column evaluated at
// `values` (numeric columns: value; categorical columns: level index,
// reference = 0; absent columns count as 0).
Eigen::VectorXd design_row(const Design& design, const std::map<std::string, double>& values);

// `values` with every numeric model column at its mean over the used rows and
// every categorical one at its reference level, then `overrides` applied.
std::map<std::string, double> typical_values(const Design& design, const std::map<std::string, double>& overrides = {});

// The difference in predicted outcome between two values of `column` (for a
// categorical column, level indices; reference = 0) as a function of the
// numeric column `free`, others held at `values`. For two groups this is the
// group gap; it is zero at the crossover of their lines.
EffectFunction contrast_function(const Design& design, const FitResult& fit, const std::string& column, double from,
                                 double to, const std::string& free, std::map<std::string, double> values);

}  // namespace moderato
