#include "sections/flagged_rows_model.hpp"

#include "common/number_text.hpp"

namespace moderato::ui {

void FlaggedRowsModel::setDiagnostics(std::shared_ptr<const Diagnostics> d, std::shared_ptr<const Table> table) {
    beginResetModel();
    d_ = std::move(d);
    table_ = std::move(table);
    endResetModel();
}

const FlaggedRow* FlaggedRowsModel::flagged(int row) const {
    if (!d_ || row < 0 || static_cast<std::size_t>(row) >= d_->flagged.size()) return nullptr;
    return &d_->flagged[static_cast<std::size_t>(row)];
}

int FlaggedRowsModel::rowOf(std::size_t observation) const {
    if (!d_) return -1;
    for (std::size_t k = 0; k < d_->flagged.size(); ++k)
        if (d_->flagged[k].observation == observation) return static_cast<int>(k);
    return -1;
}

int FlaggedRowsModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() || !d_ ? 0 : static_cast<int>(d_->flagged.size());
}

int FlaggedRowsModel::columnCount(const QModelIndex& parent) const { return parent.isValid() ? 0 : ColumnCount; }

QString FlaggedRowsModel::rulesText(unsigned flags) {
    QStringList parts;
    if (flags & FlagResidual) parts << tr("residual");
    if (flags & FlagLeverage) parts << tr("leverage");
    if (flags & FlagCooks) parts << tr("Cook's distance");
    return parts.join(QStringLiteral(", "));
}

QVariant FlaggedRowsModel::data(const QModelIndex& index, int role) const {
    const FlaggedRow* r = flagged(index.row());
    if (!r) return {};
    const auto i = static_cast<Eigen::Index>(r->observation);
    if (role == Qt::TextAlignmentRole)
        return index.column() == Rules ? QVariant(Qt::AlignLeft | Qt::AlignVCenter)
                                       : QVariant(Qt::AlignRight | Qt::AlignVCenter);
    if (role == Qt::ToolTipRole && index.column() == Line && table_)
        return tr("%1, table row %2").arg(QString::fromStdString(table_->source)).arg(r->table_row + 1);
    if (role != Qt::DisplayRole) return {};
    switch (index.column()) {
        case Line:
            if (table_ && r->table_row < table_->row_lines.size())
                return QVariant::fromValue<qulonglong>(table_->row_lines[r->table_row]);
            return QVariant::fromValue<qulonglong>(r->table_row + 1);
        case Fitted:
            return numberText(d_->fitted[i]);
        case Residual:
            return numberText(d_->check_residual()[i]);
        case Leverage:
            return numberText(d_->leverage[i]);
        case Cooks:
            return numberText(d_->cooks_distance[i]);
        case Rules:
            return rulesText(r->flags);
        default:
            return {};
    }
}

QVariant FlaggedRowsModel::headerData(int section, Qt::Orientation orientation, int role) const {
    if (orientation != Qt::Horizontal) return QAbstractTableModel::headerData(section, orientation, role);
    if (role == Qt::ToolTipRole && section == Residual && d_) return QString::fromStdString(d_->check_residual_name);
    if (role != Qt::DisplayRole) return {};
    switch (section) {
        case Line:
            return table_ && !table_->row_lines.empty() && !table_->sheet_rows ? tr("line") : tr("row");
        case Fitted:
            return d_ && generalized(d_->family) ? QString::fromStdString(d_->fitted_name) : tr("fitted value");
        case Residual:
            if (d_ && d_->multilevel) return tr("standardised conditional residual");
            return d_ && generalized(d_->family) ? QString::fromStdString(d_->check_residual_name)
                                                 : tr("externally studentised residual");
        case Leverage:
            return tr("leverage");
        case Cooks:
            return tr("Cook's distance");
        case Rules:
            return tr("rules met");
        default:
            return {};
    }
}

}  // namespace moderato::ui
