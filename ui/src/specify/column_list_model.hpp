// The dataset's columns as the Specify section lists them: name, kind
// (numeric, categorical, 0/1), missing cells and the role each one fills.
// Rows can be dragged onto the role slots.
#pragma once

#include <QAbstractTableModel>
#include <memory>
#include <vector>

#include "moderato/project/project.hpp"
#include "moderato/reading/table.hpp"
#include "specify/role_edit.hpp"

namespace moderato::ui {

class ColumnListModel : public QAbstractTableModel {
    Q_OBJECT
public:
    enum Col { Name = 0, Kind, Missing, InRole, ColumnCount };
    static constexpr int ColumnNameRole = Qt::UserRole + 1;

    explicit ColumnListModel(QObject* parent = nullptr);
    void setTable(std::shared_ptr<const Table> table);
    void setAnalysis(const Analysis& a);
    std::string columnAt(int row) const;
    int rowOf(const std::string& column) const;

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role) const override;
    QVariant headerData(int section, Qt::Orientation o, int role) const override;
    Qt::ItemFlags flags(const QModelIndex& index) const override;
    QStringList mimeTypes() const override;
    QMimeData* mimeData(const QModelIndexList& indexes) const override;
    Qt::DropActions supportedDragActions() const override { return Qt::CopyAction | Qt::MoveAction; }

private:
    struct Entry {
        std::string name;
        ColumnNature nature;
        std::size_t missing;
    };
    std::shared_ptr<const Table> table_;
    std::vector<Entry> entries_;
    Analysis analysis_;
};

}  // namespace moderato::ui
