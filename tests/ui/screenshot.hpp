// Pictures of widgets for looking at them by eye: saved only when
// MODERATO_SCREENSHOT_DIR is set, and no test depends on them.
#pragma once

#include <QCoreApplication>
#include <QDir>
#include <QEvent>
#include <QPixmap>
#include <QString>
#include <QWidget>

namespace moderato::test {

// Saves `widget` as MODERATO_SCREENSHOT_DIR/<file> ("name.png") when the variable is set.
inline void saveScreenshot(QWidget* widget, const QString& file) {
    const QString dir = qEnvironmentVariable("MODERATO_SCREENSHOT_DIR");
    if (dir.isEmpty()) return;
    QDir().mkpath(dir);
    // Let pending layouts settle first, and widgets replaced by deleteLater() go.
    QCoreApplication::sendPostedEvents(nullptr, QEvent::DeferredDelete);
    QCoreApplication::processEvents();
    QCoreApplication::processEvents();
    widget->grab().save(QDir(dir).filePath(file));
}

}  // namespace moderato::test
