// Importing a delimited text file, a workbook's sheet or an SQLite table or
// query: options with a live preview, then the full load in a worker thread
// with progress and Cancel. A workbook offers its sheets, a database its
// tables and a query box (SourceChoice); the delimiter and decimal mark are
// for text files only, the header row for text files and workbooks.
//
// The preview reads only the file's first records (core read_csv_text on
// them) and is read again after every change of an option; a parse error is
// shown in the dialog, never in a message box. Load reads the whole file in
// a BackgroundJob while a progress bar runs; Cancel stops it and keeps the
// dialog open. The user's file is only ever read.
#pragma once

#include <QDialog>
#include <map>
#include <memory>
#include <set>
#include <string>
#include <vector>

#include "moderato/reading/csv.hpp"
#include "moderato/reading/data_source.hpp"
#include "moderato/reading/table.hpp"

class QCheckBox;
class QComboBox;
class QDialogButtonBox;
class QGroupBox;
class QLabel;
class QLineEdit;
class QListWidget;
class QProgressBar;
class QPushButton;
class QTableView;
class QTableWidget;
class QTimer;
class QVBoxLayout;

namespace moderato::ui {

class BackgroundJob;
class SourceChoice;
class TableModel;
struct CsvHead;

class ImportDialog : public QDialog {
    Q_OBJECT
public:
    // Records read for the preview (the header and about 200 data rows).
    static constexpr std::size_t kPreviewRecords = 201;

    // A load still running when the dialog goes is stopped by its job.
    explicit ImportDialog(const QString& path, QWidget* parent = nullptr);
    // A PostgreSQL server connected to (PostgresDialog): its address, the
    // password given for this session (empty: the password file), and its tables.
    ImportDialog(const std::string& location, const std::string& password, const std::vector<std::string>& tables,
                 QWidget* parent = nullptr);
    ~ImportDialog() override;

    QString path() const { return path_; }
    // Where the table is: the file's kind with the sheet, table or query chosen.
    SourceSpec source() const;
    // The sheet/table/query choice (nullptr for a text file).
    SourceChoice* sourceChoice() const { return sourceChoice_; }
    // The options the table was read with (after Load), else the current ones.
    CsvOptions options() const { return table_ ? options_ : currentOptions(); }
    // The whole table, read when the dialog was accepted.
    std::shared_ptr<const Table> table() const { return table_; }
    // PostgreSQL: fits run in the server, and the table read is a sample.
    bool inDatabase() const;
    QCheckBox* inDatabaseChoice() const { return inDatabase_; }
    // What identifies the rows read from a PostgreSQL source (empty for files).
    const std::string& fingerprint() const { return fingerprint_; }

    // The options as the widgets set them now.
    CsvOptions currentOptions() const;
    // The table of the preview (nullptr when the preview could not be read).
    const Table* previewTable() const;
    TableModel* previewModel() const { return previewModel_; }
    // The text under the preview: what the preview shows, or the error.
    QString message() const;
    bool messageIsError() const { return messageIsError_; }
    // The notes on columns with cells of text among numbers (under the preview).
    QWidget* textNotes() const { return textNotes_; }
    bool isLoading() const;

public Q_SLOTS:
    // Reads the preview again now (option changes call it on the next turn
    // of the event loop).
    void refreshPreview();
    // Loads the whole file in a worker; the dialog is accepted when it succeeds.
    void startLoad();
    // Stops a load in progress (the dialog stays open); closes the dialog otherwise.
    void reject() override;

private:
    struct LoadResult {
        std::shared_ptr<const Table> table;
        std::string fingerprint;
        QString error;
        bool cancelled = false;
    };

    void buildUi();
    // The file's name, or the server's address, in messages.
    QString sourceName() const;
    QWidget* createFileLabel();
    QWidget* createReadingOptions();
    QWidget* createMissingValues();
    QWidget* createPreview();
    void createFooter(QVBoxLayout* layout);
    void connectSignals();
    // The preview table of the file's first records, read with `base` (and
    // the decimal mark guessed, the column types applied). Throws InputError.
    std::shared_ptr<const Table> readPreview(const CsvHead& head, const CsvOptions& base);
    // The preview of a workbook's sheet or a database's table or query (its
    // first rows). Throws InputError.
    std::shared_ptr<const Table> readSourcePreview(const CsvOptions& base);
    void refreshSourcePreview(const CsvOptions& base);
    void showPreview(const std::shared_ptr<const Table>& shown, bool wholeFile);
    void schedulePreview();
    void setMessage(const QString& text, bool error);
    void rebuildKinds(const Table& base);
    // The "Missing" column of the column list, from the table on show.
    void updateMissingCounts(const Table& shown);
    // Notes under the preview: columns read as categorical only because of a
    // few cells of text (each with a button to read it as numbers), and
    // columns whose text cells are read as missing.
    void updateTextNotes(const Table& plain, const Table& shown);
    // Sets a column's "Read as" choice as the user would (the preview follows).
    void chooseKind(const std::string& column, int choice);
    void loadFinished(const LoadResult& result, bool cancelled);
    void setLoading(bool on);
    // The options without the per-column overrides; false (with a message in
    // `why`) when the widgets do not give a usable delimiter.
    bool baseOptions(CsvOptions& out, QString& why) const;

    QString path_;  // the file, or a PostgreSQL address
    SourceKind kind_ = SourceKind::TextFile;
    std::string password_;  // PostgreSQL, this session only (wiped when the dialog goes)
    std::vector<std::string> serverTables_;
    std::string fingerprint_;
    SourceChoice* sourceChoice_ = nullptr;
    QCheckBox* inDatabase_ = nullptr;  // PostgreSQL only
    QGroupBox* reading_ = nullptr;
    SourceSpec loadingSource_;
    CsvOptions options_;
    std::shared_ptr<const Table> table_;

    // Per-column type chosen by the user (by column name; absent = automatic),
    // and the columns read as numbers with their text cells missing.
    std::map<std::string, ColumnKind> kinds_;
    std::set<std::string> textMissing_;
    // The preview as read with the automatic types (for the notes).
    std::shared_ptr<const Table> plain_;
    std::vector<std::string> previewNames_;

    QComboBox* delimiter_ = nullptr;
    QLineEdit* otherDelimiter_ = nullptr;
    QCheckBox* header_ = nullptr;
    QComboBox* decimal_ = nullptr;
    QLabel* decimalNote_ = nullptr;  // "found in the file" while the mark is guessed
    QListWidget* missing_ = nullptr;
    QPushButton* addMissing_ = nullptr;
    QPushButton* removeMissing_ = nullptr;
    QTableView* preview_ = nullptr;
    TableModel* previewModel_ = nullptr;
    QTableWidget* kindsList_ = nullptr;
    QWidget* textNotes_ = nullptr;
    QLabel* message_ = nullptr;
    QProgressBar* progress_ = nullptr;
    QDialogButtonBox* buttons_ = nullptr;
    QPushButton* loadButton_ = nullptr;
    QPushButton* cancelButton_ = nullptr;
    QTimer* previewTimer_ = nullptr;
    bool messageIsError_ = false;
    bool loading_ = false;
    bool decimalChosen_ = false;  // the user chose the decimal mark (else it follows the file)

    BackgroundJob* job_ = nullptr;  // the load in progress
    CsvOptions loadingOptions_;
};

}  // namespace moderato::ui
