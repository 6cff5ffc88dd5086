// The role slots of an analysis as plain data, and the edits the Specify
// section makes on them: put a column in a role, move it between roles,
// clear a role; with the checks that refuse an edit that cannot work (the
// same column in two roles, a categorical Outcome, an Outcome its family
// cannot model or an Exposure a family cannot use (in core's words),
// cluster-robust errors without a Clusters column, Groups beside
// weights or clusters) before it reaches the project. The multilevel
// choices that come with Groups are edited in multilevel_edit.hpp through
// the same checks. No Qt widgets here, so it is easy to test.
#pragma once

#include <QString>
#include <QStringList>
#include <optional>
#include <string>
#include <vector>

#include "moderato/project/project.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::ui {

// Groups: the level-2 unit of a multilevel model (Analysis::multilevel.groups).
// Exposure: a count model's exposure column (Roles::exposure).
enum class Role { Outcome, Focal, Moderator, SecondModerator, Controls, Weights, Clusters, Groups, Exposure };
inline constexpr int kRoleCount = 9;

QString roleName(Role r);                  // "Outcome", "Focal predictor", ...
bool roleTakesSeveral(Role r);             // Controls
std::optional<Role> roleFromIndex(int i);  // -1 or out of range: none

// The column(s) in a role.
std::vector<std::string> roleColumns(const Analysis& a, Role r);
// The role a column fills (the first one when it fills several).
std::optional<Role> roleOf(const Analysis& a, const std::string& column);

// How a column looks to the slots: numeric, categorical, or numeric with
// only the values 0 and 1 (both present).
enum class ColumnNature { Numeric, Categorical, ZeroOne };
ColumnNature columnNature(const Column& c);
QString natureName(ColumnNature n);  // "numeric", "categorical", "0/1"

// Display names of the standard-error kinds and families.
QString seKindName(SeKind s);  // "classical", "HC0".."HC4", "cluster-robust"
QString familyName(Family f);  // "linear", "logistic", "probit", "Poisson", "negative binomial"
// Whether core offers this SE kind for this family (HC2–HC4: linear only).
bool seOffered(Family f, SeKind s);
// Whether the Specify section offers this role for the analysis: Exposure
// only for count families (or while it still holds a column, to clear it).
bool roleOffered(const Analysis& a, Role r);

// The result of an edit: the analysis after it and its undo text, or why it
// was refused (then `after` is unset).
struct RoleEdit {
    std::optional<Analysis> after;
    QString description;  // "Set Moderator to soil_moisture_pct"
    QString refusal;      // why nothing changed (empty when the edit is fine)
    QString note;         // something the user should know about an accepted edit
};

// Puts `column` into `target`. `from` is the role the column was dragged out
// of (a move: it leaves that role; between two single slots the columns
// swap), or none for a column picked from the list.
RoleEdit assignColumn(const Analysis& before, const Table* table, Role target, const std::string& column,
                      std::optional<Role> from = std::nullopt);
// Empties a role, or removes one column from Controls.
RoleEdit clearRole(const Analysis& before, const Table* table, Role role, const std::string& column = {});
RoleEdit setFamily(const Analysis& before, const Table* table, Family family);
RoleEdit setSeKind(const Analysis& before, const Table* table, SeKind se);
RoleEdit setLevel(const Analysis& before, const Table* table, double level);
RoleEdit setCentring(const Analysis& before, const Table* table, Centring centring);
// Makes `level` the reference level of the categorical `column` (its first
// level in the design: the baseline of its dummies and the first group). The
// first level in text order is the default and is not stored. The slider
// stays on the same group.
RoleEdit setReferenceLevel(const Analysis& before, const Table* table, const std::string& column,
                           const std::string& level);
// The levels of a categorical `column` in the order the model uses them:
// the analysis's reference level first, then the others in text order.
std::vector<std::string> orderedLevels(const Analysis& a, const Table& table, const std::string& column);

// What cannot work in these settings, each naming the role and the column
// (empty when nothing the UI can see is wrong; core may still refuse).
QStringList roleProblems(const Analysis& a, const Table* table);

// Makes `after` an edit of `before`: the standard errors follow the Clusters
// and Groups columns, the multilevel choices follow the model's predictors
// (each with a note), and the edit is refused (refusal set) when it brings a
// problem `before` did not have. Every edit of role_edit and multilevel_edit
// ends here.
RoleEdit checkedEdit(const Analysis& before, Analysis after, const Table* table, QString description,
                     QString note = {});

}  // namespace moderato::ui
