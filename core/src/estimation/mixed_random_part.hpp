// The random part of a multilevel model built from its design: Z (a column
// of ones for the random intercept, then each random slope's column), with
// the checks that make a random slope meaningless, and the warnings a
// reader of a multilevel fit must see about its groups.
#pragma once

#include <Eigen/Dense>
#include <string>
#include <vector>

#include "moderato/estimation/design.hpp"
#include "moderato/estimation/model.hpp"

namespace moderato::detail {

struct RandomPart {
    Eigen::MatrixXd Z;                            // n x q
    std::vector<std::string> terms;               // "intercept", then the slopes' columns
    std::vector<int> term_columns;                // the fixed-effect column of each (-1: none)
    std::vector<std::vector<int>> slope_members;  // per slope: its column and its cross-level products
    std::vector<std::size_t> group_sizes;
};

// InputError for a random slope on a column the model lacks, a categorical
// or constant column, one that does not vary within any group, a model
// option a multilevel fit does not offer, and groups of one row each.
RandomPart random_part(const Design& d, const ModelSpec& spec);

// Cautions about the groups: few of them, rows left out for a missing group,
// a random slope's moderator that varies within groups.
std::vector<std::string> group_warnings(const Design& d, const ModelSpec& spec, const RandomPart& part);

}  // namespace moderato::detail
