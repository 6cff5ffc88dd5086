// The Moderato workbench.
#include <QApplication>
#include <QCommandLineParser>
#include <QCoreApplication>
#include <QFileInfo>
#include <QHashSeed>
#include <QTimer>

#include <cstring>

#include "shell/app_style.hpp"
#include "shell/main_window.hpp"

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
    const QStringList files = parser.positionalArguments();
    if (!files.isEmpty()) {
        const QString path = QFileInfo(files.front()).absoluteFilePath();
        QTimer::singleShot(0, &window, [&window, path] { window.openPath(path); });
    }
    return app.exec();
}
