#include "sections/memo_section.hpp"

#include <QBuffer>
#include <QComboBox>
#include <QDir>
#include <QFileDialog>
#include <QFileInfo>
#include <QHBoxLayout>
#include <QImage>
#include <QLabel>
#include <QPageLayout>
#include <QPageSize>
#include <QPdfWriter>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QTextDocument>
#include <QTextEdit>
#include <QTimer>
#include <QUrl>
#include <QVBoxLayout>

#include "export/pdf_stamp.hpp"
#include "model/project_document.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "sections/probe_section.hpp"

namespace moderato::ui {
MemoSection::MemoSection(ProjectDocument* doc, ProbeSection* probe, QWidget* parent)
    : AnalysisSection(doc, parent),
      probe_(probe),
      notes_(new QPlainTextEdit(this)),
      editor_(new QTextEdit(this)),
      state_(new QLabel(this)),
      message_(new QLabel(this)),
      restore_(new QPushButton(tr("Restore generated text"), this)),
      tableFormat_(new QComboBox(this)) {
    auto* layout = new QHBoxLayout(this);
    layout->setContentsMargins(0, 4, 0, 0);

    auto* side = new QVBoxLayout;
    createNotesAndSave(side);
    createTablesAndState(side);
    auto* sideWidget = new QWidget(this);
    sideWidget->setLayout(side);
    sideWidget->setFixedWidth(270);
    layout->addWidget(sideWidget);

    editor_->setObjectName(QStringLiteral("memo-editor"));
    editor_->setAcceptRichText(true);
    editor_->document()->setDocumentMargin(16);
    layout->addWidget(editor_, 1);

    connectSignals();
    setEditedState(false);
}

// The notes box and the buttons that save the memo.
void MemoSection::createNotesAndSave(QVBoxLayout* side) {
    auto* notesLabel =
        new QLabel(tr("<b>Notes</b> — your own words, printed above the findings and kept in the project"), this);
    notesLabel->setWordWrap(true);
    side->addWidget(notesLabel);
    notes_->setObjectName(QStringLiteral("memo-notes"));
    notes_->setPlaceholderText(tr("Who asked, what was decided, what to check next…"));
    notes_->setMaximumHeight(180);
    side->addWidget(notes_);
    side->addSpacing(8);
    auto* saveLabel = new QLabel(tr("<b>Save the memo</b>"), this);
    side->addWidget(saveLabel);
    const struct {
        QString text;
        QString name;
        int kind;
    } buttons[] = {{tr("As HTML…"), QStringLiteral("memo-save-html"), SaveHtml},
                   {tr("As Markdown…"), QStringLiteral("memo-save-markdown"), SaveMarkdown},
                   {tr("Print to PDF…"), QStringLiteral("memo-save-pdf"), SavePdf}};
    for (const auto& b : buttons) {
        auto* button = new QPushButton(b.text, this);
        button->setObjectName(b.name);
        const int kind = b.kind;
        connect(button, &QPushButton::clicked, this, [this, kind] { saveWithDialog(kind); });
        side->addWidget(button);
    }
}

// The table format and Save Tables, then the memo's state, Restore and messages.
void MemoSection::createTablesAndState(QVBoxLayout* side) {
    side->addSpacing(8);
    side->addWidget(new QLabel(tr("<b>Tables</b>"), this));
    tableFormat_->setObjectName(QStringLiteral("memo-table-format"));
    tableFormat_->addItem(tr("CSV (for spreadsheets)"), static_cast<int>(TableFormat::Csv));
    tableFormat_->addItem(tr("Markdown"), static_cast<int>(TableFormat::Markdown));
    tableFormat_->addItem(tr("LaTeX (booktabs)"), static_cast<int>(TableFormat::Latex));
    tableFormat_->addItem(tr("HTML"), static_cast<int>(TableFormat::Html));
    side->addWidget(tableFormat_);
    auto* tables = new QPushButton(tr("Save Tables…"), this);
    tables->setObjectName(QStringLiteral("memo-save-tables"));
    connect(tables, &QPushButton::clicked, this, [this] { saveWithDialog(SaveTables); });
    side->addWidget(tables);
    side->addSpacing(8);
    state_->setObjectName(QStringLiteral("memo-state"));
    state_->setWordWrap(true);
    side->addWidget(state_);
    restore_->setObjectName(QStringLiteral("memo-restore"));
    side->addWidget(restore_);
    message_->setObjectName(QStringLiteral("memo-message"));
    message_->setWordWrap(true);
    message_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    side->addWidget(message_);
    side->addStretch(1);
}

void MemoSection::connectSignals() {
    connect(editor_, &QTextEdit::textChanged, this, [this] {
        if (!loading_ && output_) setEditedState(true);
    });
    connect(restore_, &QPushButton::clicked, this, &MemoSection::restoreGenerated);
    connect(notes_, &QPlainTextEdit::textChanged, this, &MemoSection::notesEdited);
    // Notes and probe settings change the memo without a new run: rebuild
    // (after a pause, so typing stays quick).
    auto* later = new QTimer(this);
    later->setSingleShot(true);
    later->setInterval(400);
    connect(later, &QTimer::timeout, this, [this] {
        if (isVisible()) rebuild();
    });
    connect(doc_, &ProjectDocument::analysisChanged, this, [this, later](const QString& id) {
        if (id != id_) return;
        stale_ = true;
        if (const Analysis* a = doc_->analysis(id_); a && notes_->toPlainText().toStdString() != a->memo_notes) {
            loading_ = true;
            notes_->setPlainText(QString::fromStdString(a->memo_notes));
            loading_ = false;
        }
        later->start();
    });
}

void MemoSection::showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) {
    if (id != id_) edited_ = false;
    const bool same = id == id_ && run == run_ && error == error_;
    id_ = id;
    run_ = std::move(run);
    error_ = error;
    if (const Analysis* a = doc_->analysis(id_); a && notes_->toPlainText().toStdString() != a->memo_notes) {
        loading_ = true;
        notes_->setPlainText(QString::fromStdString(a->memo_notes));
        loading_ = false;
    }
    if (same && !stale_) return;
    stale_ = true;
    if (isVisible()) rebuild();
}

