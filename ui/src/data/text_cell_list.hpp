// How cells of text among numbers are listed in the import preview and on
// the dataset page: "line 9 “twelve”, line 30 “lots”, …" (HTML-escaped).
#pragma once

#include <QObject>
#include <QStringList>
#include <vector>

#include "moderato/reading/table.hpp"

namespace moderato::ui {

// `cells` are the first of `total` such cells; "…" follows when there are more.
inline QString textCellList(const std::vector<TextCell>& cells, std::size_t total) {
    QStringList parts;
    for (const TextCell& c : cells)
        parts << QObject::tr("line %1 “%2”").arg(c.line).arg(QString::fromStdString(c.text).toHtmlEscaped());
    return parts.join(QStringLiteral(", ")) + (total > cells.size() ? QStringLiteral(", …") : QString());
}

}  // namespace moderato::ui
