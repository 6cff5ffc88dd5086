// The Moderato workbench.
#include <QApplication>
#include <QCommandLineParser>
#include <QFileInfo>
#include <QTimer>

#include "shell/main_window.hpp"
#include "shell/app_style.hpp"

int main(int argc, char* argv[]) {
    QApplication app(argc, argv);
    QApplication::setOrganizationName(QStringLiteral("Moderato"));
    QApplication::setApplicationName(QStringLiteral("Moderato"));
    QApplication::setApplicationVersion(QStringLiteral(MODERATO_VERSION));
    QApplication::setDesktopFileName(QStringLiteral("moderato"));

    QCommandLineParser parser;
    parser.setApplicationDescription(
        QStringLiteral("Moderato: a workbench for moderated effects in regression (interaction terms, conditional "
                       "effects, Johnson–Neyman regions)."));
    parser.addHelpOption();
    parser.addVersionOption();
    parser.addPositionalArgument(QStringLiteral("file"),
                                 QStringLiteral("A project (.moderato) or a data file (CSV/TSV) to open."), QStringLiteral("[file]"));
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
