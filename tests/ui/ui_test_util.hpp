// Helpers shared by the workbench tests.
#pragma once

#include <QCoreApplication>
#include <QDir>
#include <QElapsedTimer>
#include <QSignalSpy>
#include <QString>
#include <QTemporaryDir>
#include <cmath>
#include <cstdio>
#include <functional>

#include "moderato/reading/csv.hpp"
#include "shell/main_window.hpp"

namespace moderato::test {

inline QString samplesDir() { return QStringLiteral(MODERATO_SAMPLES_DIR); }
inline QString sampleProject(const QString& name) {
    return samplesDir() + QLatin1Char('/') + name + QLatin1Char('/') + name + QStringLiteral(".moderato");
}
inline const QStringList& sampleNames() {
    static const QStringList names{QStringLiteral("coffee-discount"),      QStringLiteral("orchard-nitrogen"),
                                   QStringLiteral("volunteer-onboarding"), QStringLiteral("helpdesk-staffing"),
                                   QStringLiteral("trial-conversion"),     QStringLiteral("turbine-repairs"),
                                   QStringLiteral("warehouse-picking"),    QStringLiteral("desk-complaints")};
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

// A number as the workbench and the memo write it, computed here without the
// formatter under test. Common practice for reports: four significant digits
// with the trailing zeros kept (printf "%#.4g"), the whole part written out
// from 1000 up ("%.0f"), d.ddd×10⁻ⁿ below 1e-4 (printf "%.3e" rewritten with
// U+00D7 and superscript digits), and the minus sign U+2212. Values of 1e7
// and up are not used by the tests.
inline QString fourDigits(double v) {
    static const char16_t superscripts[] = {0x2070, 0x00B9, 0x00B2, 0x00B3, 0x2074,
                                            0x2075, 0x2076, 0x2077, 0x2078, 0x2079};
    const double a = std::fabs(v);
    char buf[64];
    QString s;
    if (a != 0 && a < 1e-4) {
        std::snprintf(buf, sizeof buf, "%.3e", v);  // "4.867e-05"
        const QString t = QString::fromLatin1(buf);
        const int e = static_cast<int>(t.indexOf(QLatin1Char('e')));
        const int exponent = t.mid(e + 1).toInt();
        s = t.left(e) + QChar(0x00D7) + QStringLiteral("10") + (exponent < 0 ? QString(QChar(0x207B)) : QString());
        for (const QChar c : QString::number(std::abs(exponent))) s += QChar(superscripts[c.unicode() - '0']);
    } else {
        std::snprintf(buf, sizeof buf, a >= 1000 || v == std::trunc(v) ? "%.0f" : "%#.4g", v);
        s = QString::fromLatin1(buf);
        if (s.endsWith(QLatin1Char('.'))) s.chop(1);  // 999.96 -> "1000."
    }
    if (s.startsWith(QLatin1Char('-'))) s.replace(0, 1, QChar(0x2212));
    return s;
}

}  // namespace moderato::test