void MemoSection::showEvent(QShowEvent* event) {
    AnalysisSection::showEvent(event);
    if (stale_) rebuild();
}

void MemoSection::refresh() {
    if (stale_) rebuild();
}

void MemoSection::rebuild() {
    stale_ = false;
    if (!run_ || !doc_->analysis(id_)) {
        output_.reset();
        loading_ = true;
        editor_->setPlainText(error_.isEmpty() ? tr("Fitting…") : error_);
        loading_ = false;
        setEditedState(false);
        return;
    }
    try {
        // Notes change the text, not the figures: redraw them only when what
        // they show (the run or any other setting) changed.
        Analysis shown = *doc_->analysis(id_);
        shown.memo_notes.clear();
        if (run_ != figuresRun_ || !(shown == figuresFor_)) {
            figures_ = memoFigures(shown, *run_, probe_->reportFigures(*run_));
            figuresRun_ = run_;
            figuresFor_ = shown;
        }
        output_ = buildMemo(*doc_, id_, *run_, figures_);
    } catch (const std::exception& e) {
        output_.reset();
        loading_ = true;
        editor_->setPlainText(tr("The memo could not be written: %1").arg(QString::fromUtf8(e.what())));
        loading_ = false;
        return;
    }
    if (!edited_) loadEditor();
    else
        state_->setText(
            tr("<b>Edited.</b> New results and notes are not in your edited text; "
               "restore the generated text to see them."));
}

void MemoSection::loadEditor() {
    loading_ = true;
    loadMemoDocument(*editor_->document(), output_->memo);
    loading_ = false;
    setEditedState(false);
}

void MemoSection::restoreGenerated() {
    edited_ = false;
    if (stale_ || !output_) rebuild();
    else loadEditor();
}

void MemoSection::setEditedState(bool on) {
    edited_ = on;
    restore_->setEnabled(on);
    state_->setText(on ? tr("<b>Edited.</b> Saving writes your text. The project keeps only the notes: a re-run "
                            "(or <i>moderato-cli render</i>) writes the generated memo.")
                       : tr("Generated from the results; edit freely before saving."));
}

void MemoSection::notesEdited() {
    if (loading_) return;
    const Analysis* a = doc_->analysis(id_);
    if (!a) return;
    Analysis after = *a;
    after.memo_notes = notes_->toPlainText().toStdString();
    if (after.memo_notes == a->memo_notes) return;
    doc_->setAnalysis(after, tr("Edit memo notes"), QStringLiteral("memo-notes:") + id_);
}

QByteArray MemoSection::editedHtml() const {
    // Qt's HTML names the figures by their resource names: embed them, so the
    // file stays self-contained. Its HTML 4 doctype names a DTD by URL: the
    // plain HTML5 doctype instead, so the file refers to nothing outside it.
    QString html = editor_->document()->toHtml();
    static const QRegularExpression doctype(QStringLiteral("^<!DOCTYPE[^>]*>"),
                                            QRegularExpression::CaseInsensitiveOption);
    html.replace(doctype, QStringLiteral("<!DOCTYPE html>"));
    if (output_)
        for (const auto& [file, png] : output_->pngs())
            html.replace(QStringLiteral("src=\"%1\"").arg(file),
                         QStringLiteral("src=\"data:image/png;base64,%1\"").arg(QString::fromLatin1(png.toBase64())));
    return html.toUtf8();
}

bool MemoSection::isDataFile(const QString& path, QString* error) const {
    // The same file by another name (a symbolic link, "..") counts too.
    const QFileInfo target(path);
    for (const auto& d : doc_->project().datasets) {
        const QFileInfo data(doc_->dataPath(d.id));
        if (data.absoluteFilePath() == target.absoluteFilePath() ||
            (target.exists() && data.canonicalFilePath() == target.canonicalFilePath())) {
            if (error) *error = tr("%1 is a data file of this project; Moderato never writes over data.").arg(path);
            return true;
        }
    }
    return false;
}

