#include "common/table_clipboard.hpp"

#include <QItemSelectionModel>
#include <QTableView>
#include <map>
#include <set>

namespace moderato::ui {

namespace {
// Tabs and line breaks inside a cell would break the grid: they become spaces.
QString clean(QString s) {
    s.replace(QLatin1Char('\t'), QLatin1Char(' '));
    s.replace(QLatin1Char('\n'), QLatin1Char(' '));
    s.replace(QLatin1Char('\r'), QLatin1Char(' '));
    return s;
}
}  // namespace

QString modelAsTsv(const QAbstractItemModel* m) {
    QString out;
    QStringList header;
    for (int c = 0; c < m->columnCount(); ++c) header << clean(m->headerData(c, Qt::Horizontal).toString());
    out += header.join(QLatin1Char('\t')) + QLatin1Char('\n');
    for (int r = 0; r < m->rowCount(); ++r) {
        QStringList cells;
        for (int c = 0; c < m->columnCount(); ++c) cells << clean(m->index(r, c).data().toString());
        out += cells.join(QLatin1Char('\t')) + QLatin1Char('\n');
    }
    return out;
}

QString tableSelectionAsTsv(const QTableView* view) {
    const QAbstractItemModel* m = view->model();
    if (!m) return {};
    const QModelIndexList selected =
        view->selectionModel() ? view->selectionModel()->selectedIndexes() : QModelIndexList();
    if (selected.isEmpty()) return modelAsTsv(m);
    std::set<int> columns;
    std::map<int, std::map<int, QString>> rows;
    for (const QModelIndex& i : selected) {
        columns.insert(i.column());
        rows[i.row()][i.column()] = clean(i.data().toString());
    }
    QString out;
    QStringList header;
    for (int c : columns) header << clean(m->headerData(c, Qt::Horizontal).toString());
    out += header.join(QLatin1Char('\t')) + QLatin1Char('\n');
    for (const auto& [r, cells] : rows) {
        QStringList line;
        for (int c : columns) {
            const auto it = cells.find(c);
            line << (it == cells.end() ? QString() : it->second);
        }
        out += line.join(QLatin1Char('\t')) + QLatin1Char('\n');
    }
    return out;
}

}  // namespace moderato::ui
