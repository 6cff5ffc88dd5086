#include "specify/multilevel_edit.hpp"

#include <QCoreApplication>
#include <algorithm>
#include <cmath>
#include <unordered_map>

namespace moderato::ui {

namespace {

QString tr(const char* text) { return QCoreApplication::translate("MultilevelEdit", text); }
QString q(const std::string& s) { return QStringLiteral("'%1'").arg(QString::fromStdString(s)); }
QString plain(const std::string& s) { return QString::fromStdString(s); }

void addNote(QString& note, const QString& more) { note = note.isEmpty() ? more : note + QLatin1Char(' ') + more; }

bool listed(const std::vector<std::string>& list, const std::string& column) {
    return std::find(list.begin(), list.end(), column) != list.end();
}

// Puts `column` into `list` or takes it out; whether anything changed.
bool toggle(std::vector<std::string>& list, const std::string& column, bool on) {
    if (listed(list, column) == on) return false;
    if (on) list.push_back(column);
    else list.erase(std::remove(list.begin(), list.end(), column), list.end());
    return true;
}

bool isPredictor(const std::vector<MultilevelPredictor>& ps, const std::string& column) {
    return std::any_of(ps.begin(), ps.end(), [&](const MultilevelPredictor& p) { return p.column == column; });
}

// Drops the options of columns that are no longer numeric predictors; says which.
void keepToPredictors(Analysis& after, const Table* table, QString& note) {
    const auto ps = multilevelPredictors(after, table);
    QStringList dropped;
    auto& ml = after.multilevel;
    for (auto* list : {&ml.random_slopes, &ml.centre_within, &ml.group_means})
        for (auto it = list->begin(); it != list->end();) {
            if (isPredictor(ps, *it) || !table) {
                ++it;
                continue;
            }
            if (!dropped.contains(q(*it))) dropped << q(*it);
            it = list->erase(it);
        }
    if (!dropped.isEmpty())
        addNote(note, tr("The group options of %1 were dropped: a random slope, centring within groups and group "
                         "means are for numeric predictors of the model.")
                          .arg(dropped.join(tr(" and "))));
}

// Groups chosen where there were none: the model's own standard errors and the focal predictor's random slope.
void startMultilevel(Analysis& after, const Table* table, QString& note) {
    if (after.se != SeKind::Classical) {
        addNote(note, tr("Standard errors now come from the multilevel model (model-based); %1 standard errors do "
                         "not apply to it.")
                          .arg(seKindName(after.se)));
        after.se = SeKind::Classical;
    }
    const std::string& focal = after.roles.focal;
    const auto ps = multilevelPredictors(after, table);
    if (!after.multilevel.random_slopes.empty() || focal.empty() || !isPredictor(ps, focal) || !table ||
        !variesWithinGroups(*table, focal, after.multilevel.groups))
        return;
    after.multilevel.random_slopes.push_back(focal);
    addNote(note, tr("Each group of %1 now has its own intercept and its own slope of %2 (Random slope, under "
                     "Multilevel model); turn the slope off there for a random intercept only.")
                      .arg(q(after.multilevel.groups), q(focal)));
}

}  // namespace

std::vector<MultilevelPredictor> multilevelPredictors(const Analysis& a, const Table* table) {
    std::vector<MultilevelPredictor> out;
    const auto add = [&](const std::string& column, Role role) {
        if (column.empty() || isPredictor(out, column)) return;
        const Column* c = table ? table->find(column) : nullptr;
        if (c && c->kind == ColumnKind::Numeric) out.push_back({column, role});
    };
    add(a.roles.focal, Role::Focal);
    add(a.roles.moderator, Role::Moderator);
    add(a.roles.second_moderator, Role::SecondModerator);
    for (const auto& c : a.roles.controls) add(c, Role::Controls);
    return out;
}

bool variesWithinGroups(const Table& table, const std::string& column, const std::string& groups) {
    const Column* x = table.find(column);
    const Column* g = table.find(groups);
    if (!x || !g || x->kind != ColumnKind::Numeric) return false;
    // The first value seen in each group, by the group's code (categorical) or value (numeric).
    std::vector<double> byCode(g->kind == ColumnKind::Categorical ? g->levels.size() : 0, std::nan(""));
    std::unordered_map<double, double> byValue;
    for (std::size_t r = 0; r < x->numbers.size(); ++r) {
        const double v = x->numbers[r];
        if (std::isnan(v) || g->is_missing(r)) continue;
        double* first = nullptr;
        if (g->kind == ColumnKind::Categorical) first = &byCode[static_cast<std::size_t>(g->codes[r])];
        else first = &byValue.try_emplace(g->numbers[r], std::nan("")).first->second;
        if (std::isnan(*first)) *first = v;
        else if (*first != v) return true;
    }
    return false;
}

RoleEdit setRandomSlope(const Analysis& before, const Table* table, const std::string& column, bool on) {
    if (on && table && !variesWithinGroups(*table, column, before.multilevel.groups)) {
        RoleEdit e;
        e.refusal = tr("%1 does not vary within the groups of %2 (it is a group-level column), so its slope cannot "
                       "differ between groups. As a moderator of another predictor's slope it needs no random slope "
                       "of its own.")
                        .arg(q(column), q(before.multilevel.groups));
        return e;
    }
    Analysis after = before;
    if (!toggle(after.multilevel.random_slopes, column, on)) return {};
    return checkedEdit(before, std::move(after), table,
                       on ? tr("Turn on the random slope of %1").arg(plain(column))
                          : tr("Turn off the random slope of %1").arg(plain(column)));
}

RoleEdit setCentreWithin(const Analysis& before, const Table* table, const std::string& column, bool on) {
    Analysis after = before;
    if (!toggle(after.multilevel.centre_within, column, on)) return {};
    return checkedEdit(before, std::move(after), table,
                       on ? tr("Centre %1 within groups").arg(plain(column))
                          : tr("Stop centring %1 within groups").arg(plain(column)));
}

RoleEdit setGroupMeans(const Analysis& before, const Table* table, const std::string& column, bool on) {
    Analysis after = before;
    if (!toggle(after.multilevel.group_means, column, on)) return {};
    return checkedEdit(before, std::move(after), table,
                       on ? tr("Add the group means of %1").arg(plain(column))
                          : tr("Remove the group means of %1").arg(plain(column)));
}

RoleEdit setMixedEstimation(const Analysis& before, const Table* table, MixedEstimation estimation) {
    Analysis after = before;
    after.multilevel.estimation = estimation;
    return checkedEdit(before, std::move(after), table, tr("Set estimation to %1").arg(estimationName(estimation)));
}

RoleEdit setRandomCovariance(const Analysis& before, const Table* table, RandomCovariance covariance) {
    Analysis after = before;
    after.multilevel.covariance = covariance;
    return checkedEdit(before, std::move(after), table,
                       tr("Set random-effects covariance to %1").arg(covarianceName(covariance)));
}

RoleEdit setFixedEffectDf(const Analysis& before, const Table* table, FixedEffectDf df) {
    Analysis after = before;
    after.multilevel.df = df;
    return checkedEdit(before, std::move(after), table, tr("Set degrees of freedom to %1").arg(dfMethodName(df)));
}

QString estimationName(MixedEstimation e) {
    return e == MixedEstimation::Reml ? QStringLiteral("REML") : QStringLiteral("ML");
}

QString covarianceName(RandomCovariance c) { return c == RandomCovariance::Full ? tr("full") : tr("diagonal"); }

QString dfMethodName(FixedEffectDf d) {
    switch (d) {
        case FixedEffectDf::Satterthwaite:
            return QStringLiteral("Satterthwaite");
        case FixedEffectDf::BetweenWithin:
            return tr("between\u2013within");
        case FixedEffectDf::Normal:
            return tr("z (normal)");
    }
    return {};
}

void followGroups(const Analysis& before, Analysis& after, const Table* table, QString& note) {
    if (after.multilevel.groups.empty()) {
        if (before.multilevel.groups.empty()) return;
        after.multilevel = MultilevelSpec{};
        addNote(note, tr("Without Groups the model is single-level again: its random slopes and group options are "
                         "gone, and the standard errors are %1 (choose others under Standard errors).")
                          .arg(seKindName(after.se)));
        return;
    }
    if (before.multilevel.groups.empty()) startMultilevel(after, table, note);
    keepToPredictors(after, table, note);
}

QStringList multilevelProblems(const Analysis& a) {
    QStringList out;
    const std::string& g = a.multilevel.groups;
    if (g.empty()) return out;
    if (a.family != Family::Linear)
        out << tr("A multilevel model (Groups %1) is offered for a linear outcome only: choose the linear family, "
                  "or clear Groups.")
                   .arg(q(g));
    if (!a.roles.weights.empty())
        out << tr("A multilevel model (Groups %1) does not take weights: remove %2 from Weights, or clear Groups.")
                   .arg(q(g), q(a.roles.weights));
    if (!a.roles.clusters.empty())
        out << tr("Groups %1 and Clusters %2 both say which rows belong together; a multilevel model takes Groups "
                  "only: clear Clusters (or drag %2 from Clusters onto Groups), or clear Groups.")
                   .arg(q(g), q(a.roles.clusters));
    else if (a.se != SeKind::Classical)
        out << tr("A multilevel model (Groups %1) takes its standard errors from the model; %2 standard errors are "
                  "not offered with Groups.")
                   .arg(q(g), seKindName(a.se));
    return out;
}

}  // namespace moderato::ui