bool MemoSection::write(const QString& path, const QByteArray& bytes, QString* error) {
    if (isDataFile(path, error)) return false;
    try {
        write_file_atomically(path.toStdString(), bytes.toStdString());
    } catch (const std::exception& e) {
        if (error) *error = QString::fromUtf8(e.what());
        return false;
    }
    return true;
}

bool MemoSection::saveHtml(const QString& path, QString* error) {
    refresh();
    if (!output_) {
        if (error) *error = tr("There is no memo yet: the analysis has no results.");
        return false;
    }
    const QByteArray bytes = edited_ ? editedHtml() : QByteArray::fromStdString(output_->html);
    if (!write(path, bytes, error)) return false;
    Q_EMIT saved(path);
    return true;
}

bool MemoSection::saveMarkdown(const QString& path, QString* error) {
    refresh();
    if (!output_) {
        if (error) *error = tr("There is no memo yet: the analysis has no results.");
        return false;
    }
    if (isDataFile(path, error)) return false;  // before any figure is written beside it
    const QDir dir = QFileInfo(path).absoluteDir();
    for (const auto& [file, png] : output_->pngs())
        if (!write(dir.filePath(file), png, error)) return false;
    const QByteArray bytes =
        edited_ ? editor_->document()->toMarkdown().toUtf8() : QByteArray::fromStdString(output_->markdown);
    if (!write(path, bytes, error)) return false;
    Q_EMIT saved(path);
    return true;
}

bool MemoSection::savePdf(const QString& path, QString* error) {
    refresh();
    if (!output_) {
        if (error) *error = tr("There is no memo yet: the analysis has no results.");
        return false;
    }
    const QByteArray pdf = edited_ ? printToPdf(*editor_->document(), QString::fromStdString(output_->memo.title))
                                   : memoPdf(output_->memo);
    if (!write(path, pdf, error)) return false;
    Q_EMIT saved(path);
    return true;
}

bool MemoSection::saveTables(const QString& folder, TableFormat format, QStringList* written, QString* error) {
    refresh();
    if (!output_) {
        if (error) *error = tr("There are no tables yet: the analysis has no results.");
        return false;
    }
    const Analysis* a = doc_->analysis(id_);
    const QString stem = QString::fromStdString(file_slug(a ? a->id : std::string("analysis")));
    const QDir dir(folder);
    for (const NamedTable& t : output_->memo.tables) {
        const QString path = dir.filePath(
            QStringLiteral("%1-%2.%3")
                .arg(stem, QString::fromStdString(t.key), QString::fromStdString(table_format_suffix(format))));
        if (!write(path, tableBytes(t.table, format), error)) return false;
        if (written) *written << path;
    }
    Q_EMIT saved(folder);
    return true;
}

void MemoSection::saveWithDialog(int kind) {
    const Analysis* a = doc_->analysis(id_);
    const QString base = QString::fromStdString(file_slug(a ? a->name : std::string("memo")));
    // Beside the project file; not saved yet, beside the analysis's data file.
    const QString beside = !doc_->filePath().isEmpty() ? doc_->filePath() : a ? doc_->dataPath(a->dataset) : QString();
    const QString startDir = beside.isEmpty() ? QDir::homePath() : QFileInfo(beside).absolutePath();
    QString error, path;
    bool ok = false;
    switch (kind) {
        case SaveHtml:
            path = QFileDialog::getSaveFileName(this, tr("Save memo as HTML"),
                                                QDir(startDir).filePath(base + QStringLiteral(".html")),
                                                tr("HTML (*.html)"));
            if (!path.isEmpty()) ok = saveHtml(path, &error);
            break;
        case SaveMarkdown:
            path = QFileDialog::getSaveFileName(this, tr("Save memo as Markdown"),
                                                QDir(startDir).filePath(base + QStringLiteral(".md")),
                                                tr("Markdown (*.md)"));
            if (!path.isEmpty()) ok = saveMarkdown(path, &error);
            break;
        case SavePdf:
            path =
                QFileDialog::getSaveFileName(this, tr("Print memo to PDF"),
                                             QDir(startDir).filePath(base + QStringLiteral(".pdf")), tr("PDF (*.pdf)"));
            if (!path.isEmpty()) ok = savePdf(path, &error);
            break;
        case SaveTables: {
            path = QFileDialog::getExistingDirectory(this, tr("Save tables into folder"), startDir);
            QStringList files;
            if (!path.isEmpty())
                ok = saveTables(path, static_cast<TableFormat>(tableFormat_->currentData().toInt()), &files, &error);
            if (ok)
                message_->setText(tr("Saved %n table(s) to %1", nullptr, static_cast<int>(files.size()))
                                      .arg(QDir::toNativeSeparators(path)));
            break;
        }
    }
    if (path.isEmpty()) return;
    if (!ok) message_->setText(tr("Not saved: %1").arg(error));
    else if (kind != SaveTables) message_->setText(tr("Saved to %1").arg(QDir::toNativeSeparators(path)));
}

}  // namespace moderato::ui
