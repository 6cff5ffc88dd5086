#include "specify/model_equation.hpp"

#include <QCoreApplication>
#include <algorithm>
#include <set>

#include "common/number_text.hpp"
#include "common/scale_words.hpp"
#include "moderato/estimation/design.hpp"
#include "specify/role_edit.hpp"

namespace moderato::ui {

namespace {

QString tr(const char* text) { return QCoreApplication::translate("ModelEquation", text); }
QString plain(const std::string& s) { return QString::fromStdString(s); }
const QString kTimes = QStringLiteral("\u00d7");

using Factors = std::vector<Atom>;  // one coefficient's factors; empty: the intercept

// The coefficients the roles ask for, expanded like core expands them:
// intercept, main effects, then the products (a three-way product brings its
// pairs first).
std::vector<Factors> expandRoles(const Analysis& a, const Table* table) {
    const ModelSpec spec = model_spec(a);
    const auto expand = [&](const std::vector<std::string>& columns) {
        std::vector<Factors> combos{{}};
        for (const auto& name : columns) {
            std::vector<Factors> next;
            const Column* c = table ? table->find(name) : nullptr;
            if (c && c->kind == ColumnKind::Categorical) {
                const auto levels = sorted_levels(*c);
                for (const auto& combo : combos)
                    for (std::size_t l = 1; l < levels.size(); ++l) {
                        auto c2 = combo;
                        c2.push_back({name, levels[l], 1});
                        next.push_back(std::move(c2));
                    }
            } else {
                for (auto combo : combos) {
                    combo.push_back({name, "", 1});
                    next.push_back(std::move(combo));
                }
            }
            combos = std::move(next);
        }
        return combos;
    };
    std::vector<Factors> out{Factors{}};
    std::vector<std::vector<std::string>> terms;
    for (const auto& p : spec.predictors)
        if (!p.empty()) terms.push_back({p});
    for (const auto& inter : spec.interactions) {
        if (inter.size() == 3) {
            terms.push_back({inter[0], inter[1]});
            terms.push_back({inter[0], inter[2]});
            terms.push_back({inter[1], inter[2]});
        }
        terms.push_back(inter);
    }
    for (const auto& t : terms)
        for (auto& f : expand(t)) out.push_back(std::move(f));
    return out;
}

std::vector<Factors> runFactors(const AnalysisRun& run) {
    std::vector<Factors> out;
    for (const auto& c : run.design.columns) out.push_back(c.atoms);
    return out;
}

bool isCentred(const Analysis& a, const Table* table, const std::string& column) {
    if (a.centring != Centring::Mean || column.empty()) return false;
    if (column != a.roles.focal && column != a.roles.moderator && column != a.roles.second_moderator) return false;
    const Column* c = table ? table->find(column) : nullptr;
    return c && columnNature(*c) == ColumnNature::Numeric;
}

struct Rendered {
    QString html, plain;
};

Rendered renderFactor(const Atom& atom, const Analysis& a, const Table* table, const AnalysisRun* run) {
    const QString name = plain(atom.column);
    if (!atom.level.empty()) {
        const QString text = QStringLiteral("[%1 = %2]").arg(name, plain(atom.level));
        return {text.toHtmlEscaped(), text};
    }
    QString base = name;
    if (isCentred(a, table, atom.column)) {
        QString centre = tr("mean");
        if (run) {
            const auto it = run->centres.find(atom.column);
            if (it != run->centres.end()) centre = numberText(it->second);
        }
        base = QStringLiteral("(%1 \u2212 %2)").arg(name, centre);
    }
    if (atom.power != 1) base += superscriptText(atom.power);
    return {base.toHtmlEscaped(), base};
}

Rendered renderTerm(const Factors& f, const Analysis& a, const Table* table, const AnalysisRun* run) {
    Rendered r;
    for (std::size_t i = 0; i < f.size(); ++i) {
        const Rendered part = renderFactor(f[i], a, table, run);
        if (i > 0) {
            r.html += kTimes;
            r.plain += kTimes;
        }
        r.html += part.html;
        r.plain += part.plain;
    }
    return r;
}

std::set<std::string> columnsOf(const Factors& f) {
    std::set<std::string> s;
    for (const auto& atom : f) s.insert(atom.column);
    return s;
}

QString bList(const std::vector<int>& idx) {
    QStringList parts;
    for (int i : idx) parts << QStringLiteral("b") + subscriptText(i);
    if (parts.size() <= 3) return parts.join(QStringLiteral(", "));
    return parts.front() + QStringLiteral(" \u2026 ") + parts.back();
}

ColumnNature natureOf(const Table* table, const std::string& column) {
    const Column* c = table ? table->find(column) : nullptr;
    return c ? columnNature(*c) : ColumnNature::Numeric;
}

QString referenceLevel(const Table* table, const AnalysisRun* run, const std::string& column) {
    if (run)
        if (const CategoricalInfo* info = run->design.categorical(column)) return plain(info->reference);
    if (const Column* c = table ? table->find(column) : nullptr; c && c->kind == ColumnKind::Categorical) {
        const auto levels = sorted_levels(*c);
        if (!levels.empty()) return plain(levels.front());
    }
    return {};
}

QString interactionReading(const Analysis& a, const Table* table, const AnalysisRun* run,
                           const std::vector<Factors>& coefs) {
    const std::string& f = a.roles.focal;
    const std::string& m = a.roles.moderator;
    const std::string& w = a.roles.second_moderator;
    if (f.empty() || m.empty()) return {};
    std::vector<int> two, three;
    for (std::size_t i = 0; i < coefs.size(); ++i) {
        const auto cols = columnsOf(coefs[i]);
        if (cols == std::set<std::string>{f, m}) two.push_back(static_cast<int>(i));
        if (!w.empty() && cols == std::set<std::string>{f, m, w}) three.push_back(static_cast<int>(i));
    }
    if (two.empty()) return {};
    const QString F = plain(f), M = plain(m), W = plain(w);
    const ColumnNature fn = natureOf(table, f), mn = natureOf(table, m);
    QString subject;
    if (fn == ColumnNature::Categorical) {
        const QString ref = referenceLevel(table, run, f);
        subject = tr("the difference between each level of %1 and its reference level %2").arg(F, ref);
    } else {
        subject = tr("the slope of %1").arg(F);
    }
    const QString scale = scaleWords(a.family, a.roles.exposure, QString()).modelScale;
    if (!scale.isEmpty()) subject += tr(" on the %1 scale").arg(scale);
    QString change;
    if (mn == ColumnNature::Categorical)
        change =
            tr("differs between each level of %1 and its reference level %2").arg(M, referenceLevel(table, run, m));
    else if (mn == ColumnNature::ZeroOne) change = tr("changes from %1 = 0 to %1 = 1").arg(M);
    else change = tr("changes per unit of %1").arg(M);
    QString out = two.size() == 1 ? tr("%1 is how much %2 %3.").arg(bList(two), subject, change)
                                  : tr("%1 are how much %2 %3.").arg(bList(two), subject, change);
    if (!three.empty()) {
        const QString per = natureOf(table, w) == ColumnNature::Categorical ? tr("across the levels of %1").arg(W)
                                                                            : tr("per unit of %1").arg(W);
        out += QLatin1Char(' ') + (three.size() == 1 ? tr("%1 is how much that change itself varies %2.")
                                                     : tr("%1 are how much that change itself varies %2."))
                                      .arg(bList(three), per);
    }
    return out;
}

struct Side {
    QString plain, html;
};

// The left-hand side: ŷ, logit P(y = 1), probit P(y = 1) or log E[y].
Side leftSide(Family family, const QString& outcome) {
    const QString y = outcome.toHtmlEscaped();
    switch (family) {
        case Family::Logistic:
        case Family::Probit: {
            const QString link = family == Family::Probit ? QStringLiteral("probit") : QStringLiteral("logit");
            return {QStringLiteral("%1 P(%2 = 1)").arg(link, outcome),
                    QStringLiteral("%1&nbsp;P(%2&nbsp;=&nbsp;1)").arg(link, y)};
        }
        case Family::Poisson:
        case Family::NegativeBinomial:
            return {QStringLiteral("log E[%1]").arg(outcome), QStringLiteral("log&nbsp;E[%1]").arg(y)};
        case Family::Linear:
            break;
    }
    return {QStringLiteral("\u0177"), QStringLiteral("<i>\u0177</i>")};
}

// What the left-hand side means, in the family's words.
QString familyLegend(const Analysis& a, const QString& outcome) {
    switch (a.family) {
        case Family::Logistic:
            return tr("logit P = log(P / (1 \u2212 P)), the log-odds that %1 is 1.").arg(outcome);
        case Family::Probit:
            return tr("probit P = \u03a6\u207b\u00b9(P), the standard normal quantile of the probability that %1 "
                      "is 1.")
                .arg(outcome);
        case Family::Poisson:
        case Family::NegativeBinomial: {
            QString text = a.family == Family::Poisson
                               ? tr("E[%1] is the expected count of %1 (Poisson: its variance equals its mean).")
                               : tr("E[%1] is the expected count of %1 (negative binomial: its variance is "
                                    "E + \u03b1\u00b7E\u00b2).");
            text = text.arg(outcome);
            if (!a.roles.exposure.empty())
                text += QLatin1Char(' ') + tr("log(%1) is the exposure, with coefficient 1: the b's describe the rate "
                                              "of %2 per unit of %1.")
                                               .arg(plain(a.roles.exposure), outcome);
            return text;
        }
        case Family::Linear:
            break;
    }
    return tr("\u0177 is the predicted %1.").arg(outcome);
}

}  // namespace

bool runMatches(const AnalysisRun& run, const Analysis& a) {
    const ModelSpec s = model_spec(a);
    return run.analysis_id == a.id && run.spec.outcome == s.outcome && run.spec.predictors == s.predictors &&
           run.spec.interactions == s.interactions && run.spec.family == s.family && run.spec.exposure == s.exposure &&
           run.design.columns.size() == run.fit.coefficients.size();
}

ModelEquation modelEquation(const Analysis& a, const Table* table, const AnalysisRun* run) {
    ModelEquation eq;
    if (run && !runMatches(*run, a)) run = nullptr;
    const std::vector<Factors> coefs = run ? runFactors(*run) : expandRoles(a, table);
    const QString outcome = a.roles.outcome.empty() ? tr("outcome") : plain(a.roles.outcome);
    const Side lhs = leftSide(a.family, outcome);
    QStringList htmlTerms, plainTerms;
    bool hasIndicator = false;
    for (std::size_t i = 0; i < coefs.size(); ++i) {
        const QString b = QStringLiteral("b") + subscriptText(static_cast<int>(i));
        QString label;
        for (std::size_t k = 0; k < coefs[i].size(); ++k) {
            const Atom& atom = coefs[i][k];
            if (k > 0) label += kTimes;
            label += plain(atom.level.empty()
                               ? (atom.power == 1 ? atom.column : atom.column + "^" + std::to_string(atom.power))
                               : atom.column + "=" + atom.level);
            if (!atom.level.empty()) hasIndicator = true;
        }
        eq.terms << (coefs[i].empty() ? QStringLiteral("intercept") : label);
        if (coefs[i].empty()) {
            htmlTerms << QStringLiteral("<i>%1</i>").arg(b);
            plainTerms << b;
            continue;
        }
        const Rendered r = renderTerm(coefs[i], a, table, run);
        // Keep each term on one line (no breaking spaces inside); the equation wraps between terms.
        QString html = r.html;
        html.replace(QLatin1Char(' '), QStringLiteral("&nbsp;"));
        htmlTerms << QStringLiteral("<i>%1</i>\u00b7%2").arg(b, html);
        plainTerms << b + QStringLiteral("\u00b7") + r.plain;
    }
    // A count model's exposure: the offset log(E), whose coefficient is 1.
    if (!a.roles.exposure.empty() && count_outcome(a.family)) {
        const QString e = plain(a.roles.exposure);
        plainTerms << QStringLiteral("log(%1)").arg(e);
        htmlTerms << QStringLiteral("log(%1)").arg(
            e.toHtmlEscaped().replace(QLatin1Char(' '), QStringLiteral("&nbsp;")));
    }
    eq.plain = lhs.plain + QStringLiteral(" = ") + plainTerms.join(QStringLiteral(" + "));
    eq.html = lhs.html + QStringLiteral(" = ") + htmlTerms.join(QStringLiteral(" + "));

    QStringList legend{familyLegend(a, outcome)};
    if (hasIndicator) {
        std::set<std::string> cats;
        for (const auto& f : coefs)
            for (const auto& atom : f)
                if (!atom.level.empty()) cats.insert(atom.column);
        QStringList refs;
        for (const auto& c : cats) refs << tr("%1 (reference level %2)").arg(plain(c), referenceLevel(table, run, c));
        legend << tr("[column = level] is 1 in rows with that level and 0 otherwise; %1.")
                      .arg(refs.join(QStringLiteral(", ")));
    }
    if (a.centring == Centring::Mean) {
        QStringList centred;
        for (const std::string& c : {a.roles.focal, a.roles.moderator, a.roles.second_moderator})
            if (isCentred(a, table, c)) centred << plain(c);
        if (!centred.isEmpty())
            legend << (centred.size() == 1 ? tr("%1 enters as its distance from its mean over the rows used.")
                                           : tr("%1 enter as distances from their means over the rows used."))
                          .arg(centred.join(tr(" and ")));
    }
    eq.legend = legend.join(QLatin1Char(' '));
    eq.reading = interactionReading(a, table, run, coefs);
    return eq;
}

QString rowsUsedText(const FitResult& fit) {
    QString text = tr("n = %1 rows used").arg(fit.n);
    if (fit.n_excluded == 0) return text + tr("; none excluded.");
    text += tr("; %1 excluded").arg(fit.n_excluded);
    QStringList parts;
    for (const auto& e : fit.exclusions) parts << QStringLiteral("%1: %2").arg(plain(e.column)).arg(e.rows);
    if (!parts.isEmpty()) text += tr(" (rows missing %1)").arg(parts.join(QStringLiteral(", ")));
    return text + QLatin1Char('.');
}

}  // namespace moderato::ui
