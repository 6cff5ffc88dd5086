// The Moderato workbench.
#include <QApplication>
#include <QCommandLineParser>
#include <QCoreApplication>
#include <QFileInfo>
#include <QHashSeed>
#include <QTimer>

#include <cstring>

#include "model/project_document.hpp"
#include "shell/app_style.hpp"
#include "shell/main_window.hpp"
#include "shell/recovery_prompt.hpp"

#ifndef MODERATO_APP_ID
#error "MODERATO_APP_ID (the desktop id) is defined by cmake/Packaging.cmake"
#endif

namespace {

void nameApplication() {
    QCoreApplication::setOrganizationName(QStringLiteral("Moderato"));
    QCoreApplication::setApplicationName(QStringLiteral("Moderato"));
    QCoreApplication::setApplicationVersion(QStringLiteral(MODERATO_VERSION));
}

void describeOptions(QCommandLineParser& parser) {
    parser.setApplicationDescription(
        QStringLiteral("Moderato: a workbench for moderated effects in regression (interaction terms, conditional "
                       "effects, Johnson–Neyman regions)."));
    parser.addHelpOption();
    parser.addVersionOption();
    parser.addPositionalArgument(QStringLiteral("file"),
                                 QStringLiteral("A project (.moderato) or a data file (CSV/TSV) to open."),
                                 QStringLiteral("[file]"));
}

// True when the command line only asks for text (--help, --version): that
// needs no window, so it must work where no display is available.
bool onlyText(int argc, char* argv[]) {
    for (int i = 1; i < argc; ++i) {
        const char* a = argv[i];
        if (std::strcmp(a, "--") == 0) return false;
        for (const char* flag : {"--version", "-v", "--help", "-h", "-?", "--help-all"})
            if (std::strcmp(a, flag) == 0) return true;
    }
    return false;
}

// For the tests that kill the workbench: MODERATO_TEST_RENAME=<name> renames
// the first analysis once a project is open, an edit made as the user would
// (one undo step through the document).
void renameForTests(moderato::ui::MainWindow& window) {
    const QString name = qEnvironmentVariable("MODERATO_TEST_RENAME");
    if (name.isEmpty()) return;
    QObject::connect(&window, &moderato::ui::MainWindow::loadFinished, &window,
                     [&window, name](const QString&, moderato::ui::MainWindow::LoadResult result) {
                         moderato::ui::ProjectDocument* doc = window.document();
                         if (result != moderato::ui::MainWindow::Loaded || doc->project().analyses.empty()) return;
                         moderato::Analysis a = doc->project().analyses.front();
                         a.name = name.toStdString();
                         doc->setAnalysis(a, QStringLiteral("Rename analysis"));
                     });
}

}  // namespace

int main(int argc, char* argv[]) {
    // Figures exported here and by `moderato-cli render` are the same bytes:
    // Qt's PDF writer orders fonts by hash, so the seed is fixed.
    QHashSeed::setDeterministicGlobalSeed();
    if (onlyText(argc, argv)) {
        QCoreApplication app(argc, argv);
        nameApplication();
        QCommandLineParser parser;
        describeOptions(parser);
        parser.process(app);  // prints the help or the version and exits
        return 0;
    }

    QApplication app(argc, argv);
    nameApplication();
    QApplication::setDesktopFileName(QStringLiteral(MODERATO_APP_ID));

    QCommandLineParser parser;
    describeOptions(parser);
    parser.process(app);

    moderato::ui::applyAppStyle(app);
    moderato::ui::MainWindow window;
    window.show();
    renameForTests(window);
    const QStringList files = parser.positionalArguments();
    const QString path = files.isEmpty() ? QString() : QFileInfo(files.front()).absoluteFilePath();
    QTimer::singleShot(0, &window, [&window, path] {
        // Edits a crashed session left come first; a file named here opens unless they were restored.
        const bool restoring = moderato::ui::offerRecovery(&window, moderato::ui::recoveryAnswerFromEnvironment());
        if (!path.isEmpty() && !restoring) window.openPath(path);
    });
    return app.exec();
}
