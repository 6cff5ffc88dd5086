// Helpers shared by the workbench tests.
#pragma once

#include <QCoreApplication>
#include <QDir>
#include <QElapsedTimer>
#include <QString>
#include <QTemporaryDir>
#include <functional>

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

// Copies a sample project folder into `dir` and returns the copied project path.
inline QString copySample(const QString& name, const QTemporaryDir& dir) {
    const QDir from(samplesDir() + QLatin1Char('/') + name);
    for (const QString& f : from.entryList(QDir::Files)) QFile::copy(from.filePath(f), dir.filePath(f));
    return dir.filePath(name + QStringLiteral(".moderato"));
}

}  // namespace moderato::test
