#include "data/dataset_page.hpp"

#include <QEvent>
#include <QFileInfo>
#include <QGridLayout>
#include <QGroupBox>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QItemSelection>
#include <QLabel>
#include <QListWidget>
#include <QPushButton>
#include <QScrollBar>
#include <QSplitter>
#include <QTableView>
#include <QTableWidget>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>
#include <numeric>
#include <set>

#include "common/number_text.hpp"
#include "data/column_kind_box.hpp"
#include "data/derived_column_dialog.hpp"
#include "data/histogram_widget.hpp"
#include "data/table_model.hpp"
#include "model/project_document.hpp"
#include "style/estuary.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

constexpr int kMaxBars = 12;        // level bars drawn in the summary
constexpr int kMaxLevelRows = 200;  // levels listed in the summary table

QString num(double v) { return std::isnan(v) ? TableModel::missingText() : numberText(v); }

QString count(std::size_t n) { return countText(static_cast<long long>(n)); }

QString q(const std::string& s) { return QString::fromStdString(s); }

QString plural(std::size_t n, const QString& one, const QString& many) {
    return count(n) + QLatin1Char(' ') + (n == 1 ? one : many);
}

}  // namespace

DatasetPage::DatasetPage(ProjectDocument* doc, QWidget* parent) : QWidget(parent), doc_(doc) {
    setObjectName(QStringLiteral("dataset-page"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(8, 8, 8, 8);
    title_ = new QLabel(this);
    title_->setObjectName(QStringLiteral("dataset-title"));
    title_->setTextFormat(Qt::RichText);
    title_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    layout->addWidget(title_);
    error_ = new QLabel(this);
    error_->setObjectName(QStringLiteral("dataset-error"));
    error_->setWordWrap(true);
    error_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    error_->setStyleSheet(QStringLiteral("QLabel { border: 1px solid %1; border-radius: 3px; padding: 6px; }")
                              .arg(estuary::series(1).name()));
    keepAccentText(error_, estuary::series(1));
    error_->hide();
    layout->addWidget(error_);

    auto* split = new QSplitter(Qt::Horizontal, this);
    split->setObjectName(QStringLiteral("dataset-splitter"));
    createGrid(split);
    split->addWidget(grid_);
    auto* side = new QWidget(split);
    side->setObjectName(QStringLiteral("dataset-side"));
    auto* sideLayout = new QVBoxLayout(side);
    sideLayout->setContentsMargins(0, 0, 0, 0);
    sideLayout->addWidget(createSummaryBox(side), 3);
    sideLayout->addWidget(createRecipeBox(side), 1);
    split->addWidget(side);
    split->setStretchFactor(0, 1);
    split->setStretchFactor(1, 0);
    split->setSizes({800, 300});
    layout->addWidget(split, 1);

    connectSignals();
    showSummary(-1);
}

// The grid of the table's cells (the core table itself, never copied).
void DatasetPage::createGrid(QWidget* split) {
    grid_ = new QTableView(split);
    grid_->setObjectName(QStringLiteral("dataset-grid"));
    model_ = new TableModel(grid_);
    grid_->setModel(model_);
    grid_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    grid_->setAlternatingRowColors(true);
    grid_->setWordWrap(false);
    grid_->setCornerButtonEnabled(false);
    // Uniform rows: fixed heights let the view place a million rows without measuring any.
    auto* vh = grid_->verticalHeader();
    vh->setSectionResizeMode(QHeaderView::Fixed);
    vh->setDefaultSectionSize(grid_->fontMetrics().height() + 6);
    vh->setToolTip(tr("Line numbers of the data file"));
    auto* hh = grid_->horizontalHeader();
    hh->setSectionResizeMode(QHeaderView::Interactive);
    hh->setDefaultSectionSize(110);
    hh->setHighlightSections(true);
    hh->setResizeContentsPrecision(200);  // sizing columns looks at a few hundred rows, not all
}

// The summary of the selected column: statistics, histogram or level bars, levels table.
QWidget* DatasetPage::createSummaryBox(QWidget* side) {
    auto* summaryBox = new QGroupBox(tr("Column"), side);
    auto* summaryLayout = new QVBoxLayout(summaryBox);
    summaryTitle_ = new QLabel(summaryBox);
    summaryTitle_->setObjectName(QStringLiteral("summary-title"));
    summaryTitle_->setTextFormat(Qt::RichText);
    summaryTitle_->setWordWrap(true);
    auto* stats = new QGridLayout;
    stats->setHorizontalSpacing(16);
    stats->setVerticalSpacing(2);
    const std::pair<const char*, QString> statNames[] = {
        {"values", tr("values")}, {"missing", tr("missing")},   {"mean", tr("mean")},     {"sd", tr("SD")},
        {"min", tr("min")},       {"q1", tr("lower quartile")}, {"median", tr("median")}, {"q3", tr("upper quartile")},
        {"max", tr("max")},       {"levels", tr("levels")}};
    for (const auto& [key, label] : statNames) {
        const int row = stats->rowCount();
        auto* name = new QLabel(label, summaryBox);
        auto* value = new QLabel(summaryBox);
        value->setObjectName(QStringLiteral("summary-") + QLatin1String(key));
        value->setAlignment(Qt::AlignRight | Qt::AlignVCenter);
        value->setTextInteractionFlags(Qt::TextSelectableByMouse);
        stats->addWidget(name, row, 0);
        stats->addWidget(value, row, 1);
        stats_[QLatin1String(key)] = {name, value};
    }
    stats->setColumnStretch(2, 1);
    histogram_ = new HistogramWidget(summaryBox);
    histogramNote_ = new QLabel(summaryBox);
    histogramNote_->setObjectName(QStringLiteral("summary-histogram-note"));
    histogramNote_->setWordWrap(true);
    QFont small = histogramNote_->font();
    small.setPointSizeF(small.pointSizeF() * 0.9);
    histogramNote_->setFont(small);
    levels_ = new QTableWidget(0, 3, summaryBox);
    levels_->setObjectName(QStringLiteral("summary-levels"));
    levels_->setHorizontalHeaderLabels({tr("Level"), tr("Count"), tr("Share")});
    levels_->verticalHeader()->hide();
    levels_->horizontalHeader()->setSectionResizeMode(0, QHeaderView::Stretch);
    levels_->horizontalHeader()->setSectionResizeMode(1, QHeaderView::ResizeToContents);
    levels_->horizontalHeader()->setSectionResizeMode(2, QHeaderView::ResizeToContents);
    levels_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    levels_->verticalHeader()->setDefaultSectionSize(levels_->fontMetrics().height() + 4);
    kindBox_ = new ColumnKindBox(doc_, summaryBox);
    summaryLayout->addWidget(summaryTitle_);
    summaryLayout->addWidget(kindBox_);
    summaryLayout->addLayout(stats);
    summaryLayout->addWidget(histogram_);
    summaryLayout->addWidget(histogramNote_);
    summaryLayout->addWidget(levels_, 1);
    summaryLayout->addStretch(0);
    summaryLayout_ = summaryLayout;
    return summaryBox;
}

// The derived columns of the dataset, with Add and Remove.
QWidget* DatasetPage::createRecipeBox(QWidget* side) {
    auto* recipeBox = new QGroupBox(tr("Derived columns"), side);
    auto* recipeLayout = new QVBoxLayout(recipeBox);
    recipes_ = new QListWidget(recipeBox);
    recipes_->setObjectName(QStringLiteral("derived-list"));
    recipes_->setWordWrap(true);
    recipes_->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    recipes_->setResizeMode(QListView::Adjust);
    recipes_->setToolTip(tr("Columns computed from others; they are kept in the project, not in the data file."));
    recipeLayout->addWidget(recipes_, 1);
    auto* recipeButtons = new QHBoxLayout;
    addDerived_ = new QPushButton(tr("Add derived column…"), recipeBox);
    addDerived_->setObjectName(QStringLiteral("add-derived"));
    removeDerived_ = new QPushButton(tr("Remove"), recipeBox);
    removeDerived_->setObjectName(QStringLiteral("remove-derived"));
    removeDerived_->setEnabled(false);
    recipeButtons->addWidget(addDerived_);
    recipeButtons->addStretch(1);
    recipeButtons->addWidget(removeDerived_);
    recipeLayout->addLayout(recipeButtons);
    return recipeBox;
}

void DatasetPage::connectSignals() {
    connect(grid_->selectionModel(), &QItemSelectionModel::currentChanged, this, [this](const QModelIndex& current) {
        if (current.isValid() && current.column() != summaryColumn_) showSummary(current.column());
    });
    connect(grid_->horizontalHeader(), &QHeaderView::sectionClicked, this, &DatasetPage::showSummary);
    connect(recipes_, &QListWidget::currentRowChanged, this, [this](int row) { removeDerived_->setEnabled(row >= 0); });
    connect(recipes_, &QListWidget::itemActivated, this, [this](QListWidgetItem* item) {
        const Table* t = model_->table();
        if (!t) return;
        const std::string name = item->data(Qt::UserRole).toString().toStdString();
        for (std::size_t c = 0; c < t->cols(); ++c)
            if (t->columns[c].name == name) {
                showSummary(static_cast<int>(c));
                grid_->scrollTo(model_->index(grid_->rowAt(0) < 0 ? 0 : grid_->rowAt(0), static_cast<int>(c)));
            }
    });
    connect(addDerived_, &QPushButton::clicked, this, [this] { openDerivedDialog(); });
    connect(removeDerived_, &QPushButton::clicked, this, [this] {
        if (auto* item = recipes_->currentItem()) removeDerived(item->data(Qt::UserRole).toString());
    });
    connect(doc_, &ProjectDocument::datasetChanged, this, [this](const QString& id) {
        if (id == id_) refresh();
    });
    connect(doc_, &ProjectDocument::projectReset, this, &DatasetPage::refresh);
    connect(doc_, &ProjectDocument::structureChanged, this, [this] {
        const std::string id = id_.toStdString();
        if (!doc_->project().dataset(id) || model_->sharedTable() != doc_->table(id)) refresh();
    });
}

void DatasetPage::showDataset(const QString& id) {
    if (id == id_ && model_->sharedTable() == doc_->table(id.toStdString())) return;
    id_ = id;
    summaryColumn_ = -1;
    refresh();
    grid_->scrollToTop();
}

void DatasetPage::refresh() {
    const std::string id = id_.toStdString();
    const auto table = doc_->project().dataset(id) ? doc_->table(id) : nullptr;
    const QString keepName = model_->table() && summaryColumn_ >= 0 && summaryColumn_ < model_->columnCount()
                                 ? q(model_->table()->columns[static_cast<std::size_t>(summaryColumn_)].name)
                                 : QString();
    std::set<std::string> derived;
    for (const auto& r : doc_->project().recipes_for(id)) derived.insert(r.name);
    summaries_.clear();
    model_->setTable(table, derived);
    if (table) {
        // Size columns by their names and the first rows, within bounds.
        grid_->resizeColumnsToContents();
        for (int c = 0; c < model_->columnCount(); ++c)
            grid_->setColumnWidth(c, std::clamp(grid_->columnWidth(c), 70, 240));
    }
    updateHeader();
    updateRecipes();
    int column = table && table->cols() ? 0 : -1;
    if (table && !keepName.isEmpty())
        for (std::size_t c = 0; c < table->cols(); ++c)
            if (q(table->columns[c].name) == keepName) column = static_cast<int>(c);
    summaryColumn_ = -2;  // force a redraw
    showSummary(column);
}

void DatasetPage::changeEvent(QEvent* event) {
    QWidget::changeEvent(event);
    if (event->type() != QEvent::PaletteChange || id_.isEmpty()) return;
    updateHeader();
    const int column = summaryColumn_;
    summaryColumn_ = -2;  // force a redraw
    showSummary(column);
}

void DatasetPage::updateHeader() {
    const std::string id = id_.toStdString();
    const DataSource* s = doc_->project().dataset(id);
    const Table* t = model_->table();
    if (!s) {
        title_->setText(tr("<i>No dataset</i>"));
        error_->hide();
        return;
    }
    QString text = QStringLiteral("<b>%1</b>").arg(doc_->dataName(id).toHtmlEscaped());
    if (t) text += tr(" &nbsp;·&nbsp; %1 rows × %2 columns").arg(count(t->rows()), count(t->cols()));
    if (t && s->in_database) text += tr(" &nbsp;·&nbsp; a random sample: fits use every row in the database");
    text += QStringLiteral(" &nbsp;·&nbsp; <span style='color:%1'>%2</span>")
                .arg(cssColour(mutedText(palette())), doc_->dataPlace(id).toHtmlEscaped());
    title_->setText(text);
    QString err = doc_->tableError(id);
    if (!t && err.isEmpty()) err = tr("The data of this dataset are not loaded.");
    if (!err.isEmpty() && t && !doc_->project().recipes_for(id).empty())
        err +=
            tr("\nThe derived columns are left out until this is fixed: undo the last edit, or remove or change "
               "the recipe named above.");
    error_->setText(err);
    error_->setVisible(!err.isEmpty());
}

void DatasetPage::updateRecipes() {
    recipes_->clear();
    for (const auto& r : doc_->project().recipes_for(id_.toStdString())) {
        auto* item =
            new QListWidgetItem(QStringLiteral("%1 — %2").arg(q(r.name), DerivedColumnDialog::describe(r)), recipes_);
        item->setData(Qt::UserRole, q(r.name));
        item->setToolTip(DerivedColumnDialog::describe(r));
    }
    removeDerived_->setEnabled(false);
    addDerived_->setEnabled(model_->table() != nullptr);
}

void DatasetPage::showSummary(int column) {
    const Table* t = model_->table();
    if (!t || column < 0 || column >= static_cast<int>(t->cols())) {
        summaryColumn_ = -1;
        summaryTitle_->setText(tr("<i>Select a column to see its summary.</i>"));
        for (auto& [name, value] : stats_)
            value.second->clear(), value.first->setVisible(false), value.second->setVisible(false);
        histogram_->clear();
        histogramNote_->clear();
        levels_->setRowCount(0);
        levels_->hide();
        kindBox_->showColumn({}, nullptr, -1, false);
        return;
    }
    if (column == summaryColumn_) return;
    summaryColumn_ = column;
    auto it = summaries_.find(column);
    if (it == summaries_.end())
        it = summaries_.emplace(column, summarise_column(t->columns[static_cast<std::size_t>(column)])).first;
    const ColumnSummary& s = it->second;
    const bool derived = model_->headerData(column, Qt::Horizontal, TableModel::DerivedRole).toBool();
    const bool numeric = s.kind == ColumnKind::Numeric;
    kindBox_->showColumn(id_.toStdString(), t, column, derived);
    summaryTitle_->setText(QStringLiteral("<b>%1</b> &nbsp;<span style='color:%2'>%3%4</span>")
                               .arg(q(s.name).toHtmlEscaped(), cssColour(mutedText(palette())),
                                    numeric ? tr("numeric") : tr("categorical"),
                                    derived ? tr(", derived") : QString()));
    const double share = s.rows ? 100.0 * static_cast<double>(s.missing) / static_cast<double>(s.rows) : 0.0;
    const auto set = [this](const char* key, const QString& text, bool shown) {
        auto& [name, value] = stats_[QLatin1String(key)];
        value->setText(text);
        name->setVisible(shown);
        value->setVisible(shown);
    };
    set("values", count(s.n), true);
    set("missing", tr("%1 (%2 %)").arg(count(s.missing), QString::number(share, 'f', 1)), true);
    set("mean", num(s.mean), numeric);
    set("sd", num(s.sd), numeric);
    set("min", num(s.min), numeric);
    set("q1", num(s.q1), numeric);
    set("median", num(s.median), numeric);
    set("q3", num(s.q3), numeric);
    set("max", num(s.max), numeric);
    set("levels", count(s.levels.size()), !numeric);
    // The levels table takes the spare height when shown; else the space goes below.
    summaryLayout_->setStretchFactor(levels_, numeric ? 0 : 1);
    summaryLayout_->setStretch(summaryLayout_->count() - 1, numeric ? 1 : 0);

    if (numeric) showNumeric(s);
    else showLevels(s);
}

void DatasetPage::showNumeric(const ColumnSummary& s) {
    levels_->hide();
    levels_->setRowCount(0);
    histogram_->setHistogram(s.histogram.edges, s.histogram.counts);
    if (s.histogram.counts.empty()) histogramNote_->setText(tr("No values to draw."));
    else
        histogramNote_->setText(tr("%1 of width %2 (the narrower of the Freedman–Diaconis and Sturges "
                                   "widths, at most 40 bins).")
                                    .arg(plural(s.histogram.counts.size(), tr("bin"), tr("bins")),
                                         num(s.histogram.edges[1] - s.histogram.edges[0])));
}

void DatasetPage::showLevels(const ColumnSummary& s) {
    // Levels: the table lists the most frequent first; the bars show the most frequent few.
    std::vector<std::size_t> order(s.levels.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return s.level_counts[a] > s.level_counts[b]; });
    const int listed = std::min<int>(kMaxLevelRows, static_cast<int>(order.size()));
    levels_->setRowCount(listed);
    for (int r = 0; r < listed; ++r) {
        const std::size_t k = order[static_cast<std::size_t>(r)];
        const double pct = s.n ? 100.0 * static_cast<double>(s.level_counts[k]) / static_cast<double>(s.n) : 0.0;
        levels_->setItem(r, 0, new QTableWidgetItem(q(s.levels[k])));
        auto* c = new QTableWidgetItem(count(s.level_counts[k]));
        c->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
        levels_->setItem(r, 1, c);
        auto* p = new QTableWidgetItem(QString::number(pct, 'f', 1) + QStringLiteral(" %"));
        p->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
        levels_->setItem(r, 2, p);
    }
    levels_->show();
    QStringList names;
    std::vector<std::size_t> counts;
    const bool keepOrder = static_cast<int>(s.levels.size()) <= kMaxBars;
    for (std::size_t i = 0; i < s.levels.size() && static_cast<int>(i) < kMaxBars; ++i) {
        const std::size_t k = keepOrder ? i : order[i];
        names << q(s.levels[k]);
        counts.push_back(s.level_counts[k]);
    }
    histogram_->setLevels(names, counts);
    QString note = keepOrder ? tr("Count of each level.")
                             : tr("The %1 most frequent of %2 levels.").arg(kMaxBars).arg(s.levels.size());
    if (static_cast<int>(order.size()) > listed) note += tr(" The table lists the %1 most frequent.").arg(listed);
    histogramNote_->setText(note);
}

void DatasetPage::selectRows(const std::vector<std::size_t>& rows) {
    const Table* t = model_->table();
    if (!t || t->cols() == 0) return;
    std::vector<std::size_t> r;
    for (const std::size_t x : rows)
        if (x < t->rows()) r.push_back(x);
    if (r.empty()) {
        grid_->clearSelection();
        return;
    }
    const std::size_t first = r.front();
    std::sort(r.begin(), r.end());
    r.erase(std::unique(r.begin(), r.end()), r.end());
    QItemSelection selection;
    const int lastCol = model_->columnCount() - 1;
    for (std::size_t i = 0; i < r.size();) {
        std::size_t j = i;
        while (j + 1 < r.size() && r[j + 1] == r[j] + 1) ++j;  // a run of neighbouring rows is one range
        selection.select(model_->index(static_cast<int>(r[i]), 0), model_->index(static_cast<int>(r[j]), lastCol));
        i = j + 1;
    }
    const QModelIndex current = model_->index(static_cast<int>(first), std::max(0, summaryColumn_));
    grid_->selectionModel()->setCurrentIndex(current, QItemSelectionModel::NoUpdate);
    grid_->selectionModel()->select(selection, QItemSelectionModel::ClearAndSelect);
    grid_->scrollTo(current, QAbstractItemView::PositionAtCenter);
}

DerivedColumnDialog* DatasetPage::openDerivedDialog() {
    const std::string id = id_.toStdString();
    const auto table = model_->sharedTable();
    if (!table) return nullptr;
    std::set<std::string> taken;
    for (const auto& c : table->columns) taken.insert(c.name);
    if (const auto base = doc_->baseTable(id))
        for (const auto& c : base->columns) taken.insert(c.name);
    for (const auto& r : doc_->project().recipes_for(id)) taken.insert(r.name);
    auto* dialog = new DerivedColumnDialog(table, taken, id_, this);
    dialog->setAttribute(Qt::WA_DeleteOnClose);
    dialog->setWindowModality(Qt::WindowModal);
    if (summaryColumn_ >= 0) dialog->setSource(q(table->columns[static_cast<std::size_t>(summaryColumn_)].name));
    connect(dialog, &QDialog::accepted, this, [this, dialog] {
        const DerivedRecipe r = dialog->recipe();
        Project p = doc_->project();
        if (!p.dataset(r.dataset)) return;  // the dataset went away meanwhile
        p.derived.push_back(r);
        doc_->setProject(p, tr("Add derived column %1").arg(q(r.name)));
    });
    dialog->open();
    return dialog;
}

void DatasetPage::removeDerived(const QString& name) {
    const std::string id = id_.toStdString(), n = name.toStdString();
    Project p = doc_->project();
    for (const auto& r : p.derived)
        if (r.dataset == id && r.name != n && (r.source == n || r.other == n)) {
            error_->setText(tr("“%1” is used by the derived column “%2”; remove that one first.").arg(name, q(r.name)));
            error_->show();
            return;
        }
    const auto before = p.derived.size();
    p.derived.erase(std::remove_if(p.derived.begin(), p.derived.end(),
                                   [&](const DerivedRecipe& r) { return r.dataset == id && r.name == n; }),
                    p.derived.end());
    if (p.derived.size() == before) return;
    doc_->setProject(p, tr("Remove derived column %1").arg(name));
}

}  // namespace moderato::ui
