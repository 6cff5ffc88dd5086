#include "specify/column_mime.hpp"

#include <QByteArray>
#include <QMimeData>

namespace moderato::ui {

// Payload: the role index (-1 for none), a newline, the column name in UTF-8.
QMimeData* columnMimeData(const std::string& column, std::optional<Role> from) {
    auto* mime = new QMimeData;
    QByteArray data = QByteArray::number(from ? static_cast<int>(*from) : -1);
    data += '\n';
    data += QByteArray::fromStdString(column);
    mime->setData(kColumnMimeType, data);
    mime->setText(QString::fromStdString(column));
    return mime;
}

std::optional<ColumnDrag> columnFromMime(const QMimeData* mime) {
    if (!mime || !mime->hasFormat(kColumnMimeType)) return std::nullopt;
    const QByteArray data = mime->data(kColumnMimeType);
    const qsizetype nl = data.indexOf('\n');
    if (nl < 0) return std::nullopt;
    bool ok = false;
    const int role = data.left(nl).toInt(&ok);
    if (!ok) return std::nullopt;
    ColumnDrag d;
    d.column = data.mid(nl + 1).toStdString();
    d.from = roleFromIndex(role);
    if (d.column.empty()) return std::nullopt;
    return d;
}

}  // namespace moderato::ui
