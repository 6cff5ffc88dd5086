#include "moderato/estimation/model.hpp"

#include "estimation/family_words.hpp"

#include "moderato/support/error.hpp"

namespace moderato {

const char* to_string(Family f) {
    switch (f) {
        case Family::Linear:
            return "linear";
        case Family::Logistic:
            return "logistic";
        case Family::Probit:
            return "probit";
        case Family::Poisson:
            return "poisson";
        case Family::NegativeBinomial:
            return "negative-binomial";
    }
    return "?";
}

Link link_of(Family f) {
    switch (f) {
        case Family::Linear:
            return Link::Identity;
        case Family::Logistic:
            return Link::Logit;
        case Family::Probit:
            return Link::Probit;
        case Family::Poisson:
        case Family::NegativeBinomial:
            return Link::Log;
    }
    return Link::Identity;
}

const char* to_string(SeKind s) {
    switch (s) {
        case SeKind::Classical:
            return "classical";
        case SeKind::HC0:
            return "hc0";
        case SeKind::HC1:
            return "hc1";
        case SeKind::HC2:
            return "hc2";
        case SeKind::HC3:
            return "hc3";
        case SeKind::HC4:
            return "hc4";
        case SeKind::Cluster:
            return "cluster";
    }
    return "?";
}

std::string model_scale_text(Family f, bool exposure) {
    switch (f) {
        case Family::Logistic:
            return "log-odds";
        case Family::Probit:
            return "probit";
        case Family::Poisson:
        case Family::NegativeBinomial:
            return exposure ? "log rate" : "log expected count";
        case Family::Linear:
            break;
    }
    return "";
}

std::string outcome_scale_text(Family f, const std::string& exposure) {
    if (binary_outcome(f)) return "probability";
    if (count_outcome(f)) return exposure.empty() ? "expected count" : "rate per unit of " + exposure;
    return "";
}

std::string detail::family_words(Family f) {
    switch (f) {
        case Family::Logistic:
            return "logistic";
        case Family::Probit:
            return "probit";
        case Family::Poisson:
            return "Poisson";
        case Family::NegativeBinomial:
            return "negative binomial";
        case Family::Linear:
            break;
    }
    return "linear";
}

SeKind parse_se_kind(const std::string& text) {
    for (SeKind s :
         {SeKind::Classical, SeKind::HC0, SeKind::HC1, SeKind::HC2, SeKind::HC3, SeKind::HC4, SeKind::Cluster})
        if (text == to_string(s)) return s;
    throw InputError("unknown standard-error kind '" + text + "'; use classical, hc0, hc1, hc2, hc3, hc4 or cluster");
}

Family parse_family(const std::string& text) {
    for (Family f : {Family::Linear, Family::Logistic, Family::Probit, Family::Poisson, Family::NegativeBinomial})
        if (text == to_string(f)) return f;
    throw InputError("unknown family '" + text + "'; use linear, logistic, probit, poisson or negative-binomial");
}

const char* to_string(MixedEstimation e) { return e == MixedEstimation::Reml ? "reml" : "ml"; }
const char* to_string(RandomCovariance c) { return c == RandomCovariance::Full ? "full" : "diagonal"; }
const char* to_string(FixedEffectDf d) {
    switch (d) {
        case FixedEffectDf::Normal:
            return "z";
        case FixedEffectDf::BetweenWithin:
            return "between-within";
        case FixedEffectDf::Satterthwaite:
            return "satterthwaite";
    }
    return "?";
}

std::string df_method_text(FixedEffectDf d) {
    switch (d) {
        case FixedEffectDf::Normal:
            return "z (normal)";
        case FixedEffectDf::BetweenWithin:
            return "between–within";
        case FixedEffectDf::Satterthwaite:
            return "Satterthwaite";
    }
    return "";
}

MixedEstimation parse_mixed_estimation(const std::string& text) {
    for (auto e : {MixedEstimation::Reml, MixedEstimation::Ml})
        if (text == to_string(e)) return e;
    throw InputError("unknown estimation '" + text + "'; use reml or ml");
}

RandomCovariance parse_random_covariance(const std::string& text) {
    for (auto c : {RandomCovariance::Full, RandomCovariance::Diagonal})
        if (text == to_string(c)) return c;
    throw InputError("unknown random-effects covariance '" + text + "'; use full or diagonal");
}

FixedEffectDf parse_fixed_effect_df(const std::string& text) {
    for (auto d : {FixedEffectDf::Normal, FixedEffectDf::BetweenWithin, FixedEffectDf::Satterthwaite})
        if (text == to_string(d)) return d;
    throw InputError("unknown degrees of freedom '" + text + "'; use z, between-within or satterthwaite");
}

std::string group_mean_name(const std::string& column) { return column + "_group_mean"; }

}  // namespace moderato
