// The multilevel choices that come with a Groups column, as plain data, and
// their edits: a random slope, centring within groups and group means for
// each numeric predictor; the estimation, the random effects' covariance
// and the degrees of freedom. Each edit goes through checkedEdit
// (role_edit.hpp), so it is one undo step and refused with a reason when
// it cannot work. No Qt widgets here.
#pragma once

#include <QString>
#include <QStringList>
#include <string>
#include <vector>

#include "specify/role_edit.hpp"

namespace moderato::ui {

// A predictor that can take the multilevel options: in the model, numeric.
struct MultilevelPredictor {
    std::string column;
    Role role = Role::Focal;  // Focal, Moderator, SecondModerator or Controls
};
// The numeric predictors of the model in its order (focal predictor,
// moderator, second moderator, controls); categorical ones take none of the
// options and are left out.
std::vector<MultilevelPredictor> multilevelPredictors(const Analysis& a, const Table* table);

// Whether `column` takes different values within at least one group of
// `groups` (false: a group-level column, whose slope cannot vary between
// groups; also false when either column is missing from the table).
bool variesWithinGroups(const Table& table, const std::string& column, const std::string& groups);

// The edits. `on`: turn the option on or off for `column`.
RoleEdit setRandomSlope(const Analysis& before, const Table* table, const std::string& column, bool on);
RoleEdit setCentreWithin(const Analysis& before, const Table* table, const std::string& column, bool on);
RoleEdit setGroupMeans(const Analysis& before, const Table* table, const std::string& column, bool on);
RoleEdit setMixedEstimation(const Analysis& before, const Table* table, MixedEstimation estimation);
RoleEdit setRandomCovariance(const Analysis& before, const Table* table, RandomCovariance covariance);
RoleEdit setFixedEffectDf(const Analysis& before, const Table* table, FixedEffectDf df);

// Display names: "REML", "ML"; "full", "diagonal"; "Satterthwaite",
// "between–within", "z (normal)".
QString estimationName(MixedEstimation e);
QString covarianceName(RandomCovariance c);
QString dfMethodName(FixedEffectDf d);

// For checkedEdit: keeps the multilevel settings in step with the roles.
// Groups set for the first time: model-based standard errors and, when the
// focal predictor is numeric and varies within groups, its random slope;
// Groups cleared: the options go with it (a project keeps them only with
// Groups); a predictor that left the model (or became categorical) loses its
// options. Each change is said in `note`.
void followGroups(const Analysis& before, Analysis& after, const Table* table, QString& note);
// What a multilevel model cannot take, each naming the roles: a logistic
// family, weights, clusters, another kind of standard errors.
QStringList multilevelProblems(const Analysis& a);

}  // namespace moderato::ui
