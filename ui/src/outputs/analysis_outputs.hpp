// What an analysis exports — its figures, tables and memo — built the same
// way for the workbench (File ▸ Memo, table export) and for the headless
// `moderato-cli render`, so both write the same bytes.
#pragma once

#include <QByteArray>
#include <QList>
#include <QString>
#include <string>
#include <vector>

#include "moderato/project/analysis_run.hpp"
#include "moderato/reporting/memo.hpp"
#include "moderato/reporting/table_export.hpp"

class QTextDocument;

namespace moderato::ui {

class FigureSource;
class ProjectDocument;

// A file stem for a figure: "lines-plot", "effect-plot", ...
QString figureStem(FigureSource* figure);

struct MemoOutput {
    Memo memo;
    std::string html;      // self-contained
    std::string markdown;  // names the figures' PNG files
    // The figures as (file name beside the Markdown memo, PNG bytes).
    std::vector<std::pair<QString, QByteArray>> pngs() const;
};

// The memo's figures (ProbeSection::reportFigures) as PNG at the analysis's
// figure settings, with its caption: the bytes File ▸ Export Figure writes.
// The figures must show this analysis.
std::vector<MemoFigure> memoFigures(const Analysis& analysis, const AnalysisRun& run,
                                    const QList<FigureSource*>& figures);

// The memo of an analysis from its run and its figures (memoFigures).
MemoOutput buildMemo(const ProjectDocument& doc, const QString& analysisId, const AnalysisRun& run,
                     std::vector<MemoFigure> figures);

// Loads a memo into a rich-text document (figures as resources) and lays
// its tables over the text width: Qt's HTML reader sizes tables by their
// narrowest content and breaks words, so the first column gets 30 % and the
// others equal shares.
void loadMemoDocument(QTextDocument& document, const Memo& memo);
// Gives every table of a rich-text document the text width and the column shares above.
void layoutMemoTables(QTextDocument& document);

// A rich-text document printed to PDF (Letter, 0.9 in margins); the same
// bytes for the same document.
QByteArray printToPdf(const QTextDocument& document, const QString& title);
// The memo printed to PDF by Qt's rich-text engine (letter-width page,
// figures at their size); the same bytes for the same memo.
QByteArray memoPdf(const Memo& memo);

// A table in a format, as bytes (UTF-8).
QByteArray tableBytes(const ExportTable& table, TableFormat format);

}  // namespace moderato::ui
