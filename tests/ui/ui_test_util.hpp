// Helpers shared by the workbench tests.
#pragma once

#include <QCoreApplication>
#include <QDir>
#include <QElapsedTimer>
#include <QSignalSpy>
#include <QString>
#include <QTemporaryDir>
#include <functional>

#include "moderato/reading/csv.hpp"
#include "shell/main_window.hpp"

namespace moderato::test {

inline QString samplesDir() { return QStringLiteral(MODERATO_SAMPLES_DIR); }
inline QString sampleProject(const QString& name) {
    return samplesDir() + QLatin1Char('/') + name + QLatin1Char('/') + name + QStringLiteral(".moderato");
}
inline const QStringList& sampleNames() {
    static const QStringList names{QStringLiteral("coffee-discount"), QStringLiteral("orchard-nitrogen"),
                                   QStringLiteral("volunteer-onboarding"), QStringLiteral("helpdesk-staffing"),
                                   QStringLiteral("trial-conversion")};
    return names;
}

// Processes events until `done` holds or `ms` pass; returns whether it held.
inline bool waitUntil(const std::function<bool()>& done, int ms = 10000) {
    QElapsedTimer t;
    t.start();
    while (!done()) {
        if (t.elapsed() > ms) return false;
        QCoreApplication::processEvents(QEventLoop::AllEvents, 20);
    }
    return true;
}

// Runs `start` (which opens or imports a file in the main window: a menu
// action, a drop, a call) and waits until the window's load has ended.
// Returns how it ended (Failed also when it did not end within `ms`).
inline ui::MainWindow::LoadResult finishLoad(ui::MainWindow& w, const std::function<void()>& start, int ms = 60000) {
    QSignalSpy spy(&w, &ui::MainWindow::loadFinished);
    start();
    if (spy.isEmpty() && !spy.wait(ms)) return ui::MainWindow::Failed;
    return spy.first().at(1).value<ui::MainWindow::LoadResult>();
}

// Opens a project or reads a data file in the main window and waits for it;
// whether it was loaded.
inline bool openProject(ui::MainWindow& w, const QString& path) {
    return finishLoad(w, [&] { w.openProject(path); }) == ui::MainWindow::Loaded;
}
inline bool importData(ui::MainWindow& w, const QString& path, const CsvOptions& options = {}) {
    return finishLoad(w, [&] { w.importData(path, options); }) == ui::MainWindow::Loaded;
}

// Copies a sample project folder into `dir` and returns the copied project path.
inline QString copySample(const QString& name, const QTemporaryDir& dir) {
    const QDir from(samplesDir() + QLatin1Char('/') + name);
    for (const QString& f : from.entryList(QDir::Files)) QFile::copy(from.filePath(f), dir.filePath(f));
    return dir.filePath(name + QStringLiteral(".moderato"));
}

}  // namespace moderato::test
