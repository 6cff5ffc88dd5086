// The open project as the workbench holds it: the core Project, the loaded
// tables, the file path and the undo stack. Every edit goes through an undo
// command (model/project_commands.hpp); widgets never change the project
// directly. Signals tell views what changed.
#pragma once

#include <QObject>
#include <QString>
#include <QStringList>
#include <QUndoStack>
#include <map>
#include <memory>

#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/table.hpp"

namespace moderato {
struct ServerFit;
}

namespace moderato::ui {

class ProjectDocument : public QObject {
    Q_OBJECT
public:
    explicit ProjectDocument(QObject* parent = nullptr);

    const Project& project() const { return project_; }
    const Analysis* analysis(const QString& id) const;
    QString filePath() const { return path_; }  // empty: not saved yet
    QString displayName() const;                // file name or "Untitled project"
    QUndoStack* undoStack() { return &undo_; }
    bool isModified() const { return !undo_.isClean(); }

    // A dataset's table with its derived columns (nullptr when not loaded).
    std::shared_ptr<const Table> table(const std::string& datasetId) const;
    std::shared_ptr<const Table> baseTable(const std::string& datasetId) const;
    // Why the dataset's derived columns could not be computed (empty: fine).
    QString tableError(const std::string& datasetId) const;
    // Absolute path of a dataset's data file.
    // Passwords given this session for PostgreSQL addresses (never saved).
    void setPassword(const std::string& location, const std::string& password) { passwords_[location] = password; }
    const DatabasePasswords& passwords() const { return passwords_; }
    // Where a dataset's fits run in the database (its source, import options
    // and password); nullptr for every dataset read into Moderato.
    std::shared_ptr<const ServerFit> serverFit(const std::string& datasetId) const;

    // How a dataset's source is named on screen: the file's name, or for a
    // PostgreSQL source its table ("query" for a query) in its database.
    QString dataName(const std::string& id) const;
    // Where it is: the file's folder, or the PostgreSQL address.
    QString dataPlace(const std::string& id) const;
    QString dataPath(const std::string& datasetId) const;
    // SHA-256 of the data bytes the dataset's table was read from (empty: not known yet).
    std::string readHash(const std::string& datasetId) const;

    // Replaces everything with a loaded project (clears undo history).
    void adopt(LoadedProject loaded);
    void clear();  // a new, empty project

    // Adds a dataset read from `dataPath` (undoable); returns its id. Also adds
    // a first analysis of it with guessed roles (one undo step for both).
    // `sha256`: of the bytes the table was read from (empty: computed at save).
    // `place`: where in the file the table is (a workbook's sheet, an SQLite
    // table or query; its location is not used: `dataPath` is the file).
    // `inDatabase`: a PostgreSQL dataset whose fits run in the server (`table`
    // is then the sample read for plots).
    std::string addDataset(const QString& dataPath, const CsvOptions& import, std::shared_ptr<const Table> table,
                           const std::string& sha256 = {}, const SourceSpec& place = {}, bool inDatabase = false);

    // Edits (each one undo step). `mergeKey` non-empty: consecutive edits with
    // the same key merge into one step (typing, dragging).
    void setAnalysis(const Analysis& after, const QString& description, const QString& mergeKey = {});
    void setProject(const Project& after, const QString& description);

    // Saves to `path` (atomically), recording each data file's SHA-256 (of
    // the bytes that were read when the project was opened; of the file as it
    // is now for a dataset added since) and its path relative to the project.
    // InputError when writing fails or when `path` is one of the project's
    // data files (user data are never written); nothing changes then.
    void saveAs(const QString& path);

    // Points datasets at other data files (dataset id -> absolute path; a
    // data file the user located after it moved): one undo step. The path is
    // recorded relative to the project, as saving does; undo returns to the
    // old one. The tables stay as they are (they were read from the new files).
    void relocateData(const DataLocations& moved, const QString& description);
    // Used by that undo step only: sets the data files, without an undo step.
    void setDataLocations(const DataLocations& files);

    // Marks the document as holding unsaved edits (edits recovered after a crash).
    void markUnsaved() { undo_.resetClean(); }
    // Whether the next Save asks where to save (the project file changed on
    // disk since these edits were made); saving clears it.
    bool confirmSaveTarget() const { return confirmSaveTarget_; }
    void setConfirmSaveTarget(bool on) { confirmSaveTarget_ = on; }

    // Applies a state (used by undo commands only). A dataset's path and
    // SHA-256 record where its file is and what it held when the project was
    // last opened or saved: bookkeeping, not an edit, so they keep their
    // current values across undo and redo.
    void applyState(const Project& p);

Q_SIGNALS:
    void projectReset();                      // a different project is open
    void structureChanged();                  // datasets, analyses or figures added/removed/renamed
    void analysisChanged(const QString& id);  // any setting of one analysis
    void datasetChanged(const QString& id);   // derived columns of a dataset
    void filePathChanged(const QString& path);

private:
    void rebuildTable(const std::string& datasetId);

    Project project_;
    QString path_;
    QUndoStack undo_;
    std::map<std::string, std::shared_ptr<const Table>> base_, tables_;
    std::map<std::string, std::string> tableErrors_;
    std::map<std::string, std::string> absolutePaths_;  // dataset id -> absolute data path (unsaved projects)
    DatabasePasswords passwords_;                       // PostgreSQL address -> password, this session only
    std::map<std::string, std::string> readHashes_;     // dataset id -> SHA-256 of the bytes read at open
    struct Saved {
        std::string path, sha256;
    };
    std::map<std::string, Saved> saved_;  // dataset id -> path and hash as last opened/saved
    bool confirmSaveTarget_ = false;
};

// The name an analysis gets from its roles ("training_hours × route";
// "analysis" without a focal predictor). A name still equal to it follows
// the roles when they change (specify/role_edit); a name the user gave stays.
std::string roleBasedName(const Roles& roles);

// Guessed roles for a new analysis on a table: the first numeric column as
// Outcome, then a numeric Focal predictor and a Moderator (a grouping column
// when there is one), passing over columns that name rows (an "id", a level
// per row, a row number). Empty roles when the table has too few columns.
Analysis guess_analysis(const Table& table, const std::string& datasetId, const std::string& id);

}  // namespace moderato::ui
