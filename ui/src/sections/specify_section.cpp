#include "sections/specify_section.hpp"

#include <QComboBox>
#include <QDoubleSpinBox>
#include <QFileInfo>
#include <QFormLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QListView>
#include <QMenu>
#include <QScrollArea>
#include <QSignalBlocker>
#include <QSplitter>
#include <QStandardItemModel>
#include <QTableView>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

#include "model/project_document.hpp"
#include "moderato/estimation/design.hpp"
#include "specify/column_list_model.hpp"
#include "specify/model_equation.hpp"
#include "specify/multilevel_panel.hpp"
#include "specify/role_slot.hpp"
#include "specify/section_widgets.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

const SeKind kSeKinds[] = {SeKind::Classical, SeKind::HC0, SeKind::HC1,    SeKind::HC2,
                           SeKind::HC3,       SeKind::HC4, SeKind::Cluster};
// The standard-errors entry shown (and not offered) while a Groups column is chosen.
constexpr int kMultilevelSe = -1;

QString seTooltip(SeKind s) {
    switch (s) {
        case SeKind::Classical:
            return SpecifySection::tr(
                "Assumes the same error variance in every row (model-based for logistic models).");
        case SeKind::HC0:
            return SpecifySection::tr("Heteroskedasticity-consistent sandwich, no small-sample correction.");
        case SeKind::HC1:
            return SpecifySection::tr("HC0 scaled by n / (n − p).");
        case SeKind::HC2:
            return SpecifySection::tr("Sandwich with each squared residual divided by (1 − leverage).");
        case SeKind::HC3:
            return SpecifySection::tr(
                "Sandwich with each squared residual divided by (1 − leverage)²; a good default "
                "for small samples.");
        case SeKind::HC4:
            return SpecifySection::tr("Like HC3 with a stronger correction for high-leverage rows.");
        case SeKind::Cluster:
            return SpecifySection::tr("Allows errors to be correlated within the groups of the Clusters column.");
    }
    return {};
}

}  // namespace

SpecifySection::SpecifySection(ProjectDocument* doc, QWidget* parent)
    : AnalysisSection(doc, parent),
      columns_(new ColumnListModel(this)),
      columnView_(new QTableView(this)),
      columnsTitle_(sectionHeading(tr("Columns"), this)),
      multilevel_(nullptr),
      family_(new QComboBox(this)),
      se_(new QComboBox(this)),
      level_(new QDoubleSpinBox(this)),
      centring_(new QComboBox(this)),
      reference_(new QComboBox(this)),
      referenceLabel_(new QLabel(this)),
      centringHint_(nullptr),
      message_(new QLabel(this)),
      errorBanner_(new QLabel(this)),
      equation_(new QLabel(this)),
      legend_(nullptr),
      reading_(new QLabel(this)),
      rows_(nullptr) {
    auto* outer = new QHBoxLayout(this);
    outer->setContentsMargins(0, 4, 0, 0);
    auto* splitter = new QSplitter(Qt::Horizontal, this);
    outer->addWidget(splitter);

    QWidget* left = createColumnList(splitter);
    QWidget* scroll = createSettings(splitter);
    splitter->addWidget(left);
    splitter->addWidget(scroll);
    splitter->setStretchFactor(0, 0);
    splitter->setStretchFactor(1, 1);
    splitter->setSizes({330, 700});

    connectSignals();
    refresh();
}

QWidget* SpecifySection::createColumnList(QWidget* parent) {
    // Left: the dataset's columns, draggable.
    auto* left = new QWidget(parent);
    auto* leftLayout = new QVBoxLayout(left);
    leftLayout->setContentsMargins(0, 0, 6, 0);
    leftLayout->addWidget(columnsTitle_);
    columnView_->setObjectName(QStringLiteral("specify-columns"));
    columnView_->setModel(columns_);
    columnView_->setSelectionBehavior(QAbstractItemView::SelectRows);
    columnView_->setSelectionMode(QAbstractItemView::SingleSelection);
    columnView_->setDragEnabled(true);
    columnView_->setDragDropMode(QAbstractItemView::DragOnly);
    columnView_->setDefaultDropAction(Qt::CopyAction);
    columnView_->verticalHeader()->hide();
    columnView_->setShowGrid(false);
    columnView_->setAlternatingRowColors(true);
    columnView_->setWordWrap(false);
    for (int c = ColumnListModel::Name; c < ColumnListModel::InRole; ++c)
        columnView_->horizontalHeader()->setSectionResizeMode(c, QHeaderView::ResizeToContents);
    columnView_->horizontalHeader()->setSectionResizeMode(ColumnListModel::InRole, QHeaderView::Stretch);
    columnView_->setContextMenuPolicy(Qt::CustomContextMenu);
    connect(columnView_, &QWidget::customContextMenuRequested, this, &SpecifySection::showColumnMenu);
    leftLayout->addWidget(columnView_, 1);
    auto* dragHint = mutedLabel(left);
    dragHint->setText(tr("Drag a column onto a role slot, or right-click it to choose a role."));
    leftLayout->addWidget(dragHint);

    return left;
}

