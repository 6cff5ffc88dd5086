// GoogleTest main for the workbench tests: one QApplication for all tests,
// on the offscreen platform unless the caller chose another.
#include <gtest/gtest.h>

#include <QApplication>
#include <QHashSeed>
#include <QSettings>
#include <QStandardPaths>
#include <QTemporaryDir>

int main(int argc, char** argv) {
    QHashSeed::setDeterministicGlobalSeed();  // as the workbench and the renderer do (repeatable PDFs)
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM")) qputenv("QT_QPA_PLATFORM", "offscreen");
    // Settings and recent files of the tests never touch the user's own, and
    // each test process has its own (ctest runs tests in parallel processes,
    // which would otherwise share one settings file).
    QStandardPaths::setTestModeEnabled(true);
    QTemporaryDir settingsDir;
    QSettings::setPath(QSettings::NativeFormat, QSettings::UserScope, settingsDir.path());
    QSettings::setPath(QSettings::IniFormat, QSettings::UserScope, settingsDir.path());
    // Recovery copies of unsaved edits (model/recovery_store) go to a folder of this process too.
    QTemporaryDir stateDir;
    qputenv("XDG_STATE_HOME", stateDir.path().toLocal8Bit());
    QApplication app(argc, argv);
    QApplication::setOrganizationName(QStringLiteral("Moderato-tests"));
    QApplication::setApplicationName(QStringLiteral("Moderato-tests"));
    ::testing::InitGoogleTest(&argc, argv);
    return RUN_ALL_TESTS();
}
