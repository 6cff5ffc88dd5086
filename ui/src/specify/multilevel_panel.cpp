#include "specify/multilevel_panel.hpp"

#include <QCheckBox>
#include <QComboBox>
#include <QFormLayout>
#include <QGridLayout>
#include <QLabel>
#include <QSignalBlocker>
#include <QVBoxLayout>
#include <algorithm>

#include "specify/section_widgets.hpp"

namespace moderato::ui {

namespace {

QString roleWords(Role r) {
    switch (r) {
        case Role::Focal:
            return MultilevelPanel::tr("focal predictor");
        case Role::Moderator:
            return MultilevelPanel::tr("moderator");
        case Role::SecondModerator:
            return MultilevelPanel::tr("second moderator");
        case Role::Controls:
            return MultilevelPanel::tr("control");
        default:
            return {};
    }
}

QLabel* columnHeader(const QString& text, const QString& tip, QWidget* parent) {
    auto* l = new QLabel(text, parent);
    QFont f = l->font();
    f.setBold(true);
    l->setFont(f);
    l->setToolTip(tip);
    return l;
}

}  // namespace

MultilevelPanel::MultilevelPanel(QWidget* parent)
    : QWidget(parent),
      intro_(mutedLabel(this)),
      rowsArea_(new QWidget(this)),
      rows_(new QGridLayout(rowsArea_)),
      noRows_(mutedLabel(this)),
      estimation_(new QComboBox(this)),
      covariance_(new QComboBox(this)),
      df_(new QComboBox(this)),
      hint_(mutedLabel(this)) {
    setObjectName(QStringLiteral("specify-multilevel"));
    createChoices();
    connectCombos();
    hide();
}

void MultilevelPanel::createChoices() {
    auto* v = new QVBoxLayout(this);
    v->setContentsMargins(0, 4, 0, 0);
    v->setSpacing(6);
    v->addWidget(sectionHeading(tr("Multilevel model"), this));
    intro_->setObjectName(QStringLiteral("multilevel-intro"));
    v->addWidget(intro_);
    rows_->setContentsMargins(0, 0, 0, 0);
    rows_->setHorizontalSpacing(18);
    v->addWidget(rowsArea_);
    noRows_->setText(tr("The model has no numeric predictors, so each group differs by its intercept only."));
    v->addWidget(noRows_);

    auto* form = new QFormLayout;
    form->setFieldGrowthPolicy(QFormLayout::FieldsStayAtSizeHint);
    form->setLabelAlignment(Qt::AlignLeft);
    estimation_->setObjectName(QStringLiteral("multilevel-estimation"));
    estimation_->addItem(tr("REML (restricted likelihood)"), static_cast<int>(MixedEstimation::Reml));
    estimation_->setItemData(0, tr("Variances estimated allowing for the fixed effects; the usual choice to report."),
                             Qt::ToolTipRole);
    estimation_->addItem(tr("ML (full likelihood)"), static_cast<int>(MixedEstimation::Ml));
    estimation_->setItemData(
        1, tr("Maximum likelihood: compare models that differ in their fixed effects by their likelihood."),
        Qt::ToolTipRole);
    covariance_->setObjectName(QStringLiteral("multilevel-covariance"));
    covariance_->addItem(tr("full (the group effects may correlate)"), static_cast<int>(RandomCovariance::Full));
    covariance_->addItem(tr("diagonal (no correlations)"), static_cast<int>(RandomCovariance::Diagonal));
    df_->setObjectName(QStringLiteral("multilevel-df"));
    df_->addItem(dfMethodName(FixedEffectDf::Satterthwaite), static_cast<int>(FixedEffectDf::Satterthwaite));
    df_->setItemData(0, tr("Each term its own approximate df, from the variance estimates."), Qt::ToolTipRole);
    df_->addItem(dfMethodName(FixedEffectDf::BetweenWithin), static_cast<int>(FixedEffectDf::BetweenWithin));
    df_->setItemData(1, tr("Group-level terms on the number of groups, the others on the rows within groups."),
                     Qt::ToolTipRole);
    df_->addItem(dfMethodName(FixedEffectDf::Normal), static_cast<int>(FixedEffectDf::Normal));
    df_->setItemData(2, tr("The normal distribution: fair with many groups only."), Qt::ToolTipRole);
    form->addRow(tr("Estimation"), estimation_);
    form->addRow(tr("Random-effects covariance"), covariance_);
    form->addRow(tr("Degrees of freedom"), df_);
    v->addLayout(form);

    hint_->setText(
        tr("Random slope lets a predictor's slope differ from group to group. Centre within groups replaces a "
           "column by each row's difference from its group's mean; Group means adds each group's mean of it as a "
           "group-level predictor. Together they split a predictor's effect into a within-group and a "
           "between-group part."));
    v->addWidget(hint_);
}

void MultilevelPanel::connectCombos() {
    connect(estimation_, &QComboBox::activated, this,
            [this](int i) { Q_EMIT estimationChosen(static_cast<MixedEstimation>(estimation_->itemData(i).toInt())); });
    connect(covariance_, &QComboBox::activated, this, [this](int i) {
        Q_EMIT covarianceChosen(static_cast<RandomCovariance>(covariance_->itemData(i).toInt()));
    });
    connect(df_, &QComboBox::activated, this,
            [this](int i) { Q_EMIT dfChosen(static_cast<FixedEffectDf>(df_->itemData(i).toInt())); });
}

void MultilevelPanel::showAnalysis(const Analysis* a, std::shared_ptr<const Table> table) {
    setVisible(a && a->multilevel.active());
    if (!a || !a->multilevel.active()) return;
    if (table != table_ || a->multilevel.groups != groups_) varies_.clear();
    table_ = std::move(table);
    groups_ = a->multilevel.groups;
    const auto predictors = multilevelPredictors(*a, table_.get());
    rebuildRows(predictors);
    setRowStates(*a, predictors);
    const auto& ml = a->multilevel;
    intro_->setText(tr("Rows are nested in the groups of %1: each group has its own intercept. Choose the "
                       "predictors whose slope also differs between groups.")
                        .arg(QString::fromStdString(ml.groups)));
    const QSignalBlocker b1(estimation_), b2(covariance_), b3(df_);
    estimation_->setCurrentIndex(estimation_->findData(static_cast<int>(ml.estimation)));
    covariance_->setCurrentIndex(covariance_->findData(static_cast<int>(ml.covariance)));
    df_->setCurrentIndex(df_->findData(static_cast<int>(ml.df)));
    covariance_->setEnabled(!ml.random_slopes.empty());
    covariance_->setToolTip(ml.random_slopes.empty()
                                ? tr("With a random intercept only there is nothing to correlate.")
                                : tr("Full: the groups' intercepts and slopes may correlate; diagonal: they do not."));
}

void MultilevelPanel::rebuildRows(const std::vector<MultilevelPredictor>& predictors) {
    std::vector<std::pair<std::string, Role>> want;
    for (const auto& p : predictors) want.emplace_back(p.column, p.role);
    noRows_->setVisible(want.empty());
    rowsArea_->setVisible(!want.empty());
    if (want == shown_) return;
    shown_ = want;
    while (QLayoutItem* item = rows_->takeAt(0)) {
        if (QWidget* w = item->widget()) {
            w->hide();
            w->deleteLater();  // a switch may be the sender of the signal that led here
        }
        delete item;
    }
    slopes_.clear();
    centre_.clear();
    means_.clear();
    if (want.empty()) return;
    rows_->addWidget(columnHeader(tr("Predictor"), {}, rowsArea_), 0, 0);
    rows_->addWidget(columnHeader(tr("Random slope"), tr("Its slope differs from group to group"), rowsArea_), 0, 1);
    rows_->addWidget(columnHeader(tr("Centre within groups"), tr("Each row minus its group's mean"), rowsArea_), 0, 2);
    rows_->addWidget(columnHeader(tr("Group means"), tr("Each group's mean, as a group-level predictor"), rowsArea_), 0,
                     3);
    int r = 1;
    for (const auto& [column, role] : want) {
        const QString name = QString::fromStdString(column);
        rows_->addWidget(new QLabel(tr("%1 (%2)").arg(name, roleWords(role)), rowsArea_), r, 0);
        const auto box = [&](const QString& key, std::map<std::string, QCheckBox*>& into, int col, auto signal) {
            auto* b = new QCheckBox(rowsArea_);
            b->setObjectName(key + name);
            b->setAccessibleName(name);
            into[column] = b;
            rows_->addWidget(b, r, col, Qt::AlignHCenter);
            connect(b, &QCheckBox::clicked, this, [this, name, signal](bool on) { Q_EMIT(this->*signal)(name, on); });
        };
        box(QStringLiteral("random-slope-"), slopes_, 1, &MultilevelPanel::randomSlopeToggled);
        box(QStringLiteral("centre-within-"), centre_, 2, &MultilevelPanel::centreWithinToggled);
        box(QStringLiteral("group-means-"), means_, 3, &MultilevelPanel::groupMeansToggled);
        ++r;
    }
    rows_->setColumnStretch(4, 1);
}

void MultilevelPanel::setRowStates(const Analysis& a, const std::vector<MultilevelPredictor>& predictors) {
    const auto& ml = a.multilevel;
    const auto on = [](const std::vector<std::string>& list, const std::string& c) {
        return std::find(list.begin(), list.end(), c) != list.end();
    };
    for (const auto& p : predictors) {
        const QString name = QString::fromStdString(p.column), groups = QString::fromStdString(ml.groups);
        QCheckBox* slope = slopes_.at(p.column);
        const bool can = varies(p.column) || on(ml.random_slopes, p.column);
        slope->setChecked(on(ml.random_slopes, p.column));
        slope->setEnabled(can);
        slope->setToolTip(can ? tr("Let the slope of %1 differ between the groups of %2").arg(name, groups)
                              : tr("%1 does not vary within the groups of %2 (a group-level column): its slope "
                                   "cannot differ between groups.")
                                    .arg(name, groups));
        centre_.at(p.column)->setChecked(on(ml.centre_within, p.column));
        centre_.at(p.column)->setToolTip(tr("Replace %1 by each row's difference from its group's mean").arg(name));
        means_.at(p.column)->setChecked(on(ml.group_means, p.column));
        means_.at(p.column)->setToolTip(tr("Add %1, each group's mean of %2, as a group-level predictor")
                                            .arg(QString::fromStdString(group_mean_name(p.column)), name));
    }
}

bool MultilevelPanel::varies(const std::string& column) {
    if (!table_) return true;
    const auto it = varies_.find(column);
    if (it != varies_.end()) return it->second;
    return varies_[column] = variesWithinGroups(*table_, column, groups_);
}

QCheckBox* MultilevelPanel::randomSlopeBox(const std::string& column) const {
    const auto it = slopes_.find(column);
    return it == slopes_.end() ? nullptr : it->second;
}

QCheckBox* MultilevelPanel::centreWithinBox(const std::string& column) const {
    const auto it = centre_.find(column);
    return it == centre_.end() ? nullptr : it->second;
}

QCheckBox* MultilevelPanel::groupMeansBox(const std::string& column) const {
    const auto it = means_.find(column);
    return it == means_.end() ? nullptr : it->second;
}

}  // namespace moderato::ui
