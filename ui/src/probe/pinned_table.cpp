#include "probe/pinned_table.hpp"

#include <QAction>
#include <QApplication>
#include <QClipboard>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QItemSelectionModel>
#include <QLabel>
#include <QScrollBar>
#include <QTableView>
#include <QToolButton>
#include <QVBoxLayout>
#include <algorithm>
#include <set>

#include "common/number_text.hpp"
#include "common/table_clipboard.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

void PinnedTableModel::setRows(std::vector<Row> rows, const QString& moderator, const QString& statistic,
                               const QString& interval) {
    beginResetModel();
    rows_ = std::move(rows);
    ratios_ = std::any_of(rows_.begin(), rows_.end(), [](const Row& r) { return r.ratio.has_value(); });
    moderator_ = moderator;
    statistic_ = statistic;
    interval_ = interval;
    endResetModel();
}

int PinnedTableModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() ? 0 : static_cast<int>(rows_.size());
}
int PinnedTableModel::columnCount(const QModelIndex& parent) const {
    if (parent.isValid()) return 0;
    return ratios_ ? ColumnCount : Note + 1;
}

PinnedTableModel::Column PinnedTableModel::columnAt(int section) const { return static_cast<Column>(section); }

int PinnedTableModel::sectionOf(Column c) const { return c < columnCount() ? static_cast<int>(c) : -1; }

QVariant PinnedTableModel::data(const QModelIndex& index, int role) const {
    if (!index.isValid() || index.row() >= static_cast<int>(rows_.size())) return {};
    const Row& r = rows_[static_cast<std::size_t>(index.row())];
    const EffectPoint& e = r.point;
    const Column column = columnAt(index.column());
    if (role == Qt::DisplayRole) {
        switch (column) {
            case Value:
                return r.label;
            case Effect:
                return numberText(e.estimate);
            case SE:
                return numberText(e.std_error);
            case Statistic:
                return numberText(e.statistic);
            case P:
                return pValueText(e.p_value);
            case Lower:
                return numberText(e.ci_lower);
            case Upper:
                return numberText(e.ci_upper);
            case Ratio:
                return r.ratio ? numberText(r.ratio->ratio) : QString();
            case RatioLower:
                return r.ratio ? numberText(r.ratio->ci_lower) : QString();
            case RatioUpper:
                return r.ratio ? numberText(r.ratio->ci_upper) : QString();
            case Note:
                return e.beyond_data ? tr("beyond the data") : QString();
            case ColumnCount:
                break;
        }
    }
    if (role == Qt::TextAlignmentRole)
        return QVariant::fromValue(column == Value || column == Note ? Qt::AlignLeft | Qt::AlignVCenter
                                                                     : Qt::AlignRight | Qt::AlignVCenter);
    // From the palette, so a shaded row stays readable on a dark desktop too.
    if (role == Qt::ForegroundRole && column == Note) return mutedText(QApplication::palette(), QPalette::Base);
    if (role == Qt::BackgroundRole && e.beyond_data) return beyondRowBackground(QApplication::palette());
    if (role == Qt::FontRole && e.beyond_data) {
        QFont f;
        f.setItalic(true);
        return f;
    }
    if (role == Qt::ToolTipRole) {
        if (column >= Ratio && column <= RatioUpper)
            return tr(
                "Rate ratio: the factor by which the expected count (or rate) changes for one unit more of the "
                "focal predictor (0 to 1 for a 0/1 one) here; 1 is no effect.");
        if (e.beyond_data) return tr("This value lies outside the observed range of the moderator: an extrapolation.");
        if (!r.pinned) return tr("Shown until you pin a value of your own");
    }
    return {};
}

QVariant PinnedTableModel::headerData(int section, Qt::Orientation orientation, int role) const {
    if (orientation == Qt::Horizontal && role == Qt::ToolTipRole && section == Value) return moderator_;
    if (orientation != Qt::Horizontal || role != Qt::DisplayRole) return {};
    switch (columnAt(section)) {
        case Value:
            return moderator_;
        case Effect:
            return tr("effect");
        case SE:
            return tr("SE");
        case Statistic:
            return statistic_;
        case P:
            return tr("p");
        case Lower:
            return tr("%1 low").arg(interval_);
        case Upper:
            return tr("%1 high").arg(interval_);
        case Ratio:
            return tr("rate ratio");
        case RatioLower:
            return tr("RR %1 low").arg(interval_);
        case RatioUpper:
            return tr("RR %1 high").arg(interval_);
        case Note:
            return tr("note");
        case ColumnCount:
            break;
    }
    return {};
}

