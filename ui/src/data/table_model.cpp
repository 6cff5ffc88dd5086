#include "data/table_model.hpp"

#include <QBrush>
#include <QFont>
#include <QGuiApplication>
#include <QIcon>
#include <QPainter>
#include <QPixmap>
#include <limits>

#include "common/number_text.hpp"
#include "style/estuary.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

// The small mark on the header of a derived column: a filled diamond.
QIcon derivedIcon() {
    static const QIcon icon = [] {
        QPixmap pm(10, 10);
        pm.fill(Qt::transparent);
        QPainter p(&pm);
        p.setRenderHint(QPainter::Antialiasing);
        p.setPen(Qt::NoPen);
        p.setBrush(estuary::series(0));
        const QPointF pts[] = {{5, 0.5}, {9.5, 5}, {5, 9.5}, {0.5, 5}};
        p.drawPolygon(pts, 4);
        return QIcon(pm);
    }();
    return icon;
}

int clampToInt(std::size_t n) {
    return n > static_cast<std::size_t>(std::numeric_limits<int>::max()) ? std::numeric_limits<int>::max()
                                                                         : static_cast<int>(n);
}

}  // namespace

TableModel::TableModel(QObject* parent) : QAbstractTableModel(parent) {}

void TableModel::setTable(std::shared_ptr<const Table> table, std::set<std::string> derived) {
    beginResetModel();
    table_ = std::move(table);
    derived_ = std::move(derived);
    endResetModel();
}

int TableModel::rowCount(const QModelIndex& parent) const {
    return parent.isValid() || !table_ ? 0 : clampToInt(table_->rows());
}

int TableModel::columnCount(const QModelIndex& parent) const {
    return parent.isValid() || !table_ ? 0 : clampToInt(table_->cols());
}

QString TableModel::missingText() { return QStringLiteral("—"); }

QVariant TableModel::data(const QModelIndex& index, int role) const {
    if (!table_ || !index.isValid()) return {};
    const auto row = static_cast<std::size_t>(index.row());
    const auto col = static_cast<std::size_t>(index.column());
    if (col >= table_->cols() || row >= table_->rows()) return {};
    const Column& c = table_->columns[col];
    const bool numeric = c.kind == ColumnKind::Numeric;
    switch (role) {
        case Qt::DisplayRole:
        case Qt::ToolTipRole:
            if (c.is_missing(row)) return role == Qt::DisplayRole ? missingText() : tr("missing");
            if (numeric) return dataText(c.numbers[row]);
            return QString::fromStdString(c.levels[static_cast<std::size_t>(c.codes[row])]);
        case ValueRole:
            if (c.is_missing(row)) return {};
            if (numeric) return c.numbers[row];
            return QString::fromStdString(c.levels[static_cast<std::size_t>(c.codes[row])]);
        case MissingRole:
            return c.is_missing(row);
        case Qt::ForegroundRole:
            // Quieter than the values, yet readable on the desktop's light or dark cells.
            if (c.is_missing(row)) return QBrush(mutedText(QGuiApplication::palette(), QPalette::Base));
            return {};
        case Qt::TextAlignmentRole:
            if (c.is_missing(row)) return int(Qt::AlignCenter);
            return int((numeric ? Qt::AlignRight : Qt::AlignLeft) | Qt::AlignVCenter);
        default:
            return {};
    }
}

QVariant TableModel::headerData(int section, Qt::Orientation orientation, int role) const {
    if (!table_ || section < 0) return {};
    const auto s = static_cast<std::size_t>(section);
    if (orientation == Qt::Vertical) {
        if (s >= table_->rows()) return {};
        const std::size_t line = s < table_->row_lines.size() ? table_->row_lines[s] : 0;
        switch (role) {
            case Qt::DisplayRole:
                return QString::number(line ? line : s + 1);
            case LineRole:
                return QVariant::fromValue<qulonglong>(line);
            case Qt::ToolTipRole:
                return line ? tr("Line %1 of the file (row %2 of the table)").arg(line).arg(s + 1)
                            : tr("Row %1").arg(s + 1);
            case Qt::TextAlignmentRole:
                return int(Qt::AlignRight | Qt::AlignVCenter);
            default:
                return {};
        }
    }
    if (s >= table_->cols()) return {};
    const Column& c = table_->columns[s];
    const bool derived = derived_.count(c.name) > 0;
    switch (role) {
        case Qt::DisplayRole:
            return QString::fromStdString(c.name);
        case DerivedRole:
            return derived;
        case Qt::DecorationRole:
            return derived ? QVariant(derivedIcon()) : QVariant();
        case Qt::FontRole:
            if (derived) {
                QFont f;
                f.setItalic(true);
                return f;
            }
            return {};
        case Qt::ToolTipRole: {
            QString kind = c.kind == ColumnKind::Numeric ? tr("numeric")
                                                         : tr("categorical, %1 %2")
                                                               .arg(c.levels.size())
                                                               .arg(c.levels.size() == 1 ? tr("level") : tr("levels"));
            QString tip = QStringLiteral("<b>%1</b> — %2").arg(QString::fromStdString(c.name).toHtmlEscaped(), kind);
            if (derived) tip += tr("<br>derived column (made by a recipe of this dataset)");
            return tip;
        }
        default:
            return {};
    }
}

}  // namespace moderato::ui
