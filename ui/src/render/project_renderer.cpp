#include "render/project_renderer.hpp"

#include <QDir>
#include <QFileInfo>
#include <initializer_list>
#include <limits>
#include <set>

#include "common/figure_caption.hpp"
#include "export/figure_exporter.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "outputs/analysis_outputs.hpp"
#include "plots/figure_source.hpp"
#include "sections/checks_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"

namespace moderato::ui {
namespace {

class Writer {
public:
    Writer(QString root, std::set<QString> forbidden, RenderReport& report)
        : root_(std::move(root)), forbidden_(std::move(forbidden)), report_(report) {}

    void write(const QString& relative, const QByteArray& bytes) {
        const QString path = QDir(root_).filePath(relative);
        QDir().mkpath(QFileInfo(path).absolutePath());
        // The same file by another name (a symbolic link in the way) counts too.
        const QFileInfo target(path);
        if (forbidden_.count(target.absoluteFilePath()) ||
            (target.exists() && forbidden_.count(target.canonicalFilePath())))
            throw InputError(target.absoluteFilePath().toStdString() +
                             ": is one of the project's data files; render writes only new files, choose another "
                             "--out folder");
        write_file_atomically(path.toStdString(), bytes.toStdString());
        report_.files << relative;
    }

private:
    QString root_;
    std::set<QString> forbidden_;
    RenderReport& report_;
};

QString slug(const std::string& label) { return QString::fromStdString(file_slug(label)); }

const TableFormat kTableFormats[] = {TableFormat::Csv, TableFormat::Markdown, TableFormat::Latex, TableFormat::Html};

void writeFigure(Writer& out, const QString& stem, FigureSource* source, const FigureSettings& settings,
                 const QString& caption,
                 std::initializer_list<FigureFormat> formats = {FigureFormat::Png, FigureFormat::Svg,
                                                                FigureFormat::Pdf}) {
    const FigureExporter exporter(source, settings, caption);
    for (const FigureFormat f : formats) {
        const QByteArray bytes = exporter.render(f);
        if (bytes.isEmpty())
            throw std::runtime_error("could not draw " + source->figureName().toStdString() + " as " +
                                     figureFormatSuffix(f).toStdString());
        out.write(stem + QLatin1Char('.') + figureFormatSuffix(f), bytes);
    }
}

// The plot a kept figure names, if this run draws it.
FigureSource* keptFigure(AnalysisPage& page, const AnalysisRun& run, FigurePlot plot) {
    QList<FigureSource*> all = page.probe()->reportFigures(run);
    if (is_check_plot(plot)) {
        page.checks()->ensureComputed();
        all << page.checks()->figures();
    }
    for (FigureSource* f : all)
        if (f->figureKind() == plot) return f;
    return nullptr;
}

// The project's data files (never written by the renderer). Data that
// changed since the project was saved: say so, and stop unless told to go on.
std::set<QString> checkDataFiles(const LoadedProject& loaded, const RenderRequest& request, RenderReport& report) {
    QStringList changed;
    std::set<QString> dataFiles;
    for (const auto& d : loaded.project.datasets) {
        const QFileInfo data(QString::fromStdString(resolve_data_path(d, loaded.path)));
        dataFiles.insert(data.absoluteFilePath());
        if (!data.canonicalFilePath().isEmpty()) dataFiles.insert(data.canonicalFilePath());
        const auto now = loaded.sha256.find(d.id);
        if (!d.sha256.empty() && now != loaded.sha256.end() && now->second != d.sha256)
            changed << QString::fromStdString(
                changed_data_text(resolve_data_path(d, loaded.path), d.id, now->second, d.sha256));
    }
    if (!changed.isEmpty() && !request.acceptChangedData)
        throw InputError(
            "the data changed since the project was saved: " + changed.join(QStringLiteral("; ")).toStdString() +
            ". Check the new data, then run again with --accept-changed-data to render from it.");
    for (const QString& c : changed) report.warnings << QStringLiteral("rendering from changed data: ") + c;
    for (const auto& n : loaded.project.migration_notes) report.warnings << QString::fromStdString(n);

    return dataFiles;
}

}  // namespace

RenderReport renderProject(const RenderRequest& request) {
    RenderReport report;
    LoadedProject loaded = load_project(request.projectPath.toStdString(), {}, {}, request.passwords);
    const std::set<QString> dataFiles = checkDataFiles(loaded, request, report);

    const QString root = QFileInfo(request.outDir).absoluteFilePath();
    if (!QDir().mkpath(root)) throw InputError(request.outDir.toStdString() + ": cannot make the output folder");
    Writer out(root, dataFiles, report);

    ProjectDocument doc;
    for (const auto& [where, secret] : request.passwords) doc.setPassword(where, secret);  // fits in the database
    doc.adopt(std::move(loaded));
    AnalysisRunner runner(&doc);
    // Every fit on this thread, in order: showAnalysis() has the run (or its
    // error) ready when it returns, so nothing ever waits for a worker here.
    runner.setBackgroundThreshold(std::numeric_limits<double>::infinity());
    AnalysisPage page(&doc, &runner);
    page.setBackgroundThreshold(std::numeric_limits<double>::infinity());
    page.resize(1360, 860);

    const Project project = doc.project();
    std::set<QString> usedFolders;
    for (const Analysis& a : project.analyses) {
        const QString id = QString::fromStdString(a.id);
        page.showAnalysis(id);
        const auto run = runner.result(id);
        if (!run) {
            report.failures << QStringLiteral("%1: %2").arg(id, runner.error(id));
            continue;
        }
        QString folder = slug(a.id);
        for (int k = 2; usedFolders.count(folder); ++k) folder = slug(a.id) + QLatin1Char('-') + QString::number(k);
        usedFolders.insert(folder);
        // Each figure is drawn once as PNG: the file and the memo share the bytes.
        const QList<FigureSource*> figures = page.probe()->reportFigures(*run);
        std::vector<MemoFigure> pngs = memoFigures(a, *run, figures);
        for (qsizetype i = 0; i < figures.size(); ++i) {
            const QString stem = folder + QLatin1Char('/') + figureStem(figures[i]);
            out.write(stem + QStringLiteral(".png"), QByteArray::fromStdString(pngs[static_cast<std::size_t>(i)].png));
            writeFigure(out, stem, figures[i], a.figure, figureCaption(a, *run, figures[i]->figureKind()),
                        {FigureFormat::Svg, FigureFormat::Pdf});
        }
        for (const NamedTable& t : analysis_tables(a, *run))
            for (const TableFormat tf : kTableFormats)
                out.write(folder + QLatin1Char('/') + QString::fromStdString(t.key) + QLatin1Char('.') +
                              QString::fromStdString(table_format_suffix(tf)),
                          tableBytes(t.table, tf));
        const MemoOutput memo = buildMemo(doc, id, *run, std::move(pngs));
        out.write(folder + QStringLiteral("/memo.html"), QByteArray::fromStdString(memo.html));
        out.write(folder + QStringLiteral("/memo.md"), QByteArray::fromStdString(memo.markdown));
        out.write(folder + QStringLiteral("/memo.pdf"), memoPdf(memo.memo));
        // Kept figures of this analysis.
        for (const FigureEntry& fe : project.figures) {
            if (fe.analysis != a.id) continue;
            FigureSource* f = keptFigure(page, *run, fe.plot);
            if (!f) {
                report.warnings << QStringLiteral("kept figure %1 not drawn: its analysis has no %2 plot now")
                                       .arg(QString::fromStdString(fe.id), QString::fromLatin1(to_string(fe.plot)));
                continue;
            }
            writeFigure(out, QStringLiteral("figures/") + slug(fe.id), f, a.figure,
                        figureCaption(a, *run, f->figureKind()));
        }
    }
    return report;
}

}  // namespace moderato::ui
