// The drag-and-drop payload of a column: its name and, when it is dragged
// out of a role slot, that role (so dropping it elsewhere moves it).
#pragma once

#include <QString>
#include <optional>
#include <string>

#include "specify/role_edit.hpp"

class QMimeData;

namespace moderato::ui {

inline const QString kColumnMimeType = QStringLiteral("application/x-moderato-column");

struct ColumnDrag {
    std::string column;
    std::optional<Role> from;  // none: dragged from the column list
};

// A new QMimeData carrying the column (the caller owns it).
QMimeData* columnMimeData(const std::string& column, std::optional<Role> from = std::nullopt);
// The column a payload carries, or none when it carries no column.
std::optional<ColumnDrag> columnFromMime(const QMimeData* mime);

}  // namespace moderato::ui
