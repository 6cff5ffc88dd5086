// The pick-a-point table: the conditional effect at each pinned moderator
// value (or, before anything is pinned, at the defaults core chose: mean and
// ± 1 SD; for groups, every group) in the house order of an estimate, the
// same as the memo's and the exported tables: moderator value, effect,
// interval (low, high), SE, test value, p, a count model's rate ratio with
// its interval, and a "beyond the data" note.
// Pinned rows can be removed; the table copies as tab-separated text.
#pragma once

#include <QAbstractTableModel>
#include <QWidget>
#include <optional>
#include <vector>

#include "moderato/probing/probe.hpp"

class QLabel;
class QTableView;
class QToolButton;

namespace moderato::ui {

class PinnedTableModel : public QAbstractTableModel {
    Q_OBJECT
public:
    // The rate-ratio columns are there only while a row has a ratio (count
    // models); Note is hidden on screen, so they follow p there.
    enum Column { Value, Effect, Lower, Upper, SE, Statistic, P, Note, Ratio, RatioLower, RatioUpper, ColumnCount };
    struct Row {
        QString label;  // the moderator value as shown ("23.1", "North", "mean − 1 SD: 23.1")
        EffectPoint point;
        bool pinned = false;             // removable
        int pinIndex = -1;               // index into ProbeSettings.pinned
        std::optional<RateRatio> ratio;  // a count model's exp(effect on the log scale)
    };
    using QAbstractTableModel::QAbstractTableModel;
    void setRows(std::vector<Row> rows, const QString& moderator, const QString& statistic, const QString& interval);
    const std::vector<Row>& rows() const { return rows_; }
    bool hasRatios() const { return ratios_; }
    // The column a section shows, and the section of a column (-1: not shown).
    Column columnAt(int section) const;
    int sectionOf(Column c) const;

    int rowCount(const QModelIndex& parent = {}) const override;
    int columnCount(const QModelIndex& parent = {}) const override;
    QVariant data(const QModelIndex& index, int role) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role) const override;

private:
    std::vector<Row> rows_;
    QString moderator_, statistic_, interval_;
    bool ratios_ = false;
};

class PinnedTable : public QWidget {
    Q_OBJECT
public:
    explicit PinnedTable(QWidget* parent = nullptr);
    PinnedTableModel* model() const { return model_; }
    QTableView* view() const { return view_; }
    void setCaption(const QString& text);
    QString caption() const;
    // The selection (or everything) as tab-separated text; also put on the clipboard by Copy.
    QString tsv() const;

Q_SIGNALS:
    // The user asked to remove these pinned values (indices into ProbeSettings.pinned).
    void removeRequested(const std::vector<int>& pinIndices);

private:
    void removeSelected();
    void hideNote();  // on screen a row beyond the data is shaded instead
    void updateButtons();
    void fitHeight();

    PinnedTableModel* model_;
    QTableView* view_;
    QLabel* caption_;
    QToolButton* remove_;
    QToolButton* copy_;
};

}  // namespace moderato::ui
