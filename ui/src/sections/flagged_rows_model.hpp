// The flagged rows of a diagnostics run as a table: file line, fitted value,
// residual, leverage, Cook's distance and the rules each row meets. Reads
// the diagnostics directly (no copies), so long lists stay cheap.
#pragma once

#include <QAbstractTableModel>
#include <memory>

#include "moderato/estimation/diagnostics.hpp"
#include "moderato/reading/table.hpp"

namespace moderato::ui {

class FlaggedRowsModel : public QAbstractTableModel {
    Q_OBJECT
public:
    enum Column { Line = 0, Fitted, Residual, Leverage, Cooks, Rules, ColumnCount };
    using QAbstractTableModel::QAbstractTableModel;

    void setDiagnostics(std::shared_ptr<const Diagnostics> d, std::shared_ptr<const Table> table);
    const FlaggedRow* flagged(int row) const;
    // The list row of an observation, or -1.
    int rowOf(std::size_t observation) const;

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

    // "residual, leverage, Cook's distance"
    static QString rulesText(unsigned flags);

private:
    std::shared_ptr<const Diagnostics> d_;
    std::shared_ptr<const Table> table_;
};

}  // namespace moderato::ui
