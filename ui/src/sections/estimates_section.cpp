#include "sections/estimates_section.hpp"

#include <QApplication>
#include <QButtonGroup>
#include <QClipboard>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QRadioButton>
#include <QScrollArea>
#include <QScrollBar>
#include <QTableView>
#include <QToolButton>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

#include "common/number_text.hpp"
#include "common/scale_words.hpp"
#include "common/table_clipboard.hpp"
#include "estimates/coefficient_model.hpp"
#include "model/project_document.hpp"
#include "sections/multilevel_fit_text.hpp"
#include "sections/random_part_view.hpp"
#include "specify/model_equation.hpp"
#include "specify/role_edit.hpp"
#include "specify/section_widgets.hpp"
#include "style/estuary.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

QString h(const std::string& s) { return QString::fromStdString(s).toHtmlEscaped(); }

QLabel* wrapped(QWidget* parent, bool rich = true) {
    auto* l = new QLabel(parent);
    l->setWordWrap(true);
    l->setTextFormat(rich ? Qt::RichText : Qt::PlainText);
    l->setTextInteractionFlags(Qt::TextSelectableByMouse);
    return l;
}

QString seLabel(SeKind s, Family f) {
    if (s == SeKind::Classical && generalized(f)) return EstimatesSection::tr("classical (model-based)");
    return seKindName(s);
}

// "F(2, 145) = 12.31, p &lt; 0.001" or "χ²(2) = 24.62, p = 0.012" (rich text).
QString testText(double statistic, double df1, double df2, double chiSquare, double p) {
    const QString text =
        std::isinf(df2)
            ? QStringLiteral("\u03c7\u00b2(%1) = %2, %3").arg(df1).arg(numberText(chiSquare), pClauseText(p))
            : QStringLiteral("F(%1, %2) = %3, %4").arg(df1).arg(df2).arg(numberText(statistic), pClauseText(p));
    return text.toHtmlEscaped();
}

QString row(const QString& label, const QString& value) {
    return QStringLiteral("<tr><td style=\"padding-right:14px\">%1</td><td>%2</td></tr>").arg(label, value);
}

// A count model's dispersion: the negative binomial's alpha with its
// interval, or the Poisson model's overdispersion statistics.
QString dispersionRows(const FitResult& f) {
    QString rows;
    if (f.dispersion) {
        const Dispersion& d = *f.dispersion;
        rows += row(EstimatesSection::tr("Dispersion \u03b1"),
                    EstimatesSection::tr("%1 (SE %2; %3 CI %4): variance = mean + \u03b1\u00b7mean\u00b2")
                        .arg(numberText(d.alpha), numberText(d.std_error), levelText(f.level),
                             rangeText(d.ci_lower, d.ci_upper))
                        .toHtmlEscaped());
    }
    if (f.overdispersion) {
        const Overdispersion& o = *f.overdispersion;
        rows += row(EstimatesSection::tr("Overdispersion"),
                    EstimatesSection::tr("Pearson \u03c7\u00b2/df %1 · Cameron & Trivedi z = %2, one-sided %3%4")
                        .arg(numberText(o.pearson_ratio), numberText(o.test_value), pClauseText(o.p_value),
                             o.evident() ? EstimatesSection::tr(" — the counts vary more than a Poisson model "
                                                                "allows; try the negative binomial")
                                         : QString())
                        .toHtmlEscaped());
    }
    return rows;
}

