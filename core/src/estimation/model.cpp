#include "moderato/estimation/model.hpp"

#include "moderato/support/error.hpp"

namespace moderato {

const char* to_string(Family f) { return f == Family::Linear ? "linear" : "logistic"; }

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

SeKind parse_se_kind(const std::string& text) {
    for (SeKind s :
         {SeKind::Classical, SeKind::HC0, SeKind::HC1, SeKind::HC2, SeKind::HC3, SeKind::HC4, SeKind::Cluster})
        if (text == to_string(s)) return s;
    throw InputError("unknown standard-error kind '" + text + "'; use classical, hc0, hc1, hc2, hc3, hc4 or cluster");
}

Family parse_family(const std::string& text) {
    if (text == "linear") return Family::Linear;
    if (text == "logistic") return Family::Logistic;
    throw InputError("unknown family '" + text + "'; use linear or logistic");
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
