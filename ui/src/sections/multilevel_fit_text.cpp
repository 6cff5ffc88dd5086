#include "sections/multilevel_fit_text.hpp"

#include <QCoreApplication>
#include <QStringList>
#include <cmath>

#include "common/number_text.hpp"
#include "specify/multilevel_edit.hpp"

namespace moderato::ui {

namespace {

QString tr(const char* text) { return QCoreApplication::translate("EstimatesSection", text); }
QString h(const std::string& s) { return QString::fromStdString(s).toHtmlEscaped(); }

QString row(const QString& label, const QString& value) {
    return QStringLiteral("<tr><td style=\"padding-right:14px\">%1</td><td>%2</td></tr>").arg(label, value);
}

}  // namespace

QString waldText(const WaldTest& w) {
    const QString text = std::isfinite(w.df2)
                             ? QStringLiteral("F(%1, %2) = %3, %4")
                                   .arg(dfText(w.df1), dfText(w.df2), numberText(w.statistic), pClauseText(w.p_value))
                             : QStringLiteral("\u03c7\u00b2(%1) = %2, %3")
                                   .arg(dfText(w.df1), numberText(w.chi_square), pClauseText(w.p_value));
    return text.toHtmlEscaped();
}

QString multilevelHeader(const std::string& outcome, const FitResult& fit) {
    const MultilevelResult& m = *fit.multilevel;
    const QString tests = m.df == FixedEffectDf::Normal
                              ? tr("z (standard normal)")
                              : tr("t on each term's own %1 df (column df)").arg(dfMethodName(m.df_used()));
    return tr("<b>Coefficients</b> of %1 &nbsp;·&nbsp; multilevel linear model in groups of %2 (%3) &nbsp;·&nbsp; "
              "model-based standard errors &nbsp;·&nbsp; %4 confidence intervals &nbsp;·&nbsp; %5")
        .arg(h(outcome), h(m.groups), estimationName(m.estimation), levelText(fit.level), tests.toHtmlEscaped());
}

QString multilevelFitRows(const FitResult& f) {
    const MultilevelResult& m = *f.multilevel;
    QString rows;
    rows +=
        row(QStringLiteral("n"),
            f.n_excluded ? tr("%1 (%2 rows excluded)").arg(countText(f.n), countText(f.n_excluded)) : countText(f.n));
    rows += row(tr("Groups"), tr("%1 groups of %2").arg(countText(m.groups_count), h(m.groups)));
    rows += row(tr("Residual SD (within groups)"), numberText(f.residual_sd));
    if (f.f_df1 > 0) {
        WaldTest all;
        all.statistic = f.f_statistic;
        all.df1 = f.f_df1;
        all.df2 = f.f_df2;
        all.chi_square = f.f_statistic * f.f_df1;
        all.p_value = f.f_p_value;
        rows += row(tr("All terms but the intercept"), tr("Wald %1").arg(waldText(all)));
    }
    rows += row(m.estimation == MixedEstimation::Reml ? tr("REML criterion") : tr("Log-likelihood"),
                numberText(f.log_likelihood));
    rows += row(QStringLiteral("AIC"), numberText(f.aic));
    rows += row(QStringLiteral("BIC"), numberText(f.bic));
    return QStringLiteral("<table>%1</table>").arg(rows);
}

QString multilevelComparison(const FitResult& f) {
    if (!f.comparison)
        return tr("The model has no product terms that could be estimated, so there is nothing to compare.");
    const NestedComparison& c = *f.comparison;
    QStringList dropped;
    for (const auto& t : c.dropped_terms) dropped << h(t);
    const MultilevelResult& m = *f.multilevel;
    const QString df = m.df == FixedEffectDf::Normal ? tr("against χ², which assumes many groups")
                                                     : tr("on %1 df").arg(dfMethodName(m.df_used()));
    return tr("Wald test of %1 with the multilevel model's standard errors (%2): %3 — <b>the test to report</b>.")
        .arg(dropped.join(QStringLiteral(", ")), df.toHtmlEscaped(), waldText(c.wald));
}

}  // namespace moderato::ui
