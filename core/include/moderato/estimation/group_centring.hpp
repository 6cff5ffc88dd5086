// The multilevel centring options (Enders and Tofighi 2007) applied to a
// copy of a model's columns before its design is built: group-mean centring
// of a level-1 column (each row's value minus its group's mean) and a
// column's group means as a level-2 predictor. The means are taken over the
// rows the model can use (a value in every model column), so the centred
// column averages zero in every group of the fit. The user's table is never
// changed.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "moderato/estimation/model.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {

// Each row's group as 0..G-1 in order of first appearance (-1 where the
// group is missing), with the groups' names.
struct GroupCodes {
    std::vector<int> code;
    std::vector<std::string> names;
};
GroupCodes group_codes(const Column& groups);

struct CentredModel {
    Table table;     // the model's columns, centred; group means added
    ModelSpec spec;  // the group-means columns among the predictors; no centring left to do
    std::vector<std::string> notes;
};

// None when the specification asks for no centring. InputError for a
// centring column that is not numeric, or centring without groups.
std::optional<CentredModel> group_centred(const Table& table, const ModelSpec& spec);

}  // namespace moderato
