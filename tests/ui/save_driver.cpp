// A workbench that saves on cue, for the kill-during-save tests
// (test_kill_during_save.cpp). It opens a project in the main window as the
// user does (MainWindow::openProject), gives the analysis the settings of one
// variant through the document (ProjectDocument::setAnalysis, an undoable edit
// like the user's), prints "ready", waits for a line on standard input, then
// saves with the workbench's own functions and prints "done". The test kills
// it with SIGKILL at a random moment in between.
//
//   moderato_save_driver <kind> <project file> <out folder> <old|new> <note bytes>
//
// kind: open    nothing is saved (the start alone: its clean-up of the folder)
//       project File ▸ Save (MainWindow::save) over the project file
//       memo    Memo ▸ Save as HTML, Markdown (with its figures) and PDF (MemoSection)
//       tables  Memo ▸ Save tables, in every table format (MemoSection::saveTables)
//       figure  File ▸ Export Figure of the first memo figure as PNG, SVG and PDF (FigureExportDialog::exportTo)
// Exit status: 0 saved, 2 bad arguments, 3 the project did not open or run, 4 a save failed.
#include <QApplication>
#include <QDir>
#include <QHashSeed>
#include <QSettings>
#include <QStandardPaths>
#include <QTemporaryDir>
#include <cstdio>
#include <iostream>
#include <string>

#include "common/figure_caption.hpp"
#include "export/figure_export_dialog.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "outputs/analysis_outputs.hpp"
#include "plots/figure_source.hpp"
#include "sections/memo_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

struct Args {
    QString kind, project, out;
    bool newVariant = false;
    int noteBytes = 0;
};

// The variant's notes: `bytes` long, different on every line and between variants.
std::string variantNotes(bool newVariant, int bytes) {
    std::string notes;
    for (int line = 0; static_cast<int>(notes.size()) < bytes; ++line)
        notes += std::string(newVariant ? "New" : "Old") + " note line " + std::to_string(line) +
                 ": the analyst's own words, repeated to make the file long.\n";
    notes.resize(static_cast<std::size_t>(bytes));
    return notes;
}

// The two variants differ in the confidence level (every table, figure and
// the memo change with it) and in the notes (the project file and the memo).
bool applyVariant(MainWindow& w, const QString& id, const Args& a) {
    Analysis after = *w.document()->analysis(id);
    after.level = a.newVariant ? 0.95 : 0.90;
    after.memo_notes = variantNotes(a.newVariant, a.noteBytes);
    // Figures are exported at print resolution (300 DPI: big files); the
    // memo's figures at a low one, so that building the memo stays quick.
    after.figure.dpi = a.kind == QLatin1String("figure") ? 300 : 100;
    w.document()->setAnalysis(after, QStringLiteral("variant"));
    w.runner()->refresh(id);
    return test::waitUntil([&] { return !w.runner()->busy(id) && w.runner()->result(id); }, 60000);
}

bool saveMemo(MemoSection* memo, const QDir& out, QString* error) {
    return memo->saveHtml(out.filePath(QStringLiteral("memo.html")), error) &&
           memo->saveMarkdown(out.filePath(QStringLiteral("memo.md")), error) &&
           memo->savePdf(out.filePath(QStringLiteral("memo.pdf")), error);
}

bool saveTables(MemoSection* memo, const QString& out, QString* error) {
    for (const TableFormat f : {TableFormat::Csv, TableFormat::Markdown, TableFormat::Latex, TableFormat::Html})
        if (!memo->saveTables(out, f, nullptr, error)) return false;
    return true;
}

bool exportFigures(MainWindow& w, const QString& id, const QDir& out, QString* error) {
    const auto run = w.runner()->result(id);
    const QString caption = figureCaption(*w.document()->analysis(id), *run);
    // The first figure (the lines plot): one big file per format is enough.
    FigureSource* source = w.analysisPage()->probe()->reportFigures(*run).value(0);
    if (!source) {
        *error = QStringLiteral("the analysis has no figure");
        return false;
    }
    FigureExportDialog dialog(source, w.document(), id, caption);
    for (const char* suffix : {"png", "svg", "pdf"})
        if (!dialog.exportTo(out.filePath(figureStem(source) + QLatin1Char('.') + QLatin1String(suffix)))) {
            *error = dialog.statusText();
            return false;
        }
    return true;
}

bool save(MainWindow& w, const QString& id, const Args& a, QString* error) {
    const QDir out(a.out);
    if (a.kind == QLatin1String("open")) return true;
    if (a.kind == QLatin1String("project")) {
        if (w.save()) return true;
        *error = w.lastMessage();
        return false;
    }
    if (a.kind == QLatin1String("memo")) return saveMemo(w.analysisPage()->memo(), out, error);
    if (a.kind == QLatin1String("tables")) return saveTables(w.analysisPage()->memo(), a.out, error);
    return exportFigures(w, id, out, error);
}

int drive(const Args& a) {
    MainWindow w;
    w.setInteractive(false);
    w.resize(1400, 900);
    w.show();
    if (!test::openProject(w, a.project)) {
        std::cerr << "cannot open " << a.project.toStdString() << ": " << w.lastMessage().toStdString() << "\n";
        return 3;
    }
    const QString id = w.analysisPage()->analysisId();
    if (!applyVariant(w, id, a)) {
        std::cerr << "the analysis did not run: " << w.runner()->error(id).toStdString() << "\n";
        return 3;
    }
    if (a.kind == QLatin1String("memo") || a.kind == QLatin1String("tables")) {
        w.analysisPage()->showSection(AnalysisPage::Memo);
        MemoSection* memo = w.analysisPage()->memo();
        if (!test::waitUntil([&] { return memo->isVisible() && memo->output().has_value(); }, 60000)) {
            std::cerr << "the memo was not built\n";
            return 3;
        }
    }
    QCoreApplication::processEvents();
    std::cout << "ready" << std::endl;
    std::string go;
    std::getline(std::cin, go);
    QString error;
    if (!save(w, id, a, &error)) {
        std::cerr << "save failed: " << error.toStdString() << "\n";
        return 4;
    }
    std::cout << "done" << std::endl;
    return 0;
}

}  // namespace

int main(int argc, char** argv) {
    QHashSeed::setDeterministicGlobalSeed();  // as the workbench does (repeatable PDFs)
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    QStandardPaths::setTestModeEnabled(true);
    // Recent files of the driver never touch the user's: a folder the test
    // names (a killed driver cannot remove a temporary folder of its own).
    QTemporaryDir ownSettings;
    const QString settings = qEnvironmentVariableIsEmpty("MODERATO_DRIVER_SETTINGS")
                                 ? ownSettings.path()
                                 : qEnvironmentVariable("MODERATO_DRIVER_SETTINGS");
    QSettings::setPath(QSettings::NativeFormat, QSettings::UserScope, settings);
    QSettings::setPath(QSettings::IniFormat, QSettings::UserScope, settings);
    QApplication app(argc, argv);
    const QStringList kinds{QStringLiteral("open"), QStringLiteral("project"), QStringLiteral("memo"),
                            QStringLiteral("tables"), QStringLiteral("figure")};
    const QStringList args = QCoreApplication::arguments();
    if (args.size() != 6 || !kinds.contains(args[1]) ||
        (args[4] != QLatin1String("old") && args[4] != QLatin1String("new"))) {
        std::cerr << "usage: moderato_save_driver <open|project|memo|tables|figure> <project> <out folder> "
                     "<old|new> <note bytes>\n";
        return 2;
    }
    return drive({args[1], args[2], args[3], args[4] == QLatin1String("new"), args[5].toInt()});
}