QWidget* SpecifySection::createSettings(QWidget* parent) {
    // Right: slots, options, equation.
    auto* scroll = new QScrollArea(parent);
    scroll->setWidgetResizable(true);
    scroll->setFrameShape(QFrame::NoFrame);
    scroll->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    auto* right = new QWidget(scroll);
    scroll->setWidget(right);
    auto* r = new QVBoxLayout(right);
    r->setContentsMargins(6, 0, 6, 6);
    r->setSpacing(6);

    createRoleSlots(right, r);
    createModelOptions(right, r);
    createMessages(r);
    createEquation(right, r);
    return scroll;
}

// The role slots, each reporting its drops and clears.
void SpecifySection::createRoleSlots(QWidget* right, QVBoxLayout* r) {
    r->addWidget(sectionHeading(tr("Roles"), right));
    for (int i = 0; i < kRoleCount; ++i) {
        const Role role = static_cast<Role>(i);
        auto* s = new RoleSlot(role, right);
        slots_[static_cast<std::size_t>(i)] = s;
        connect(s, &RoleSlot::columnChosen, this,
                [this, role](const QString& column, int from) { columnChosen(role, column, from); });
        connect(s, &RoleSlot::columnCleared, this,
                [this, role](const QString& column) { columnCleared(role, column); });
        r->addWidget(s);
    }
    auto* slotHint = mutedLabel(right);
    slotHint->setText(
        tr("The model has the focal predictor, the moderator (and second moderator), their product "
           "and the controls; a Groups column makes it a multilevel model. Drag a column from one slot "
           "to another to move it; between two single slots the columns swap."));
    r->addWidget(slotHint);
    multilevel_ = new MultilevelPanel(right);
    r->addWidget(multilevel_);
}

// Family, standard errors, confidence level and centring.
void SpecifySection::createModelOptions(QWidget* right, QVBoxLayout* r) {
    r->addSpacing(4);
    r->addWidget(sectionHeading(tr("Model"), right));
    auto* form = new QFormLayout;
    form->setFieldGrowthPolicy(QFormLayout::FieldsStayAtSizeHint);
    form->setLabelAlignment(Qt::AlignLeft);
    family_->setObjectName(QStringLiteral("specify-family"));
    family_->addItem(tr("linear (numeric outcome)"), static_cast<int>(Family::Linear));
    family_->addItem(tr("logistic (0/1 outcome)"), static_cast<int>(Family::Logistic));
    family_->addItem(tr("probit (0/1 outcome)"), static_cast<int>(Family::Probit));
    family_->addItem(tr("Poisson (counts)"), static_cast<int>(Family::Poisson));
    family_->addItem(tr("negative binomial (counts that vary more)"), static_cast<int>(Family::NegativeBinomial));
    family_->setItemData(2, tr("A 0/1 outcome through the normal distribution function; close to logistic."),
                         Qt::ToolTipRole);
    family_->setItemData(3, tr("Counts (0, 1, 2, ...) whose variance equals their mean; add an Exposure for rates."),
                         Qt::ToolTipRole);
    family_->setItemData(4,
                         tr("Counts whose variance exceeds their mean (variance = mean + α·mean²), the usual case; "
                            "add an Exposure for rates."),
                         Qt::ToolTipRole);
    se_->setObjectName(QStringLiteral("specify-se"));
    for (const SeKind s : kSeKinds) {
        se_->addItem(seKindName(s), static_cast<int>(s));
        se_->setItemData(se_->count() - 1, seTooltip(s), Qt::ToolTipRole);
    }
    se_->addItem(tr("model-based (multilevel model)"), kMultilevelSe);
    level_->setObjectName(QStringLiteral("specify-level"));
    level_->setRange(0.80, 0.999);
    level_->setDecimals(3);
    level_->setSingleStep(0.005);
    level_->setKeyboardTracking(false);
    level_->setToolTip(tr("Confidence level of the intervals (0.80 to 0.999)."));
    centring_->setObjectName(QStringLiteral("specify-centring"));
    centring_->addItem(tr("none (columns as they are)"), static_cast<int>(Centring::None));
    centring_->addItem(tr("mean (focal and moderator centred)"), static_cast<int>(Centring::Mean));
    form->addRow(tr("Family"), family_);
    form->addRow(tr("Standard errors"), se_);
    form->addRow(tr("Confidence level"), level_);
    reference_->setObjectName(QStringLiteral("specify-reference"));
    reference_->setToolTip(
        tr("The group the others are compared with: the baseline of the dummy columns and the first "
           "group in Probe's pairwise differences."));
    form->addRow(referenceLabel_, reference_);
    form->addRow(tr("Centring"), centring_);
    modelForm_ = form;
    r->addLayout(form);
    centringHint_ = mutedLabel(right);
    centringHint_->setText(
        tr("Centring at the mean subtracts the mean from the numeric focal predictor and "
           "moderator. It changes the meaning of the lower-order coefficients (each becomes the "
           "effect at the mean of the other), not the fit, the product coefficient or the "
           "conditional effects."));
    r->addWidget(centringHint_);
}

