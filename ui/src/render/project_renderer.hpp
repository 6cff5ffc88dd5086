// Renders a whole project without a window: for every analysis its figures
// (PNG, SVG and PDF at the analysis's figure settings), its tables (CSV,
// Markdown, LaTeX, HTML) and its memo (HTML, Markdown, PDF); and every figure
// kept in the project. The same widgets and exporters as the workbench draw
// everything, so the files equal the workbench's exports. Needs a
// QApplication (the offscreen platform is enough).
#pragma once

#include <QString>
#include <QStringList>

#include "moderato/project/project_loader.hpp"

namespace moderato::ui {

struct RenderRequest {
    QString projectPath;
    QString outDir;
    bool acceptChangedData = false;  // go on when a data file's SHA-256 differs from the recorded one
    DatabasePasswords passwords;     // for PostgreSQL datasets (in memory only; else the password file)
};

struct RenderReport {
    QStringList files;     // written, relative to outDir, in the order written
    QStringList warnings;  // changed data accepted, migration notes, kept figures of a plot the analysis no longer has
    QStringList failures;  // analyses that could not be rendered, with the reason
};

// Throws InputError when the project cannot be read, a data file is missing,
// a data file changed and acceptChangedData is false, or the output folder
// cannot be made (or would overwrite a data file). An analysis that cannot be
// fitted is reported in `failures` and the others are still rendered.
RenderReport renderProject(const RenderRequest& request);

}  // namespace moderato::ui