PinnedTable::PinnedTable(QWidget* parent)
    : QWidget(parent),
      model_(new PinnedTableModel(this)),
      view_(new QTableView(this)),
      caption_(new QLabel(this)),
      remove_(new QToolButton(this)),
      copy_(new QToolButton(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->setSpacing(4);
    auto* header = new QHBoxLayout;
    auto* title = new QLabel(tr("<b>Pinned values</b>"), this);
    header->addWidget(title);
    header->addStretch(1);
    remove_->setText(tr("Remove"));
    remove_->setToolTip(tr("Remove the selected pinned values (Delete)"));
    copy_->setText(tr("Copy"));
    copy_->setToolTip(tr("Copy the table (or the selected cells) as tab-separated text"));
    remove_->setObjectName(QStringLiteral("pinned-remove"));
    copy_->setObjectName(QStringLiteral("pinned-copy"));
    header->addWidget(remove_);
    header->addWidget(copy_);
    layout->addLayout(header);
    caption_->setWordWrap(true);
    QFont small = caption_->font();
    small.setPointSizeF(small.pointSizeF() * 0.9);
    caption_->setFont(small);
    keepMutedText(caption_);
    layout->addWidget(caption_);
    view_->setObjectName(QStringLiteral("pinned-table"));
    view_->setModel(model_);
    view_->setSelectionBehavior(QAbstractItemView::SelectRows);
    view_->setSelectionMode(QAbstractItemView::ExtendedSelection);
    view_->verticalHeader()->hide();
    // Every column as wide as its text; a narrow pane scrolls sideways rather
    // than clipping the last column (a stretched last section can shrink below
    // its text: "< 0.001" read "< 0....").
    view_->horizontalHeader()->setSectionResizeMode(QHeaderView::ResizeToContents);
    view_->horizontalHeader()->setStretchLastSection(false);
    // On screen a row beyond the data is shaded and in italics (the caption says
    // so); the "beyond the data" column is kept for the copied text.
    hideNote();
    view_->setAlternatingRowColors(false);
    view_->setWordWrap(false);
    view_->setFont(small);
    view_->horizontalHeader()->setFont(small);
    view_->verticalHeader()->setDefaultSectionSize(QFontMetrics(small).height() + 6);
    layout->addWidget(view_);
    auto* del = new QAction(this);
    del->setShortcuts({QKeySequence::Delete, QKeySequence(Qt::Key_Backspace)});
    del->setShortcutContext(Qt::WidgetShortcut);
    view_->addAction(del);
    connect(del, &QAction::triggered, this, &PinnedTable::removeSelected);
    connect(remove_, &QToolButton::clicked, this, &PinnedTable::removeSelected);
    connect(copy_, &QToolButton::clicked, this, [this] { QApplication::clipboard()->setText(tsv()); });
    connect(model_, &QAbstractItemModel::modelReset, this, &PinnedTable::hideNote);
    connect(model_, &QAbstractItemModel::modelReset, this, &PinnedTable::updateButtons);
    connect(model_, &QAbstractItemModel::modelReset, this, &PinnedTable::fitHeight);
    connect(view_->selectionModel(), &QItemSelectionModel::selectionChanged, this, &PinnedTable::updateButtons);
    updateButtons();
    fitHeight();
}

void PinnedTable::hideNote() {
    for (int c = 0; c < model_->columnCount(); ++c)
        view_->setColumnHidden(c, model_->columnAt(c) == PinnedTableModel::Note);
}

QString PinnedTable::caption() const { return caption_->text(); }

void PinnedTable::setCaption(const QString& text) {
    caption_->setText(text);
    caption_->setVisible(!text.isEmpty());
}

QString PinnedTable::tsv() const { return tableSelectionAsTsv(view_); }

void PinnedTable::removeSelected() {
    std::set<int> pins;
    for (const QModelIndex& i : view_->selectionModel()->selectedRows()) {
        const auto& r = model_->rows()[static_cast<std::size_t>(i.row())];
        if (r.pinned && r.pinIndex >= 0) pins.insert(r.pinIndex);
    }
    if (!pins.empty()) Q_EMIT removeRequested(std::vector<int>(pins.begin(), pins.end()));
}

void PinnedTable::fitHeight() {
    // As tall as its rows (two to twelve of them), so the panel below stays close.
    const int rows = std::clamp(model_->rowCount(), 2, 12);
    const int h = view_->horizontalHeader()->sizeHint().height() +
                  rows * view_->verticalHeader()->defaultSectionSize() + 2 * view_->frameWidth() +
                  view_->horizontalScrollBar()->sizeHint().height() + 2;
    view_->setFixedHeight(h);
}

void PinnedTable::updateButtons() {
    bool any = false;
    if (view_->selectionModel())
        for (const QModelIndex& i : view_->selectionModel()->selectedRows())
            any |= model_->rows()[static_cast<std::size_t>(i.row())].pinned;
    remove_->setEnabled(any);
    copy_->setEnabled(model_->rowCount() > 0);
}

}  // namespace moderato::ui
