// What the user asked for: roles, family, standard-error kind. Built by the
// UI's role slots or the CLI's plain options; there is no formula language.
#pragma once

#include <map>
#include <string>
#include <vector>

namespace moderato {

// Linear: least squares. Logistic and Probit: a 0/1 outcome. Poisson and
// NegativeBinomial (NB2, variance mu + alpha mu^2): a count outcome with a
// log link, optionally per unit of an exposure column.
enum class Family { Linear, Logistic, Probit, Poisson, NegativeBinomial };
// How the linear predictor maps to the outcome's mean.
enum class Link { Identity, Logit, Probit, Log };
enum class SeKind { Classical, HC0, HC1, HC2, HC3, HC4, Cluster };
// Multilevel (linear mixed) models: how the variance components are
// estimated, the shape of the random-effects covariance, and the degrees of
// freedom the fixed effects are tested with.
enum class MixedEstimation { Reml, Ml };
enum class RandomCovariance { Full, Diagonal };
enum class FixedEffectDf { Normal, BetweenWithin, Satterthwaite };

const char* to_string(Family f);  // "linear", "logistic", "probit", "poisson", "negative-binomial"
Link link_of(Family f);
// A generalized linear model (every family but Linear): fitted by Newton's
// method, tested with z, no R-squared.
inline bool generalized(Family f) { return f != Family::Linear; }
inline bool binary_outcome(Family f) { return f == Family::Logistic || f == Family::Probit; }
inline bool count_outcome(Family f) { return f == Family::Poisson || f == Family::NegativeBinomial; }
// The scale a generalized model's coefficients live on, for readers:
// "log-odds", "probit", "log expected count" or "log rate" (with an exposure);
// "" for a linear model.
std::string model_scale_text(Family f, bool exposure);
// The outcome's own scale: "probability", "expected count", or "rate per unit
// of EXPOSURE"; "" for a linear model.
std::string outcome_scale_text(Family f, const std::string& exposure);
const char* to_string(SeKind s);  // "classical", "hc0", ..., "cluster"
// Parse "classical", "hc0".."hc4", "cluster"; InputError otherwise.
SeKind parse_se_kind(const std::string& text);
Family parse_family(const std::string& text);
const char* to_string(MixedEstimation e);   // "reml", "ml"
const char* to_string(RandomCovariance c);  // "full", "diagonal"
const char* to_string(FixedEffectDf d);     // "z", "between-within", "satterthwaite"
// "Satterthwaite", "between–within" or "z (normal)" for readers.
std::string df_method_text(FixedEffectDf d);
MixedEstimation parse_mixed_estimation(const std::string& text);
RandomCovariance parse_random_covariance(const std::string& text);
FixedEffectDf parse_fixed_effect_df(const std::string& text);

// A multilevel model: rows nested in the groups of one column, a random
// intercept per group plus random slopes for the named numeric predictors.
// Group-mean centring replaces a level-1 column by its deviation from its
// group's mean; a group-means column "COL_group_mean" (the mean over the
// group's rows the model uses) joins the predictors as a level-2 column.
struct MultilevelSpec {
    std::string groups;  // empty: a single-level model
    std::vector<std::string> random_slopes;
    MixedEstimation estimation = MixedEstimation::Reml;
    RandomCovariance covariance = RandomCovariance::Full;
    FixedEffectDf df = FixedEffectDf::Satterthwaite;
    std::vector<std::string> centre_within;
    std::vector<std::string> group_means;
    bool group_effects = false;  // report each group's conditional modes

    bool active() const { return !groups.empty(); }
    bool operator==(const MultilevelSpec&) const = default;
};

// The name of the column holding a column's group means.
std::string group_mean_name(const std::string& column);

struct ModelSpec {
    std::string outcome;
    std::vector<std::string> predictors;                 // main effects
    std::vector<std::vector<std::string>> interactions;  // 2 or 3 factors each; a repeated column is a power
    std::map<std::string, int> polynomial;               // column -> degree (adds column^2..^degree)
    bool intercept = true;
    Family family = Family::Linear;
    SeKind se = SeKind::Classical;
    std::string weights;   // empty: none
    std::string cluster;   // empty: none (required when se == Cluster)
    std::string exposure;  // count models: rows' exposure (offset log exposure); empty: none
    double level = 0.95;
    std::map<std::string, std::string> reference_levels;  // categorical column -> reference level
    std::vector<std::vector<std::string>> wald_tests;     // sets of term labels to test jointly
    unsigned threads = 0;                                 // 0: all hardware threads
    MultilevelSpec multilevel;
};

}  // namespace moderato