// The inline message (refused edits) and the banner of run errors.
void SpecifySection::createMessages(QVBoxLayout* r) {
    message_->setObjectName(QStringLiteral("specify-message"));
    message_->setWordWrap(true);
    message_->setTextFormat(Qt::PlainText);
    message_->setStyleSheet(bannerStyle(estuary::series(4)));
    message_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    message_->hide();
    r->addWidget(message_);
    errorBanner_->setObjectName(QStringLiteral("specify-error"));
    errorBanner_->setWordWrap(true);
    errorBanner_->setTextFormat(Qt::PlainText);
    errorBanner_->setStyleSheet(bannerStyle(estuary::series(1)));
    errorBanner_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    errorBanner_->hide();
    r->addWidget(errorBanner_);
}

// The model as an equation, what it reads, and the rows it uses.
void SpecifySection::createEquation(QWidget* right, QVBoxLayout* r) {
    r->addSpacing(4);
    r->addWidget(sectionHeading(tr("Equation"), right));
    equation_->setObjectName(QStringLiteral("specify-equation"));
    equation_->setTextFormat(Qt::RichText);
    equation_->setWordWrap(true);
    equation_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    QFont eqFont = equation_->font();
    eqFont.setPointSizeF(eqFont.pointSizeF() * 1.2);
    equation_->setFont(eqFont);
    r->addWidget(equation_);
    legend_ = mutedLabel(right);
    r->addWidget(legend_);
    reading_->setObjectName(QStringLiteral("specify-reading"));
    reading_->setWordWrap(true);
    r->addWidget(reading_);
    rows_ = mutedLabel(right);
    rows_->setObjectName(QStringLiteral("specify-rows"));
    r->addWidget(rows_);
    r->addStretch(1);
}

void SpecifySection::connectSignals() {
    connect(family_, &QComboBox::activated, this, [this](int index) {
        if (const Analysis* a = current())
            apply(setFamily(*a, doc_->table(a->dataset).get(), static_cast<Family>(family_->itemData(index).toInt())));
    });
    connect(se_, &QComboBox::activated, this, [this](int index) {
        if (se_->itemData(index).toInt() == kMultilevelSe) return;
        if (const Analysis* a = current())
            apply(setSeKind(*a, doc_->table(a->dataset).get(), static_cast<SeKind>(se_->itemData(index).toInt())),
                  QStringLiteral("se:") + id_);  // arrow keys through the list: one step
    });
    connect(level_, &QDoubleSpinBox::valueChanged, this, [this](double v) {
        const Analysis* a = current();
        if (!a || std::fabs(a->level - v) < 1e-12) return;
        apply(setLevel(*a, doc_->table(a->dataset).get(), v), QStringLiteral("level:") + id_);
    });
    connect(centring_, &QComboBox::activated, this, [this](int index) {
        if (const Analysis* a = current())
            apply(setCentring(*a, doc_->table(a->dataset).get(),
                              static_cast<Centring>(centring_->itemData(index).toInt())));
    });

    connect(reference_, &QComboBox::activated, this, [this](int index) {
        if (const Analysis* a = current())
            apply(setReferenceLevel(*a, doc_->table(a->dataset).get(), a->roles.moderator,
                                    reference_->itemData(index).toString().toStdString()),
                  QStringLiteral("reference:") + id_);
    });

    connectMultilevel();

    connect(doc_, &ProjectDocument::analysisChanged, this, [this](const QString& id) {
        if (id != id_) return;
        if (!applying_) {  // undo, redo or another view: an old message no longer applies
            refusal_.clear();
            note_.clear();
        }
        refresh();
    });
    connect(doc_, &ProjectDocument::datasetChanged, this, [this](const QString& id) {
        const Analysis* a = current();
        if (a && QString::fromStdString(a->dataset) == id) refresh();
    });
    connect(doc_, &ProjectDocument::structureChanged, this, [this] { refresh(); });
}

