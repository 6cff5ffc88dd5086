// The Memo section: the memo of the analysis as it will be saved — findings
// in plain words, the model, tables, figures, cautions and the
// reproducibility footer — in an editor, so the wording can be changed
// before saving. The analyst's notes (kept in the project, one undo step per
// burst of typing) go above the findings. Saves HTML (self-contained),
// Markdown (figures beside it), PDF, and the tables in four formats. Until
// the text is edited the files are exactly what `moderato-cli render` writes.
#pragma once

#include <QByteArray>
#include <memory>
#include <optional>

#include "outputs/analysis_outputs.hpp"
#include "sections/analysis_section.hpp"

class QComboBox;
class QLabel;
class QPlainTextEdit;
class QPushButton;
class QTextEdit;
class QVBoxLayout;

namespace moderato::ui {

class ProbeSection;

class MemoSection : public AnalysisSection {
    Q_OBJECT
public:
    MemoSection(ProjectDocument* doc, ProbeSection* probe, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;

    QTextEdit* editor() const { return editor_; }
    QPlainTextEdit* notesEdit() const { return notes_; }
    QComboBox* tableFormatChoice() const { return tableFormat_; }
    // Whether the memo text differs from the generated one.
    bool edited() const { return edited_; }
    // Builds the memo now if it is out of date (it is otherwise built when shown).
    void refresh();
    // The generated memo (nullopt while there is no run).
    const std::optional<MemoOutput>& output() const { return output_; }

    // Save without dialogs (the buttons ask for a path, then call these).
    // False with a message naming the file in `error` when writing fails.
    bool saveHtml(const QString& path, QString* error = nullptr);
    bool saveMarkdown(const QString& path, QString* error = nullptr);  // PNGs beside it
    bool savePdf(const QString& path, QString* error = nullptr);
    // Every table of the analysis into `folder` in the chosen format; the files written.
    bool saveTables(const QString& folder, TableFormat format, QStringList* written = nullptr,
                    QString* error = nullptr);
    // Back to the generated text.
    void restoreGenerated();
    // Asks for a file (or folder, for tables) and saves.
    enum SaveKind { SaveHtml, SaveMarkdown, SavePdf, SaveTables };
    void saveWithDialog(int kind);

Q_SIGNALS:
    void saved(const QString& path);

protected:
    void showEvent(QShowEvent* event) override;

private:
    // The constructor's steps: the side column (notes and saving, tables and
    // state) beside the editor, then the connections.
    void createNotesAndSave(QVBoxLayout* side);
    void createTablesAndState(QVBoxLayout* side);
    void connectSignals();
    void rebuild();
    void loadEditor();
    void notesEdited();
    void setEditedState(bool on);
    QByteArray editedHtml() const;
    // Whether `path` names one of the project's data files (then `error` says so).
    bool isDataFile(const QString& path, QString* error) const;
    bool write(const QString& path, const QByteArray& bytes, QString* error);

    ProbeSection* probe_;
    QString id_;
    std::shared_ptr<const AnalysisRun> run_;
    QString error_;
    bool stale_ = true;
    bool loading_ = false;
    bool edited_ = false;
    std::optional<MemoOutput> output_;
    // The figures drawn for the memo, and for which run and settings.
    std::vector<MemoFigure> figures_;
    std::shared_ptr<const AnalysisRun> figuresRun_;
    Analysis figuresFor_;
    QPlainTextEdit* notes_;
    QTextEdit* editor_;
    QLabel* state_;
    QLabel* message_;
    QPushButton* restore_;
    QComboBox* tableFormat_;
};

}  // namespace moderato::ui
