// Placeholder until the import dialog is built (issue #4, in progress): reads with default options.
#include "data/import_dialog.hpp"

#include <QDialogButtonBox>
#include <QLabel>
#include <QMessageBox>
#include <QVBoxLayout>

#include "moderato/error.hpp"

namespace moderato::ui {

ImportDialog::ImportDialog(const QString& path, QWidget* parent) : QDialog(parent), path_(path) {
    auto* layout = new QVBoxLayout(this);
    layout->addWidget(new QLabel(path, this));
    auto* buttons = new QDialogButtonBox(QDialogButtonBox::Ok | QDialogButtonBox::Cancel, this);
    layout->addWidget(buttons);
    connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);
    connect(buttons, &QDialogButtonBox::accepted, this, [this] {
        try {
            table_ = std::make_shared<const Table>(read_csv(path_.toStdString(), options_));
            accept();
        } catch (const InputError& e) {
            QMessageBox::warning(this, tr("Import"), QString::fromStdString(e.what()));
        }
    });
}

}  // namespace moderato::ui