// Deviance, McFadden R², the likelihood-ratio test, dispersion and iterations of a generalized model.
QString generalizedFitRows(const FitResult& main) {
    QString rows;
    rows += row(EstimatesSection::tr("Deviance"),
                std::isnan(main.null_deviance) ? numberText(main.deviance)
                                               : EstimatesSection::tr("%1 (null model %2)")
                                                     .arg(numberText(main.deviance), numberText(main.null_deviance)));
    rows += row(EstimatesSection::tr("McFadden R\u00b2"), numberText(main.mcfadden_r2));
    if (main.lr_df > 0)
        rows += row(EstimatesSection::tr("All terms but the intercept"),
                    EstimatesSection::tr("likelihood ratio %1")
                        .arg(testText(0, main.lr_df, INFINITY, main.lr_statistic, main.lr_p_value)));
    rows += dispersionRows(main);
    rows += row(EstimatesSection::tr("Iterations"),
                main.converged ? EstimatesSection::tr("%1 (converged)").arg(main.iterations)
                               : EstimatesSection::tr("%1 (did not converge)").arg(main.iterations));
    return rows;
}

// Coefficient labels of the centred fit: the columns' own names with the
// centre subtracted, e.g. "(nitrogen_kg_ha − 112.4)×(soil_moisture_pct − 30.12)".
QStringList centredLabels(const AnalysisRun& run) {
    QStringList out;
    for (const DesignColumn& c : run.design.columns) {
        if (c.atoms.empty()) {  // the intercept
            out << QString::fromStdString(c.label);
            continue;
        }
        QStringList parts;
        for (const Atom& a : c.atoms) {
            const auto it = run.centres.find(a.column);
            if (it == run.centres.end() || !a.level.empty() || a.power != 1) {
                parts << QString::fromStdString(atom_label(a));
                continue;
            }
            parts << QStringLiteral("(%1 \u2212 %2)").arg(QString::fromStdString(a.column), numberText(it->second));
        }
        out << parts.join(QStringLiteral("\u00d7"));
    }
    return out;
}

}  // namespace

EstimatesSection::EstimatesSection(ProjectDocument* doc, QWidget* parent)
    : AnalysisSection(doc, parent),
      header_(wrapped(this)),
      copy_(new QToolButton(this)),
      toggle_(new QWidget(this)),
      asIs_(new QRadioButton(tr("columns as they are"), toggle_)),
      centred_(new QRadioButton(tr("centred at the mean"), toggle_)),
      toggleText_(wrapped(toggle_, false)),
      table_(new QTableView(this)),
      model_(new CoefficientModel(this)),
      fit_(wrapped(this)),
      randomPart_(new RandomPartView(this)),
      comparisonTitle_(sectionHeading(tr("With and without the interaction"), this)),
      comparison_(wrapped(this)),
      warnings_(wrapped(this)),
      notes_(wrapped(this)),
      errorBanner_(wrapped(this, false)) {
    auto* outer = new QVBoxLayout(this);
    outer->setContentsMargins(0, 4, 0, 0);
    auto* scroll = new QScrollArea(this);
    scroll->setWidgetResizable(true);
    scroll->setFrameShape(QFrame::NoFrame);
    outer->addWidget(scroll);
    auto* body = new QWidget(scroll);
    scroll->setWidget(body);
    auto* v = new QVBoxLayout(body);
    v->setContentsMargins(6, 0, 6, 6);
    v->setSpacing(6);
    for (QWidget* w : std::initializer_list<QWidget*>{header_, copy_, toggle_, table_, fit_, randomPart_,
                                                      comparisonTitle_, comparison_, warnings_, notes_, errorBanner_})
        w->setParent(body);

    errorBanner_->setObjectName(QStringLiteral("estimates-error"));
    errorBanner_->setStyleSheet(bannerStyle(estuary::series(1)));
    errorBanner_->hide();
    v->addWidget(errorBanner_);

    auto* top = new QHBoxLayout;
    header_->setObjectName(QStringLiteral("estimates-header"));
    top->addWidget(header_, 1);
    copy_->setObjectName(QStringLiteral("estimates-copy"));
    copy_->setText(tr("Copy table"));
    copy_->setToolTip(tr("Copy the coefficient table as tab-separated text, with every digit"));
    top->addWidget(copy_, 0, Qt::AlignTop);
    v->addLayout(top);

    toggle_->setObjectName(QStringLiteral("estimates-centring"));
    auto* t = new QVBoxLayout(toggle_);
    t->setContentsMargins(0, 0, 0, 0);
    auto* buttons = new QHBoxLayout;
    buttons->addWidget(new QLabel(tr("Show the coefficients with"), toggle_));
    buttons->addWidget(asIs_);
    buttons->addWidget(centred_);
    buttons->addStretch(1);
    t->addLayout(buttons);
    t->addWidget(toggleText_);
    auto* group = new QButtonGroup(toggle_);
    group->addButton(asIs_);
    group->addButton(centred_);
    asIs_->setChecked(true);
    connect(asIs_, &QRadioButton::toggled, this, [this] { refresh(); });
    v->addWidget(toggle_);

    table_->setObjectName(QStringLiteral("estimates-table"));
    table_->setModel(model_);
    table_->setItemDelegate(new CoefficientDelegate(table_));
    table_->verticalHeader()->hide();
    table_->setAlternatingRowColors(true);
    table_->setWordWrap(false);
    table_->setSelectionBehavior(QAbstractItemView::SelectItems);
    table_->setVerticalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    table_->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    table_->horizontalHeader()->setStretchLastSection(false);
    table_->verticalHeader()->setDefaultSectionSize(fontMetrics().height() + 10);
    v->addWidget(table_, 0, Qt::AlignLeft);

    fit_->setObjectName(QStringLiteral("estimates-fit"));
    v->addWidget(sectionHeading(tr("Fit"), body));
    v->addWidget(fit_);
    v->addWidget(randomPart_);
    comparison_->setObjectName(QStringLiteral("estimates-comparison"));
    v->addWidget(comparisonTitle_);
    v->addWidget(comparison_);
    warnings_->setObjectName(QStringLiteral("estimates-warnings"));
    warnings_->setStyleSheet(bannerStyle(estuary::series(4)));
    v->addWidget(warnings_);
    notes_->setObjectName(QStringLiteral("estimates-notes"));
    keepMutedText(notes_);
    v->addWidget(notes_);
    v->addStretch(1);

    connect(copy_, &QToolButton::clicked, this, [this] { QApplication::clipboard()->setText(tableText()); });
    refresh();
}

