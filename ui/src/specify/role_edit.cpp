#include "specify/role_edit.hpp"
#include "common/number_text.hpp"
#include "model/project_document.hpp"
#include "moderato/estimation/design.hpp"
#include "moderato/support/error.hpp"
#include "specify/multilevel_edit.hpp"

#include <QCoreApplication>
#include <algorithm>
#include <cmath>
#include <limits>

namespace moderato::ui {

namespace {

QString tr(const char* text) { return QCoreApplication::translate("RoleEdit", text); }
QString q(const std::string& s) { return QStringLiteral("'%1'").arg(QString::fromStdString(s)); }
QString plain(const std::string& s) { return QString::fromStdString(s); }

// The string of a single-column role (nullptr for Controls); const or not.
template <class A>
auto singleSlot(A& a, Role r) -> decltype(&a.roles.outcome) {
    switch (r) {
        case Role::Outcome:
            return &a.roles.outcome;
        case Role::Focal:
            return &a.roles.focal;
        case Role::Moderator:
            return &a.roles.moderator;
        case Role::SecondModerator:
            return &a.roles.second_moderator;
        case Role::Weights:
            return &a.roles.weights;
        case Role::Clusters:
            return &a.roles.clusters;
        case Role::Groups:
            return &a.multilevel.groups;
        case Role::Exposure:
            return &a.roles.exposure;
        case Role::Controls:
            return nullptr;
    }
    return nullptr;
}

void removeFrom(Analysis& a, Role r, const std::string& column) {
    if (r == Role::Controls) {
        auto& c = a.roles.controls;
        c.erase(std::remove(c.begin(), c.end(), column), c.end());
    } else if (std::string* s = singleSlot(a, r); s && *s == column) {
        s->clear();
    }
}

// What core says of the Outcome and Exposure columns for the family: an
// Outcome the family cannot model (not 0/1, a negative count) or an Exposure
// it cannot use, in core's own words (the fit would stop with them).
QStringList familyProblems(const Analysis& a, const Table& table) {
    if (!generalized(a.family) && a.roles.exposure.empty()) return {};
    ModelSpec spec;
    spec.outcome = a.roles.outcome;
    spec.family = a.family;
    spec.exposure = table.find(a.roles.exposure) ? a.roles.exposure : std::string();
    try {
        check_family_columns(table, spec);
    } catch (const InputError& e) {
        return {plain(e.what()) + QLatin1Char('.')};
    }
    return {};
}

// The edit is refused when it brings a problem the analysis did not have
// before (a project may arrive with problems of its own; fixing one of them
// must stay possible while the others remain).
void addNote(QString& note, const QString& more) { note = note.isEmpty() ? more : note + QLatin1Char(' ') + more; }

// One story of inference: a Clusters column means cluster-robust standard
// errors, and cluster-robust errors without one fall back to a sandwich.
void followClusters(const Analysis& before, Analysis& after, QString& note) {
    if (after.roles.clusters == before.roles.clusters) return;
    if (!after.multilevel.groups.empty()) return;  // the multilevel model's own standard errors (followGroups)
    if (!after.roles.clusters.empty() && after.se != SeKind::Cluster) {
        after.se = SeKind::Cluster;
        addNote(note, tr("Standard errors are now cluster-robust by %1, so rows of one "
                         "cluster are not taken as independent; choose others under "
                         "Standard errors (the clusters are then not used).")
                          .arg(q(after.roles.clusters)));
    } else if (after.roles.clusters.empty() && after.se == SeKind::Cluster) {
        after.se = after.family == Family::Linear ? SeKind::HC3 : SeKind::HC0;
        addNote(note, tr("With no Clusters column the standard errors are now %1 "
                         "(cluster-robust ones need clusters).")
                          .arg(after.se == SeKind::HC3 ? QStringLiteral("HC3") : QStringLiteral("HC0")));
    }
}

}  // namespace

RoleEdit checkedEdit(const Analysis& before, Analysis after, const Table* table, QString description, QString note) {
    RoleEdit e;
    followClusters(before, after, note);
    followGroups(before, after, table, note);
    if (after == before) return e;  // nothing to do
    const QStringList old = roleProblems(before, table);
    QStringList added;
    for (const QString& p : roleProblems(after, table))
        if (!old.contains(p)) added << p;
    if (!added.isEmpty()) {
        e.refusal = added.join(QLatin1Char('\n'));
        return e;
    }
    // The slider's value and the pinned values are values of the moderator,
    // and the second moderator's held value one of that column: they mean
    // nothing for another column, so the probe starts again at the mean.
    if (after.roles.moderator != before.roles.moderator) {
        if (!after.probe.pinned.empty() && !before.roles.moderator.empty() && !after.roles.moderator.empty()) {
            const QString cleared = tr("The pinned values of %1 were cleared; pin values of %2 in the Probe section.")
                                        .arg(q(before.roles.moderator), q(after.roles.moderator));
            addNote(note, cleared);
        }
        after.probe.current = std::numeric_limits<double>::quiet_NaN();
        after.probe.pinned.clear();
    }
    if (after.roles.second_moderator != before.roles.second_moderator)
        after.probe.second_value = std::numeric_limits<double>::quiet_NaN();
    if (before.name == roleBasedName(before.roles)) after.name = roleBasedName(after.roles);
    e.after = std::move(after);
    e.description = std::move(description);
    e.note = std::move(note);
    return e;
}

QString roleName(Role r) {
    switch (r) {
        case Role::Outcome:
            return tr("Outcome");
        case Role::Focal:
            return tr("Focal predictor");
        case Role::Moderator:
            return tr("Moderator");
        case Role::SecondModerator:
            return tr("Second moderator");
        case Role::Controls:
            return tr("Controls");
        case Role::Weights:
            return tr("Weights");
        case Role::Clusters:
            return tr("Clusters");
        case Role::Groups:
            return tr("Groups");
        case Role::Exposure:
            return tr("Exposure");
    }
    return {};
}

bool roleTakesSeveral(Role r) { return r == Role::Controls; }

std::optional<Role> roleFromIndex(int i) {
    if (i < 0 || i >= kRoleCount) return std::nullopt;
    return static_cast<Role>(i);
}

std::vector<std::string> roleColumns(const Analysis& a, Role r) {
    if (r == Role::Controls) return a.roles.controls;
    const std::string* s = singleSlot(a, r);
    if (!s || s->empty()) return {};
    return {*s};
}

std::optional<Role> roleOf(const Analysis& a, const std::string& column) {
    if (column.empty()) return std::nullopt;
    for (int i = 0; i < kRoleCount; ++i) {
        const auto cols = roleColumns(a, static_cast<Role>(i));
        if (std::find(cols.begin(), cols.end(), column) != cols.end()) return static_cast<Role>(i);
    }
    return std::nullopt;
}

ColumnNature columnNature(const Column& c) {
    if (c.kind == ColumnKind::Categorical) return ColumnNature::Categorical;
    bool zero = false, one = false;
    for (const double v : c.numbers) {
        if (v != v) continue;
        if (v == 0) zero = true;
        else if (v == 1) one = true;
        else return ColumnNature::Numeric;
    }
    return zero && one ? ColumnNature::ZeroOne : ColumnNature::Numeric;
}

QString natureName(ColumnNature n) {
    switch (n) {
        case ColumnNature::Numeric:
            return tr("numeric");
        case ColumnNature::Categorical:
            return tr("categorical");
        case ColumnNature::ZeroOne:
            return tr("0/1");
    }
    return {};
}

QString seKindName(SeKind s) {
    switch (s) {
        case SeKind::Classical:
            return tr("classical");
        case SeKind::HC0:
            return QStringLiteral("HC0");
        case SeKind::HC1:
            return QStringLiteral("HC1");
        case SeKind::HC2:
            return QStringLiteral("HC2");
        case SeKind::HC3:
            return QStringLiteral("HC3");
        case SeKind::HC4:
            return QStringLiteral("HC4");
        case SeKind::Cluster:
            return tr("cluster-robust");
    }
    return {};
}

QString familyName(Family f) {
    switch (f) {
        case Family::Logistic:
            return tr("logistic");
        case Family::Probit:
            return tr("probit");
        case Family::Poisson:
            return tr("Poisson");
        case Family::NegativeBinomial:
            return tr("negative binomial");
        case Family::Linear:
            break;
    }
    return tr("linear");
}

bool seOffered(Family f, SeKind s) {
    return !generalized(f) || (s != SeKind::HC2 && s != SeKind::HC3 && s != SeKind::HC4);
}

bool roleOffered(const Analysis& a, Role r) {
    return r != Role::Exposure || count_outcome(a.family) || !a.roles.exposure.empty();
}

QStringList roleProblems(const Analysis& a, const Table* table) {
    QStringList out;
    // One column, one role.
    std::vector<std::pair<std::string, std::vector<Role>>> uses;
    for (int i = 0; i < kRoleCount; ++i) {
        const Role r = static_cast<Role>(i);
        for (const auto& c : roleColumns(a, r)) {
            auto it = std::find_if(uses.begin(), uses.end(), [&](const auto& u) { return u.first == c; });
            if (it == uses.end()) uses.push_back({c, {r}});
            else it->second.push_back(r);
        }
    }
    for (const auto& [column, roles] : uses) {
        if (roles.size() < 2) continue;
        QStringList names;
        for (Role r : roles) names << roleName(r);
        names.removeDuplicates();
        out << (names.size() == 1
                    ? tr("%1 appears twice in %2; a column fills a role once.").arg(q(column), names.front())
                    : tr("%1 fills two roles (%2); a column can fill only one role.")
                          .arg(q(column), names.join(tr(" and "))));
    }
    if (table) {
        for (int i = 0; i < kRoleCount; ++i) {
            const Role r = static_cast<Role>(i);
            for (const auto& c : roleColumns(a, r))
                if (!table->find(c))
                    out << tr("The %1 column %2 is not in the dataset; choose another column.").arg(roleName(r), q(c));
        }
        if (const Column* y = table->find(a.roles.outcome)) {
            if (y->kind == ColumnKind::Categorical) {
                out << tr("The Outcome %1 is categorical; the Outcome must be a numeric column.")
                           .arg(q(a.roles.outcome));
            }
        }
        out << familyProblems(a, *table);
        if (const Column* w = table->find(a.roles.weights); w && w->kind == ColumnKind::Categorical)
            out << tr("The Weights column %1 is categorical; weights must be positive numbers.")
                       .arg(q(a.roles.weights));
    }
    if (a.se == SeKind::Cluster && a.roles.clusters.empty())
        out << tr(
            "Cluster-robust standard errors need a Clusters column: drop one in the Clusters slot, or "
            "choose another kind of standard error.");
    if (!seOffered(a.family, a.se))
        out << tr("%1 standard errors are not offered for %2 models; choose classical, HC0, HC1 or "
                  "cluster-robust.")
                   .arg(seKindName(a.se), familyName(a.family));
    out << multilevelProblems(a);
    return out;
}

RoleEdit assignColumn(const Analysis& before, const Table* table, Role target, const std::string& column,
                      std::optional<Role> from) {
    RoleEdit e;
    if (column.empty()) return e;
    if (from && *from == target) return e;  // dropped back where it came from
    const QString col = plain(column);
    if (!from) {
        if (const auto r = roleOf(before, column)) {
            if (*r == target) return e;  // already there
            e.refusal = tr("%1 cannot also be the %2: it is already in %3, and a column fills only one role. "
                           "Remove it from %3 first, or drag it from %3 onto %2 to move it.")
                            .arg(q(column), roleName(target), roleName(*r));
            if (target == Role::Controls)
                e.refusal = tr("%1 cannot also be a control: it is already the %2, and a column fills only one "
                               "role. Remove it from %2 first, or drag it from %2 onto Controls to move it.")
                                .arg(q(column), roleName(*r));
            return e;
        }
    }
    Analysis after = before;
    QString description;
    if (from) {
        const auto held = roleColumns(before, *from);
        if (std::find(held.begin(), held.end(), column) == held.end()) {
            e.refusal = tr("%1 is no longer in %2.").arg(q(column), roleName(*from));
            return e;
        }
        removeFrom(after, *from, column);
    }
    if (target == Role::Controls) {
        after.roles.controls.push_back(column);
        description =
            from ? tr("Move %1 from %2 to Controls").arg(col, roleName(*from)) : tr("Add %1 to Controls").arg(col);
    } else {
        std::string* slot = singleSlot(after, target);
        const std::string previous = *slot;
        *slot = column;
        if (from && !previous.empty() && !roleTakesSeveral(*from)) {
            *singleSlot(after, *from) = previous;  // two single slots: swap
            description = tr("Swap %1 and %2").arg(roleName(*from), roleName(target));
        } else if (from) {
            description = tr("Move %1 from %2 to %3").arg(col, roleName(*from), roleName(target));
        } else {
            description = tr("Set %1 to %2").arg(roleName(target), col);
        }
    }
    return checkedEdit(before, std::move(after), table, description);
}

RoleEdit clearRole(const Analysis& before, const Table* table, Role role, const std::string& column) {
    Analysis after = before;
    QString description;
    if (role == Role::Controls) {
        if (column.empty()) {
            after.roles.controls.clear();
            description = tr("Clear Controls");
        } else {
            removeFrom(after, role, column);
            description = tr("Remove %1 from Controls").arg(plain(column));
        }
    } else {
        singleSlot(after, role)->clear();
        description = tr("Clear %1").arg(roleName(role));
    }
    return checkedEdit(before, std::move(after), table, description);
}

RoleEdit setFamily(const Analysis& before, const Table* table, Family family) {
    Analysis after = before;
    after.family = family;
    QString description = tr("Set family to %1").arg(familyName(family));
    QString note;
    if (!seOffered(family, before.se)) {
        // HC2–HC4 are linear-model corrections: the nearest sandwich that generalized models have is HC0.
        after.se = SeKind::HC0;
        description = tr("Set family to %1 (standard errors %2 → HC0)").arg(familyName(family), seKindName(before.se));
        note = tr("%1 is not offered for %2 models, so the standard errors are now HC0.")
                   .arg(seKindName(before.se), familyName(family));
    }
    return checkedEdit(before, std::move(after), table, description, note);
}

RoleEdit setSeKind(const Analysis& before, const Table* table, SeKind se) {
    Analysis after = before;
    after.se = se;
    QString note;
    if (se != SeKind::Cluster && !before.roles.clusters.empty())
        note = tr("%1 standard errors do not use the Clusters column %2; rows of one cluster are taken as "
                  "independent.")
                   .arg(seKindName(se), q(before.roles.clusters));
    return checkedEdit(before, std::move(after), table, tr("Set standard errors to %1").arg(seKindName(se)), note);
}

RoleEdit setLevel(const Analysis& before, const Table* table, double level) {
    Analysis after = before;
    after.level = level;
    if (!(level > 0 && level < 1)) {
        RoleEdit e;
        e.refusal = tr("The confidence level must be between 0 and 1, e.g. 0.95.");
        return e;
    }
    return checkedEdit(before, std::move(after), table,
                       tr("Set confidence level to %1").arg(QString::number(level, 'g', 6)));
}

RoleEdit setCentring(const Analysis& before, const Table* table, Centring centring) {
    Analysis after = before;
    after.centring = centring;
    return checkedEdit(before, std::move(after), table, tr("Set centring to %1").arg(plain(to_string(centring))));
}

std::vector<std::string> orderedLevels(const Analysis& a, const Table& table, const std::string& column) {
    const Column* c = table.find(column);
    if (!c || c->kind != ColumnKind::Categorical) return {};
    std::vector<std::string> levels = sorted_levels(*c);
    const auto chosen = a.reference_levels.find(column);
    if (chosen != a.reference_levels.end()) {
        const auto it = std::find(levels.begin(), levels.end(), chosen->second);
        if (it != levels.end()) std::rotate(levels.begin(), it, it + 1);
    }
    return levels;
}

RoleEdit setReferenceLevel(const Analysis& before, const Table* table, const std::string& column,
                           const std::string& level) {
    if (!table) return {};
    const std::vector<std::string> was = orderedLevels(before, *table, column);
    if (std::find(was.begin(), was.end(), level) == was.end()) return {};
    Analysis after = before;
    const std::vector<std::string> text_order = sorted_levels(table->at(column));
    if (level == text_order.front()) after.reference_levels.erase(column);
    else after.reference_levels[column] = level;
    const std::vector<std::string> now = orderedLevels(after, *table, column);
    const double g = before.probe.current;
    if (column == before.roles.moderator && std::isfinite(g) && g >= 0 && g < static_cast<double>(was.size())) {
        const auto& name = was[static_cast<std::size_t>(g)];
        after.probe.current = static_cast<double>(std::find(now.begin(), now.end(), name) - now.begin());
    }
    return checkedEdit(before, std::move(after), table, tr("Set reference level of %1 to %2").arg(q(column), q(level)));
}

}  // namespace moderato::ui
