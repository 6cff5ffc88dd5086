// moderato-cli render PROJECT --out DIR [--accept-changed-data]: the
// project's figures, tables and memos without a display (Qt's offscreen
// platform), drawn by the workbench's own widgets and exporters.
#include <QApplication>
#include <QDir>
#include <QHashSeed>
#include <iostream>

#include "../commands.hpp"
#include "../password_prompt.hpp"
#include "moderato/support/error.hpp"
#include "render/project_renderer.hpp"
#include "shell/app_style.hpp"

namespace moderato::cli {

int run_render(const std::vector<std::string>& args) {
    std::string project, out;
    bool accept = false;
    for (std::size_t i = 0; i < args.size(); ++i) {
        const std::string& a = args[i];
        if (a == "--out") {
            if (i + 1 >= args.size()) throw InputError("--out needs a folder");
            out = args[++i];
        } else if (a == "--accept-changed-data") {
            accept = true;
        } else if (a.rfind("--", 0) == 0) {
            throw InputError("render: unknown option " + a + " (options: --out DIR, --accept-changed-data)");
        } else if (project.empty()) {
            project = a;
        } else {
            throw InputError("render: one project at a time ('" + project + "' and '" + a + "' given)");
        }
    }
    if (project.empty()) throw InputError("render: name a project file (moderato-cli render PROJECT --out DIR)");
    if (out.empty()) throw InputError("render: --out DIR is required (the folder the files go to)");

    // No display needed: always the offscreen platform, so a render looks
    // the same on a desktop, a server or in CI. Qt's PDF writer lists fonts
    // in hash order: a fixed seed makes that order, and so the bytes, repeatable.
    QHashSeed::setDeterministicGlobalSeed();
    qputenv("QT_QPA_PLATFORM", "offscreen");
    qInstallMessageHandler([](QtMsgType type, const QMessageLogContext&, const QString& message) {
        // Harmless on a headless machine; not worth a line on stderr.
        if (message.startsWith(QLatin1String("QStandardPaths: XDG_RUNTIME_DIR not set"))) return;
        std::cerr << (type == QtWarningMsg ? "moderato-cli: Qt: " : "moderato-cli: ") << message.toStdString() << "\n";
    });
    static int argc = 1;
    static char name[] = "moderato-cli";
    static char* argv[] = {name, nullptr};
    QApplication app(argc, argv);
    QApplication::setApplicationName(QStringLiteral("Moderato"));
    QApplication::setApplicationVersion(QStringLiteral(MODERATO_VERSION));
    moderato::ui::applyAppStyle(app);

    moderato::ui::RenderRequest request;
    request.projectPath = QString::fromStdString(project);
    request.outDir = QString::fromStdString(out);
    request.acceptChangedData = accept;
    request.passwords = typed_passwords();
    const moderato::ui::RenderReport report = moderato::ui::renderProject(request);
    for (const QString& w : report.warnings) std::cerr << "moderato-cli: warning: " << w.toStdString() << "\n";
    for (const QString& f : report.files)
        std::cout << QDir::toNativeSeparators(QDir(request.outDir).filePath(f)).toStdString() << "\n";
    for (const QString& f : report.failures) std::cerr << "moderato-cli: not rendered: " << f.toStdString() << "\n";
    if (!report.failures.isEmpty()) return 2;
    return 0;
}

}  // namespace moderato::cli
