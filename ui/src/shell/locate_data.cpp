#include "shell/locate_data.hpp"

#include <QDir>
#include <QFileDialog>
#include <QFileInfo>
#include <QMessageBox>
#include <QPushButton>

namespace moderato::ui {

QString askForMovedDataFile(QWidget* parent, const QString& dataset, const QString& recorded, const QString& file) {
    QMessageBox box(QMessageBox::Question, QObject::tr("Data file not found"),
                    QObject::tr("The data file of dataset '%1' is not where the project says: it records \"%2\", "
                                "and there is no file at\n%3\n\nIf the file was moved or renamed, show where it is "
                                "now. Its SHA-256 is compared with the one the project recorded; the new place is "
                                "saved with the project (Undo takes it back).")
                        .arg(dataset, recorded, QDir::toNativeSeparators(file)),
                    QMessageBox::Cancel, parent);
    QPushButton* locate = box.addButton(QObject::tr("Locate the File…"), QMessageBox::AcceptRole);
    box.setDefaultButton(locate);
    box.exec();
    if (box.clickedButton() != locate) return {};
    // Start where the file used to be (or its nearest folder that exists).
    QString start = QFileInfo(file).absolutePath();
    while (!QFileInfo::exists(start) && start != QDir::rootPath()) start = QFileInfo(start).absolutePath();
    return QFileDialog::getOpenFileName(parent, QObject::tr("Where is %1?").arg(QFileInfo(file).fileName()), start,
                                        QObject::tr("Data (*.csv *.tsv *.txt *.xlsx *.sqlite *.sqlite3 *.db);;All "
                                                    "files (*)"));
}

}  // namespace moderato::ui
