#include "sections/random_part_view.hpp"

#include <QHeaderView>
#include <QLabel>
#include <QTableWidget>
#include <QVBoxLayout>
#include <cmath>

#include "common/number_text.hpp"
#include "specify/multilevel_edit.hpp"
#include "specify/section_widgets.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

QString h(const std::string& s) { return QString::fromStdString(s).toHtmlEscaped(); }

// "intercept", "slope of hours", "residual (within groups)".
QString componentName(const std::string& term) {
    if (term == "intercept") return RandomPartView::tr("intercept");
    return RandomPartView::tr("slope of %1").arg(QString::fromStdString(term));
}

QTableWidgetItem* numberItem(double v) {
    auto* item = new QTableWidgetItem(numberText(v));
    item->setData(Qt::ToolTipRole, exactText(v));
    item->setData(Qt::UserRole, v);
    item->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
    return item;
}

}  // namespace

RandomPartView::RandomPartView(QWidget* parent)
    : QWidget(parent), singular_(new QLabel(this)), table_(new QTableWidget(this)), details_(new QLabel(this)) {
    setObjectName(QStringLiteral("estimates-random-part"));
    auto* v = new QVBoxLayout(this);
    v->setContentsMargins(0, 0, 0, 0);
    v->setSpacing(6);
    v->addWidget(sectionHeading(tr("Random part"), this));
    singular_->setObjectName(QStringLiteral("random-part-singular"));
    singular_->setWordWrap(true);
    singular_->setStyleSheet(bannerStyle(estuary::series(4)));
    v->addWidget(singular_);
    table_->setObjectName(QStringLiteral("random-part-table"));
    table_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    table_->verticalHeader()->hide();
    table_->setAlternatingRowColors(true);
    table_->setWordWrap(false);
    table_->setVerticalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    table_->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    v->addWidget(table_, 0, Qt::AlignLeft);
    details_->setObjectName(QStringLiteral("random-part-details"));
    details_->setWordWrap(true);
    details_->setTextFormat(Qt::RichText);
    details_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    v->addWidget(details_);
    hide();
}

void RandomPartView::setFit(const FitResult* fit) {
    setVisible(fit && fit->multilevel);
    if (!fit || !fit->multilevel) return;
    const MultilevelResult& m = *fit->multilevel;
    QStringList problems;
    if (m.singular)
        problems << tr(
            "<b>Singular fit</b>: a variance between groups is estimated at zero or a correlation at "
            "±1. The random part is more than these data support; consider fewer random slopes or a "
            "diagonal covariance.");
    if (!m.converged)
        problems << tr("<b>Not settled</b>: the variance estimates did not converge; the results are not reliable.");
    singular_->setText(problems.join(QStringLiteral("<br>")));
    singular_->setVisible(!problems.isEmpty());
    fillTable(m);
    details_->setText(detailsText(*fit));
}

// One row per random effect and one for the residual; correlations with the terms above (full covariance).
void RandomPartView::fillTable(const MultilevelResult& m) {
    const Eigen::MatrixXd& T = m.covariance;
    const int q = static_cast<int>(T.rows());
    const bool correlations = m.structure == RandomCovariance::Full && q > 1;
    QStringList header{tr("Component"), tr("Variance"), QStringLiteral("SD")};
    if (correlations)
        for (int j = 0; j + 1 < q; ++j)
            header << tr("Correlation with %1").arg(componentName(m.terms[static_cast<std::size_t>(j)]));
    table_->clear();
    table_->setColumnCount(static_cast<int>(header.size()));
    table_->setHorizontalHeaderLabels(header);
    table_->setRowCount(q + 1);
    for (int i = 0; i < q; ++i) {
        table_->setItem(i, 0, new QTableWidgetItem(componentName(m.terms[static_cast<std::size_t>(i)])));
        table_->setItem(i, 1, numberItem(T(i, i)));
        table_->setItem(i, 2, numberItem(std::sqrt(T(i, i))));
        for (int j = 0; correlations && j < i; ++j)
            table_->setItem(i, 3 + j, numberItem(T(i, j) / std::sqrt(T(i, i) * T(j, j))));
    }
    table_->setItem(q, 0, new QTableWidgetItem(tr("residual (within groups)")));
    table_->setItem(q, 1, numberItem(m.residual_variance));
    table_->setItem(q, 2, numberItem(std::sqrt(m.residual_variance)));
    fitTableSize();
}

QString RandomPartView::detailsText(const FitResult& fit) const {
    const MultilevelResult& m = *fit.multilevel;
    QStringList lines;
    lines << tr("%1 groups of %2, %3 to %4 rows each (median %5).")
                 .arg(countText(static_cast<long long>(m.groups_count)), h(m.groups),
                      countText(static_cast<long long>(m.size_min)), countText(static_cast<long long>(m.size_max)),
                      numberText(m.size_median));
    if (std::isfinite(m.icc))
        lines << tr("Intraclass correlation %1: the share of the variance left after the predictors that lies "
                    "between groups.")
                     .arg(numberText(m.icc));
    else if (m.terms.size() > 1)
        lines << tr(
            "No intraclass correlation: with a random slope the share of the variance between groups "
            "depends on the predictors' values.");
    for (const auto& t : m.slope_tests)
        lines << tr("Random slope of %1: likelihood ratio %2, %3 (50:50 mixture of \u03c7\u00b2(%4) and "
                    "\u03c7\u00b2(%5): a variance cannot be negative).")
                     .arg(h(t.term), numberText(t.statistic), pClauseText(t.p_value).toHtmlEscaped())
                     .arg(t.df_low)
                     .arg(t.df_high);
    const QString df = m.df == FixedEffectDf::Normal
                           ? tr("z (normal): tests against the normal distribution, fair with many groups only")
                           : tr("%1, each term its own (the probe uses %2, those of the product terms)")
                                 .arg(dfMethodName(m.df_used()), dfText(fit.df_inference));
    lines << tr("Estimation: %1 · random-effects covariance: %2 · degrees of freedom: %3.")
                 .arg(estimationName(m.estimation), covarianceName(m.structure), df.toHtmlEscaped());
    return lines.join(QStringLiteral("<br>"));
}

void RandomPartView::fitTableSize() {
    // As large as its content: the section scrolls, not the table.
    table_->resizeColumnsToContents();
    QHeaderView* hh = table_->horizontalHeader();
    const int gap = fontMetrics().horizontalAdvance(QStringLiteral("00"));
    int width = 2 * table_->frameWidth();
    for (int c = 0; c < table_->columnCount(); ++c) {
        hh->resizeSection(c, hh->sectionSize(c) + gap);
        width += hh->sectionSize(c);
    }
    int height = hh->sizeHint().height() + 2 * table_->frameWidth();
    for (int r = 0; r < table_->rowCount(); ++r) height += table_->rowHeight(r);
    table_->setFixedSize(width + 2, height + 2);
}

}  // namespace moderato::ui
