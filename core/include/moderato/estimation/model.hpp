// What the user asked for: roles, family, standard-error kind. Built by the
// UI's role slots or the CLI's plain options; there is no formula language.
#pragma once

#include <map>
#include <string>
#include <vector>

namespace moderato {

enum class Family { Linear, Logistic };
enum class SeKind { Classical, HC0, HC1, HC2, HC3, HC4, Cluster };

const char* to_string(Family f);
const char* to_string(SeKind s);  // "classical", "hc0", ..., "cluster"
// Parse "classical", "hc0".."hc4", "cluster"; InputError otherwise.
SeKind parse_se_kind(const std::string& text);
Family parse_family(const std::string& text);

struct ModelSpec {
    std::string outcome;
    std::vector<std::string> predictors;                 // main effects
    std::vector<std::vector<std::string>> interactions;  // 2 or 3 factors each; a repeated column is a power
    std::map<std::string, int> polynomial;               // column -> degree (adds column^2..^degree)
    bool intercept = true;
    Family family = Family::Linear;
    SeKind se = SeKind::Classical;
    std::string weights;  // empty: none
    std::string cluster;  // empty: none (required when se == Cluster)
    double level = 0.95;
    std::map<std::string, std::string> reference_levels;  // categorical column -> reference level
    std::vector<std::vector<std::string>> wald_tests;     // sets of term labels to test jointly
    unsigned threads = 0;                                 // 0: all hardware threads
};

}  // namespace moderato
