// Importing a delimited text file: options with a live preview, then the
// full load in a worker thread with progress and Cancel.
#pragma once

#include <QDialog>
#include <memory>

#include "moderato/csv.hpp"
#include "moderato/table.hpp"

namespace moderato::ui {

class ImportDialog : public QDialog {
    Q_OBJECT
public:
    explicit ImportDialog(const QString& path, QWidget* parent = nullptr);
    QString path() const { return path_; }
    CsvOptions options() const { return options_; }
    // The whole table, read when the dialog was accepted.
    std::shared_ptr<const Table> table() const { return table_; }

private:
    QString path_;
    CsvOptions options_;
    std::shared_ptr<const Table> table_;
};

}  // namespace moderato::ui
