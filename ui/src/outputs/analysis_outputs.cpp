#include "outputs/analysis_outputs.hpp"

#include <QBrush>
#include <QBuffer>
#include <QColor>
#include <QFileInfo>
#include <QImage>
#include <QPageLayout>
#include <QPageSize>
#include <QPdfWriter>
#include <QTextCursor>
#include <QTextDocument>
#include <QTextFrame>
#include <QTextTable>
#include <QUrl>
#include <memory>

#include "common/figure_caption.hpp"
#include "export/figure_exporter.hpp"
#include "export/pdf_stamp.hpp"
#include "model/project_document.hpp"
#include "moderato/support/error.hpp"
#include "plots/figure_source.hpp"

namespace moderato::ui {

QString figureStem(FigureSource* figure) {
    return QString::fromStdString(file_slug(figure->figureName().toStdString()));
}

std::vector<std::pair<QString, QByteArray>> MemoOutput::pngs() const {
    std::vector<std::pair<QString, QByteArray>> out;
    for (const auto& f : memo.figures)
        out.emplace_back(QString::fromStdString(f.file), QByteArray::fromStdString(f.png));
    return out;
}

std::vector<MemoFigure> memoFigures(const Analysis& a, const AnalysisRun& run, const QList<FigureSource*>& sources) {
    std::vector<MemoFigure> figures;
    for (FigureSource* f : sources) {
        const QString caption = figureCaption(a, run, f->figureKind());
        MemoFigure mf;
        mf.title = f->figureName().toStdString();
        mf.file = figureStem(f).toStdString() + ".png";
        mf.png = FigureExporter(f, a.figure, caption).render(FigureFormat::Png).toStdString();
        mf.width_in = a.figure.width_in;
        mf.height_in = a.figure.height_in;
        figures.push_back(std::move(mf));
    }
    return figures;
}

MemoOutput buildMemo(const ProjectDocument& doc, const QString& analysisId, const AnalysisRun& run,
                     std::vector<MemoFigure> figures) {
    const Analysis* a = doc.analysis(analysisId);
    if (!a) throw InputError("no analysis has the id \"" + analysisId.toStdString() + "\"");
    MemoOutput out;
    MemoContext ctx;
    ctx.caption = figureCaption(*a, run).toStdString();
    ctx.project_file =
        doc.filePath().isEmpty() ? std::string("(not saved)") : QFileInfo(doc.filePath()).fileName().toStdString();
    if (const DataSource* d = doc.project().dataset(a->dataset)) {
        ctx.data_file = d->path;
        ctx.recorded_sha256 = d->sha256;
    }
    ctx.data_sha256 = doc.readHash(a->dataset);
    if (ctx.data_sha256.empty()) ctx.data_sha256 = "(computed when the project is saved)";
    out.memo = build_memo(doc.project(), *a, run, ctx, std::move(figures));
    out.html = memo_to_html(out.memo);
    out.markdown = memo_to_markdown(out.memo);
    return out;
}

void layoutMemoTables(QTextDocument& document) {
    for (QTextFrame* frame : document.rootFrame()->childFrames()) {
        auto* table = qobject_cast<QTextTable*>(frame);
        if (!table) continue;
        const int n = table->columns();
        QTextTableFormat format = table->format();
        format.setWidth(QTextLength(QTextLength::PercentageLength, 100));
        QList<QTextLength> widths;
        const double first = n == 2 ? 60 : n > 2 ? 30 : 100;
        for (int c = 0; c < n; ++c)
            widths << QTextLength(QTextLength::PercentageLength, c == 0 ? first : (100 - first) / (n - 1));
        format.setColumnWidthConstraints(widths);
        format.setBorderCollapse(true);
        format.setCellSpacing(0);
        format.setBorder(0);
        table->setFormat(format);
        // Rules as in a printed table: above and below the header, below the last row.
        const QBrush ink(QColor(0x1F, 0x2A, 0x44));
        for (int c = 0; c < n; ++c) {
            auto rule = [&](int row, bool top, bool bottom) {
                QTextTableCell cell = table->cellAt(row, c);
                QTextTableCellFormat f = cell.format().toTableCellFormat();
                if (top)
                    f.setTopBorder(1.2), f.setTopBorderBrush(ink),
                        f.setTopBorderStyle(QTextFrameFormat::BorderStyle_Solid);
                if (bottom)
                    f.setBottomBorder(bottom && row == 0 ? 0.8 : 1.2), f.setBottomBorderBrush(ink),
                        f.setBottomBorderStyle(QTextFrameFormat::BorderStyle_Solid);
                cell.setFormat(f);
            };
            if (table->rows() > 0) rule(0, true, true);
            if (table->rows() > 1) rule(table->rows() - 1, false, true);
            // Numbers stay whole ("0.0002768" never splits at the point); labels may wrap.
            if (c == 0) continue;
            for (int r = 1; r < table->rows(); ++r) {
                QTextCursor cursor = table->cellAt(r, c).firstCursorPosition();
                QTextBlockFormat block = cursor.blockFormat();
                block.setNonBreakableLines(true);
                cursor.setBlockFormat(block);
            }
        }
    }
}

void loadMemoDocument(QTextDocument& document, const Memo& memo) {
    document.clear();
    for (const auto& f : memo.figures) {
        QImage image;
        image.loadFromData(reinterpret_cast<const uchar*>(f.png.data()), static_cast<int>(f.png.size()), "PNG");
        document.addResource(QTextDocument::ImageResource, QUrl(QString::fromStdString(f.file)), image);
    }
    document.setHtml(QString::fromStdString(memo_to_html(memo, false)));
    layoutMemoTables(document);
}

QByteArray printToPdf(const QTextDocument& source, const QString& title) {
    std::unique_ptr<QTextDocument> text(source.clone());
    text->setDocumentMargin(0);
    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    {
        QPdfWriter writer(&buffer);
        prepareDeterministicPdf(writer, title);
        writer.setResolution(96);
        writer.setPageLayout(QPageLayout(QPageSize(QPageSize::Letter), QPageLayout::Portrait,
                                         QMarginsF(0.9, 0.9, 0.9, 0.9), QPageLayout::Inch));
        text->setPageSize(QSizeF(writer.width(), writer.height()));
        text->print(&writer);
    }
    QByteArray pdf = buffer.data();
    stabilisePdf(pdf);
    return pdf;
}

QByteArray memoPdf(const Memo& memo) {
    QTextDocument text;
    loadMemoDocument(text, memo);
    return printToPdf(text, QString::fromStdString(memo.title));
}

QByteArray tableBytes(const ExportTable& table, TableFormat format) {
    return QByteArray::fromStdString(table_to_text(table, format));
}

}  // namespace moderato::ui
