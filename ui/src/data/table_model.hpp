// A read-only Qt model over a core Table: cells are formatted on demand
// from the columns themselves (nothing is copied into Qt containers), so a
// million-row table costs no more than the rows on screen.
#pragma once

#include <QAbstractTableModel>
#include <memory>
#include <set>
#include <string>

#include "moderato/reading/table.hpp"

namespace moderato::ui {

class TableModel : public QAbstractTableModel {
    Q_OBJECT
public:
    enum Role {
        ValueRole = Qt::UserRole + 1,  // double (numeric), level text (categorical), invalid when missing
        MissingRole,                   // bool
        DerivedRole,                   // header: bool, the column comes from a derived-column recipe
        LineRole,                      // vertical header: the file line of the row (0: unknown)
    };

    explicit TableModel(QObject* parent = nullptr);

    // Shows `table` (may be null); `derived` names the columns made by recipes.
    void setTable(std::shared_ptr<const Table> table, std::set<std::string> derived = {});
    const Table* table() const { return table_.get(); }
    std::shared_ptr<const Table> sharedTable() const { return table_; }

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

    static QString missingText();  // "—"

private:
    std::shared_ptr<const Table> table_;
    std::set<std::string> derived_;
};

}  // namespace moderato::ui