// The multilevel choices, each an undoable edit.
void SpecifySection::connectMultilevel() {
    const auto column = [this](RoleEdit (*edit)(const Analysis&, const Table*, const std::string&, bool)) {
        return [this, edit](const QString& name, bool on) {
            if (const Analysis* a = current()) apply(edit(*a, doc_->table(a->dataset).get(), name.toStdString(), on));
        };
    };
    connect(multilevel_, &MultilevelPanel::randomSlopeToggled, this, column(&setRandomSlope));
    connect(multilevel_, &MultilevelPanel::centreWithinToggled, this, column(&setCentreWithin));
    connect(multilevel_, &MultilevelPanel::groupMeansToggled, this, column(&setGroupMeans));
    connect(multilevel_, &MultilevelPanel::estimationChosen, this, [this](MixedEstimation e) {
        if (const Analysis* a = current()) apply(setMixedEstimation(*a, doc_->table(a->dataset).get(), e));
    });
    connect(multilevel_, &MultilevelPanel::covarianceChosen, this, [this](RandomCovariance c) {
        if (const Analysis* a = current()) apply(setRandomCovariance(*a, doc_->table(a->dataset).get(), c));
    });
    connect(multilevel_, &MultilevelPanel::dfChosen, this, [this](FixedEffectDf d) {
        if (const Analysis* a = current()) apply(setFixedEffectDf(*a, doc_->table(a->dataset).get(), d));
    });
}

const Analysis* SpecifySection::current() const { return id_.isEmpty() ? nullptr : doc_->analysis(id_); }

void SpecifySection::showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) {
    if (id != id_) {
        refusal_.clear();
        note_.clear();
    }
    id_ = id;
    run_ = std::move(run);
    error_ = error;
    refresh();
}

QString SpecifySection::message() const { return message_->isVisibleTo(this) ? message_->text() : QString(); }

void SpecifySection::apply(const RoleEdit& edit, const QString& mergeKey) {
    if (edit.after) {
        refusal_.clear();
        note_ = edit.note;
        applying_ = true;
        doc_->setAnalysis(*edit.after, edit.description, mergeKey);
        applying_ = false;
    } else if (!edit.refusal.isEmpty()) {
        refusal_ = edit.refusal;
        note_.clear();
    }
    refresh();  // also puts a refused choice back in the combo boxes
}

void SpecifySection::columnChosen(Role target, const QString& column, int fromRole) {
    if (const Analysis* a = current())
        apply(assignColumn(*a, doc_->table(a->dataset).get(), target, column.toStdString(), roleFromIndex(fromRole)));
}

void SpecifySection::columnCleared(Role role, const QString& column) {
    if (const Analysis* a = current()) apply(clearRole(*a, doc_->table(a->dataset).get(), role, column.toStdString()));
}

void SpecifySection::showColumnMenu(const QPoint& pos) {
    const QModelIndex index = columnView_->indexAt(pos);
    if (!index.isValid() || !current()) return;
    const QString column = QString::fromStdString(columns_->columnAt(index.row()));
    QMenu menu(this);
    for (int i = 0; i < kRoleCount; ++i) {
        const Role role = static_cast<Role>(i);
        if (!roleOffered(*current(), role)) continue;
        const QString text =
            roleTakesSeveral(role) ? tr("Add to %1").arg(roleName(role)) : tr("Use as %1").arg(roleName(role));
        menu.addAction(text, this, [this, role, column] { columnChosen(role, column, -1); });
    }
    menu.exec(columnView_->viewport()->mapToGlobal(pos));
}

