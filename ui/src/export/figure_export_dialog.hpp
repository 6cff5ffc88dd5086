// Exporting a figure: format (PNG at a DPI, SVG, PDF), a LOOK.md preset or a
// custom size, font and size, greyscale, caption; copy to the clipboard.
#pragma once

#include <QDialog>

#include "moderato/project.hpp"

namespace moderato::ui {

class FigureSource;
class ProjectDocument;

class FigureExportDialog : public QDialog {
    Q_OBJECT
public:
    FigureExportDialog(FigureSource* source, ProjectDocument* doc, const QString& analysisId, const QString& caption,
                       QWidget* parent = nullptr);

private:
    FigureSource* source_;
    ProjectDocument* doc_;
    QString analysisId_;
    QString caption_;
};

}  // namespace moderato::ui
