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

}  // namespace moderato
