// Asking the user where a project's data file went when it is not where the
// project says (it was moved or renamed).
#pragma once

#include <QString>

class QWidget;

namespace moderato::ui {

// Says which file is missing and where it was looked for, then lets the user
// choose the file (a file chooser run modally, like the other choosers: the
// answer decides the next step). Returns the chosen file; empty when cancelled.
QString askForMovedDataFile(QWidget* parent, const QString& dataset, const QString& recorded, const QString& file);

}  // namespace moderato::ui