void EstimatesSection::showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) {
    id_ = id;
    run_ = std::move(run);
    error_ = error;
    refresh();
}

bool EstimatesSection::showingCentred() const {
    return run_ && run_->centred_fit && toggle_->isVisibleTo(this) && centred_->isChecked();
}

QString EstimatesSection::tableText() const { return modelAsTsv(model_); }

void EstimatesSection::fitTableHeight() {
    // The table as large as its content (the section scrolls, not the table),
    // so the numbers sit next to their terms.
    table_->resizeColumnsToContents();
    QHeaderView* hh = table_->horizontalHeader();
    const int gap = fontMetrics().horizontalAdvance(QStringLiteral("00"));
    for (int c = 0; c < model_->columnCount(); ++c) hh->resizeSection(c, hh->sectionSize(c) + gap);
    hh->resizeSection(CoefficientModel::Term, std::max(hh->sectionSize(CoefficientModel::Term), 12 * gap));
    int width = 2 * table_->frameWidth();
    for (int c = 0; c < model_->columnCount(); ++c) width += hh->sectionSize(c);
    int height = hh->sizeHint().height() + 2 * table_->frameWidth();
    for (int r = 0; r < model_->rowCount(); ++r) height += table_->rowHeight(r);
    table_->setFixedSize(width + 2, height + 2);
}

