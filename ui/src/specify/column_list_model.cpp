#include "specify/column_list_model.hpp"

#include <QApplication>
#include <QBrush>
#include <QPalette>

#include "common/number_text.hpp"
#include "specify/column_mime.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

ColumnListModel::ColumnListModel(QObject* parent) : QAbstractTableModel(parent) {}

void ColumnListModel::setTable(std::shared_ptr<const Table> table) {
    if (table == table_) return;
    beginResetModel();
    table_ = std::move(table);
    entries_.clear();
    if (table_)
        for (const Column& c : table_->columns) entries_.push_back({c.name, columnNature(c), c.missing_count()});
    endResetModel();
}

void ColumnListModel::setAnalysis(const Analysis& a) {
    analysis_ = a;
    if (!entries_.empty()) Q_EMIT dataChanged(index(0, InRole), index(rowCount() - 1, InRole));
}

std::string ColumnListModel::columnAt(int row) const {
    return row >= 0 && row < rowCount() ? entries_[static_cast<std::size_t>(row)].name : std::string();
}

int ColumnListModel::rowOf(const std::string& column) const {
    for (std::size_t i = 0; i < entries_.size(); ++i)
        if (entries_[i].name == column) return static_cast<int>(i);
    return -1;
}

int ColumnListModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() ? 0 : static_cast<int>(entries_.size());
}

int ColumnListModel::columnCount(const QModelIndex& parent) const { return parent.isValid() ? 0 : ColumnCount; }

QVariant ColumnListModel::data(const QModelIndex& index, int role) const {
    if (!index.isValid() || index.row() >= rowCount()) return {};
    const Entry& e = entries_[static_cast<std::size_t>(index.row())];
    if (role == ColumnNameRole) return QString::fromStdString(e.name);
    const auto inRole = roleOf(analysis_, e.name);
    if (role == Qt::DisplayRole) {
        switch (index.column()) {
            case Name:
                return QString::fromStdString(e.name);
            case Kind:
                return natureName(e.nature);
            case Missing:
                return countText(static_cast<long long>(e.missing));
            case InRole:
                return inRole ? roleName(*inRole) : QString();
        }
    }
    if (role == Qt::TextAlignmentRole && index.column() == Missing) return QVariant(Qt::AlignRight | Qt::AlignVCenter);
    if (role == Qt::ForegroundRole && (index.column() == InRole || (index.column() == Missing && e.missing == 0)))
        return QBrush(mutedText(QApplication::palette(), QPalette::Base));
    if (role == Qt::ToolTipRole) {
        QString tip = tr("%1: %2, %3 missing of %4 rows")
                          .arg(QString::fromStdString(e.name), natureName(e.nature))
                          .arg(e.missing)
                          .arg(table_ ? table_->rows() : 0);
        if (inRole) tip += tr("; in %1").arg(roleName(*inRole));
        return tip + tr(". Drag it onto a role slot.");
    }
    return {};
}

QVariant ColumnListModel::headerData(int section, Qt::Orientation o, int role) const {
    if (o != Qt::Horizontal || role != Qt::DisplayRole) return {};
    switch (section) {
        case Name:
            return tr("Column");
        case Kind:
            return tr("Kind");
        case Missing:
            return tr("Missing");
        case InRole:
            return tr("Role");
    }
    return {};
}

Qt::ItemFlags ColumnListModel::flags(const QModelIndex& index) const {
    if (!index.isValid()) return Qt::NoItemFlags;
    return Qt::ItemIsEnabled | Qt::ItemIsSelectable | Qt::ItemIsDragEnabled;
}

QStringList ColumnListModel::mimeTypes() const { return {kColumnMimeType}; }

QMimeData* ColumnListModel::mimeData(const QModelIndexList& indexes) const {
    for (const QModelIndex& i : indexes)
        if (i.isValid()) return columnMimeData(columnAt(i.row()));
    return nullptr;
}

}  // namespace moderato::ui
