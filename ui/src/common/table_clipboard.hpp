// Tables to the clipboard: the selected cells (or the whole table when
// nothing is selected) as tab-separated text with the column headers.
#pragma once

#include <QString>

class QTableView;
class QAbstractItemModel;

namespace moderato::ui {

QString tableSelectionAsTsv(const QTableView* view);
QString modelAsTsv(const QAbstractItemModel* model);

}  // namespace moderato::ui