void EstimatesSection::refresh() {
    const Analysis* a = id_.isEmpty() ? nullptr : doc_->analysis(id_);
    errorBanner_->setText(tr("The model could not be fitted: %1").arg(error_));
    errorBanner_->setVisible(!error_.isEmpty());
    if (!run_ || !a) {
        model_->clear();
        header_->setText(error_.isEmpty() ? tr("No estimates yet.")
                                          : tr("No estimates: the model could not be fitted."));
        for (QWidget* w : std::initializer_list<QWidget*>{toggle_, fit_, randomPart_, comparisonTitle_, comparison_,
                                                          warnings_, notes_})
            w->hide();
        copy_->setEnabled(false);
        fitTableHeight();
        return;
    }
    const AnalysisRun& run = *run_;
    const FitResult& main = run.fit;
    const bool canCentre = run.centred_fit.has_value() && a->centring == Centring::Mean;
    toggle_->setVisible(canCentre);
    const bool centred = canCentre && centred_->isChecked();
    const FitResult& shown = centred ? *run.centred_fit : main;
    model_->setFit(&shown, centred ? centredLabels(run) : QStringList());
    fitTableHeight();
    copy_->setEnabled(true);

    showHeader(*a, main);
    if (canCentre) showCentres(run);
    showFitStatistics(main);
    randomPart_->setFit(&main);
    showComparison(main);
    showWarningsAndNotes(main, shown);
}

// What the table is: the model, SE kind, level, reference distribution.
void EstimatesSection::showHeader(const Analysis& a, const FitResult& main) {
    if (main.multilevel) {
        header_->setText(multilevelHeader(a.roles.outcome, main));
        return;
    }
    const bool logistic = generalized(main.family);
    QString se = seLabel(main.se, main.family);
    if (main.se == SeKind::Cluster) se += tr(" (%1 clusters)").arg(main.n_clusters);
    const QString dist = logistic ? tr("z (standard normal)") : tr("t on %1 df").arg(main.df_inference);
    QString scale = scaleWords(main.family, main.exposure, QString()).modelScale;
    if (!main.exposure.empty()) scale += tr(", per unit of %1").arg(h(main.exposure));
    header_->setText(tr("<b>Coefficients</b> of %1 &nbsp;·&nbsp; %2 model%3 &nbsp;·&nbsp; %4 standard errors "
                        "&nbsp;·&nbsp; %5 confidence intervals &nbsp;·&nbsp; %6")
                         .arg(h(a.roles.outcome), familyName(main.family),
                              logistic ? tr(" (%1)").arg(scale) : QString(), se.toHtmlEscaped(), levelText(main.level),
                              dist));
}

void EstimatesSection::showCentres(const AnalysisRun& run) {
    QStringList at;
    for (const auto& [col, centre] : run.centres)
        at << tr("%1 at %2").arg(QString::fromStdString(col), numberText(centre));
    toggleText_->setText(
        tr("Centred: %1. Centring changes the intercept and the lower-order coefficients (each main effect "
           "becomes the effect where the other centred columns are at their means); it does not change the "
           "product coefficient, the fit or the conditional effects.")
            .arg(at.join(QStringLiteral(", "))));
}

void EstimatesSection::showFitStatistics(const FitResult& main) {
    fit_->show();
    if (main.multilevel) {  // no R²
        fit_->setText(multilevelFitRows(main));
        return;
    }
    const bool logistic = generalized(main.family);
    QString rows;
    rows += row(QStringLiteral("n"),
                main.n_excluded ? tr("%1 (%2 rows excluded)").arg(countText(main.n), countText(main.n_excluded))
                                : countText(main.n));
    if (!logistic) {
        rows += row(QStringLiteral("R\u00b2"), numberText(main.r_squared));
        rows += row(tr("Adjusted R\u00b2"), numberText(main.adj_r_squared));
        rows += row(tr("Residual SD"), numberText(main.residual_sd));
        if (main.f_df1 > 0)
            rows +=
                row(tr("All terms but the intercept"),
                    testText(main.f_statistic, main.f_df1, main.f_df2, main.f_statistic * main.f_df1, main.f_p_value) +
                        tr(" (%1 covariance)").arg(seLabel(main.se, main.family)));
    } else {
        rows += generalizedFitRows(main);
    }
    rows += row(tr("Log-likelihood"), numberText(main.log_likelihood));
    rows += row(QStringLiteral("AIC"), numberText(main.aic));
    rows += row(QStringLiteral("BIC"), numberText(main.bic));
    fit_->setText(QStringLiteral("<table>%1</table>").arg(rows));
}

