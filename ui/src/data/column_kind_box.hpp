// The kind of the selected column, changed after import: "Read as numbers"
// or "categories" on the dataset page, one undoable edit of the project
// (DataSource::retyped) after which every analysis of the dataset re-fits.
// It also says when a categorical column holds mostly numbers (a few cells
// of text, "twelve" among hours), with a button to read it as numbers, and
// how many cells of text a numeric column read as missing.
#pragma once

#include <QWidget>
#include <string>

class QComboBox;
class QLabel;
class QPushButton;

namespace moderato {
class Table;
}

namespace moderato::ui {

class ProjectDocument;

class ColumnKindBox : public QWidget {
    Q_OBJECT
public:
    explicit ColumnKindBox(ProjectDocument* doc, QWidget* parent = nullptr);

    // Shows column `column` of `table` (the dataset's table as analyses see it);
    // derived columns keep the kind their recipe gives. nullptr: nothing.
    void showColumn(const std::string& datasetId, const Table* table, int column, bool derived);

    QComboBox* kindChoice() const { return kind_; }
    QLabel* note() const { return note_; }
    QPushButton* readAsNumbers() const { return asNumbers_; }

    // One undo step: the column read as numbers (categorical = false) or as
    // categories; back to the kind it was read with, the change is dropped.
    void setKind(const std::string& datasetId, const std::string& column, bool categorical);

private:
    void showNote(const Table& table, int column);

    ProjectDocument* doc_;
    std::string dataset_, column_;
    QComboBox* kind_;
    QLabel* note_;
    QPushButton* asNumbers_;
};

}  // namespace moderato::ui
