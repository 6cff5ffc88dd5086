// The page of one dataset: the virtual grid of its rows, a summary of each
// column, and the derived-column recipes.
//
// The grid is a QTableView over TableModel, which formats cells straight
// from the core Table (a million rows scroll like a hundred). Row numbers are
// the file's line numbers. The summary of the selected column is computed by
// core (column_summary.hpp). Recipes are added and removed as undoable edits
// of the project; the document rebuilds the table and the page follows its
// datasetChanged signal.
#pragma once

#include <QString>
#include <QWidget>
#include <cstddef>
#include <map>
#include <memory>
#include <vector>

#include "moderato/reading/column_summary.hpp"
#include "moderato/reading/table.hpp"

class QLabel;
class QListWidget;
class QPushButton;
class QTableView;
class QTableWidget;
class QVBoxLayout;

namespace moderato::ui {

class ColumnKindBox;
class DerivedColumnDialog;
class HistogramWidget;
class ProjectDocument;
class TableModel;

class DatasetPage : public QWidget {
    Q_OBJECT
public:
    explicit DatasetPage(ProjectDocument* doc, QWidget* parent = nullptr);
    void showDataset(const QString& id);
    QString datasetId() const { return id_; }
    // Selects these table rows (0-based) in the grid and scrolls to the first.
    void selectRows(const std::vector<std::size_t>& rows);

    QTableView* grid() const { return grid_; }
    TableModel* model() const { return model_; }
    // The column the summary panel describes (-1: none).
    int summaryColumn() const { return summaryColumn_; }
    // "Read as numbers / categories" of the column on show.
    ColumnKindBox* kindBox() const { return kindBox_; }
    // The core summary on show (nullptr: none).
    const ColumnSummary* currentSummary() const {
        const auto it = summaries_.find(summaryColumn_);
        return it == summaries_.end() ? nullptr : &it->second;
    }
    void showSummary(int column);
    // Opens "Add derived column…" (window-modal, not blocking) and returns it.
    DerivedColumnDialog* openDerivedDialog();
    // Removes the recipe of this derived column (one undo step).
    void removeDerived(const QString& name);

protected:
    // The quieter text in the title and summary follows the palette (light or dark desktop).
    void changeEvent(QEvent* event) override;

private:
    // The constructor's steps: the grid, the column summary, the derived
    // columns, then the connections.
    void createGrid(QWidget* split);
    QWidget* createSummaryBox(QWidget* side);
    QWidget* createRecipeBox(QWidget* side);
    void connectSignals();
    // The summary of a numeric column (histogram) or of a categorical one (levels).
    void showNumeric(const ColumnSummary& s);
    void showLevels(const ColumnSummary& s);
    void refresh();
    void updateHeader();
    void updateRecipes();

    ProjectDocument* doc_;
    QString id_;
    TableModel* model_;
    QTableView* grid_;
    QLabel* title_;
    QLabel* error_;
    // Summary panel.
    QLabel* summaryTitle_;
    ColumnKindBox* kindBox_;
    std::map<QString, std::pair<QLabel*, QLabel*>> stats_;  // key -> (name, value)
    QVBoxLayout* summaryLayout_;
    QTableWidget* levels_;
    HistogramWidget* histogram_;
    QLabel* histogramNote_;
    // Recipes.
    QListWidget* recipes_;
    QPushButton* addDerived_;
    QPushButton* removeDerived_;

    int summaryColumn_ = -1;
    std::map<int, ColumnSummary> summaries_;  // of the table on show, by column
};

}  // namespace moderato::ui