// The model with and without its product terms.
void EstimatesSection::showComparison(const FitResult& main) {
    const bool logistic = generalized(main.family);
    comparisonTitle_->show();
    comparison_->show();
    if (main.multilevel) {  // the Wald test with the model's own covariance: no R² change
        comparison_->setText(multilevelComparison(main));
    } else if (main.comparison) {
        const NestedComparison& c = *main.comparison;
        QStringList dropped;
        for (const auto& t : c.dropped_terms) dropped << h(t);
        const QString terms = dropped.join(QStringLiteral(", "));
        // One test to report, following the chosen standard errors; the other is named secondary with its reason.
        const bool robust = main.se != SeKind::Classical;
        const QString toReport = tr(" — <b>the test to report</b>");
        const QString modelNote = !robust    ? toReport
                                  : logistic ? tr(" — secondary here: it assumes the model's variance is right")
                                             : tr(" — secondary here: it assumes the same error variance in every row");
        const QString waldNote = robust     ? toReport
                                 : logistic ? tr(" — the same question asked another way; report the test above")
                                            : tr(" — with classical standard errors, the test above again");
        QString text;
        if (!logistic) {
            text = tr("Without %1: R\u00b2 = %2; with: %3 (change %4).<br>"
                      "R\u00b2-change test (classical, from the sums of squares): %5%6.")
                       .arg(terms, numberText(c.r_squared_reduced), numberText(main.r_squared),
                            numberText(c.r_squared_change),
                            testText(c.f_statistic, c.df1, c.df2, c.f_statistic * c.df1, c.p_value), modelNote);
        } else {
            text = tr("Without %1.<br>Likelihood-ratio test: %2%3.")
                       .arg(terms, testText(0, c.df1, INFINITY, c.lr_statistic, c.lr_p_value), modelNote);
        }
        text +=
            tr("<br>Wald test of the same terms with the %1 covariance: %2%3.")
                .arg(seLabel(c.wald.covariance, main.family).toHtmlEscaped(),
                     testText(c.wald.statistic, c.wald.df1, c.wald.df2, c.wald.chi_square, c.wald.p_value), waldNote);
        comparison_->setText(text);
    } else {
        comparison_->setText(
            tr("The model has no product terms that could be estimated, so there is nothing to compare."));
    }
}

// Warnings (always worth reading) and notes.
void EstimatesSection::showWarningsAndNotes(const FitResult& main, const FitResult& shown) {
    QStringList warn;
    for (const auto& w : main.warnings) warn << QStringLiteral("\u2022 ") + h(w);
    warnings_->setText(tr("<b>Warnings</b><br>") + warn.join(QStringLiteral("<br>")));
    warnings_->setVisible(!warn.isEmpty());

    QStringList notes;
    for (const auto& n : main.notes) notes << h(n);
    QStringList highVif;
    for (const auto& c : shown.coefficients)
        if (!c.aliased && std::isfinite(c.vif) && c.vif > 10)
            highVif << QStringLiteral("%1 (%2)").arg(h(c.term), numberText(c.vif));
    if (!highVif.isEmpty())
        notes << tr("VIF above 10: %1. A product term is correlated with its own components; that inflates their "
                    "VIFs without harming the product coefficient, and centring lowers them without changing the fit.")
                     .arg(highVif.join(QStringLiteral(", ")));
    if (main.multilevel)
        notes << tr("The coefficients are the fixed effects: those of a typical group of %1; each group's own "
                    "intercept (and random slopes) vary around them as the random part shows.")
                     .arg(h(main.multilevel->groups));
    notes << tr(
        "These coefficients describe associations in these data, not causal effects, unless the focal "
        "predictor was randomised.");
    notes_->setText(notes.join(QStringLiteral("<br>")));
    notes_->show();
}

}  // namespace moderato::ui