void SpecifySection::refresh() {
    const Analysis* a = current();
    setEnabled(a != nullptr);
    if (!a) {
        columns_->setTable(nullptr);
        equation_->clear();
        legend_->clear();
        reading_->clear();
        rows_->clear();
        message_->hide();
        errorBanner_->hide();
        multilevel_->showAnalysis(nullptr, nullptr);
        return;
    }
    const auto table = doc_->table(a->dataset);
    if (const DataSource* ds = doc_->project().dataset(a->dataset))
        columnsTitle_->setText(tr("Columns of %1").arg(QFileInfo(QString::fromStdString(ds->path)).fileName()));
    columns_->setTable(table);
    columns_->setAnalysis(*a);

    std::vector<RoleSlot::Choice> choices;
    if (table)
        for (const Column& c : table->columns) choices.push_back({c.name, columnNature(c), roleOf(*a, c.name)});
    for (int i = 0; i < kRoleCount; ++i) {
        const Role role = static_cast<Role>(i);
        slots_[static_cast<std::size_t>(i)]->setContents(roleColumns(*a, role), choices);
        slots_[static_cast<std::size_t>(i)]->setVisible(roleOffered(*a, role));
    }

    {
        const QSignalBlocker b1(family_), b3(level_), b4(centring_);
        family_->setCurrentIndex(family_->findData(static_cast<int>(a->family)));
        level_->setValue(a->level);
        centring_->setCurrentIndex(std::max(0, centring_->findData(static_cast<int>(a->centring))));
    }
    refreshStandardErrors(*a);
    refreshReference(*a, table.get());
    multilevel_->showAnalysis(a, table);

    QStringList lines;
    if (!refusal_.isEmpty()) lines << tr("Not changed: %1").arg(refusal_);
    if (!note_.isEmpty()) lines << note_;
    for (const QString& p : roleProblems(*a, table.get()))
        if (!refusal_.contains(p)) lines << p;
    message_->setText(lines.join(QLatin1Char('\n')));
    message_->setVisible(!lines.isEmpty());

    errorBanner_->setText(tr("The model could not be fitted: %1").arg(error_));
    errorBanner_->setVisible(!error_.isEmpty());

    const AnalysisRun* run = run_ && runMatches(*run_, *a) ? run_.get() : nullptr;
    const ModelEquation eq = modelEquation(*a, table.get(), run);
    equation_->setText(eq.html);
    equation_->setToolTip(eq.plain);
    legend_->setText(eq.legend);
    reading_->setText(eq.reading);
    reading_->setVisible(!eq.reading.isEmpty());
    rows_->setText(run ? rowsUsedText(run->fit) : QString());
    rows_->setVisible(run != nullptr);
}

// The kinds the family offers; none to choose while a Groups column is
// chosen (a multilevel model takes its standard errors from the model).
void SpecifySection::refreshStandardErrors(const Analysis& a) {
    const QSignalBlocker block(se_);
    auto* items = qobject_cast<QStandardItemModel*>(se_->model());
    const bool multilevel = a.multilevel.active();
    for (int i = 0; i < se_->count(); ++i) {
        if (se_->itemData(i).toInt() == kMultilevelSe) {
            if (items) items->item(i)->setEnabled(false);
            if (auto* list = qobject_cast<QListView*>(se_->view())) list->setRowHidden(i, !multilevel);
            continue;
        }
        const auto kind = static_cast<SeKind>(se_->itemData(i).toInt());
        const bool offered = seOffered(a.family, kind);
        if (items) items->item(i)->setEnabled(offered);
        se_->setItemData(i,
                         offered ? seTooltip(kind)
                                 : tr("%1 corrects for leverage in a linear model and is not offered for "
                                      "logistic models; use HC0 or HC1 (sandwich), classical (model-based) "
                                      "or cluster-robust.")
                                       .arg(seKindName(kind)),
                         Qt::ToolTipRole);
    }
    se_->setCurrentIndex(se_->findData(multilevel ? kMultilevelSe : static_cast<int>(a.se)));
    se_->setEnabled(!multilevel);
    se_->setToolTip(multilevel ? tr("With Groups the standard errors come from the multilevel model (model-based); "
                                    "clear Groups to choose others.")
                               : se_->itemData(se_->currentIndex(), Qt::ToolTipRole).toString());
}

// The moderator's levels, the model's reference first; the row shows only
// for a categorical moderator.
void SpecifySection::refreshReference(const Analysis& a, const Table* table) {
    const std::vector<std::string> levels =
        table ? orderedLevels(a, *table, a.roles.moderator) : std::vector<std::string>{};
    modelForm_->setRowVisible(reference_, !levels.empty());
    const QSignalBlocker block(reference_);
    reference_->clear();
    if (levels.empty()) return;
    referenceLabel_->setText(tr("Reference level of %1").arg(QString::fromStdString(a.roles.moderator)));
    for (const auto& l : sorted_levels(table->at(a.roles.moderator))) {
        const QString name = QString::fromStdString(l);
        reference_->addItem(name, name);
    }
    reference_->setCurrentIndex(reference_->findData(QString::fromStdString(levels.front())));
}

}  // namespace moderato::ui
