// The page of one dataset: the virtual grid of its rows, a summary of each
// column, and the derived-column recipes.
#pragma once

#include <QWidget>
#include <cstddef>
#include <vector>

class QLabel;

namespace moderato::ui {

class ProjectDocument;

class DatasetPage : public QWidget {
    Q_OBJECT
public:
    explicit DatasetPage(ProjectDocument* doc, QWidget* parent = nullptr);
    void showDataset(const QString& id);
    QString datasetId() const { return id_; }
    // Selects these table rows (0-based) in the grid and scrolls to the first.
    void selectRows(const std::vector<std::size_t>& rows);

private:
    ProjectDocument* doc_;
    QString id_;
    QLabel* label_;
};

}  // namespace moderato::ui
