// Placeholder until figure export is built (issue #4, in progress).
#include "export/figure_export_dialog.hpp"

namespace moderato::ui {

FigureExportDialog::FigureExportDialog(FigureSource* source, ProjectDocument* doc, const QString& analysisId,
                                       const QString& caption, QWidget* parent)
    : QDialog(parent), source_(source), doc_(doc), analysisId_(analysisId), caption_(caption) {}

}  // namespace moderato::ui
