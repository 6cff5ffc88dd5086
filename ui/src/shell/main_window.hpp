// The main window: menus, the Project sidebar, and the page of the selected
// dataset or analysis. Opens projects and data files (menu, command line,
// drag and drop), saves projects, remembers recent files and window state.
//
// Opening a project or reading a data file is long work: it runs in a
// BackgroundJob while the window stays live, with a progress dialog and
// Cancel; loadFinished() says how it ended. Until then the open project is
// untouched, and a cancelled or failed load leaves it as it was.
#pragma once

#include <QMainWindow>
#include <QStringList>
#include <functional>
#include <memory>
#include <optional>
#include <string>

#include "common/background_job.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/csv.hpp"

class QAction;
class QStackedWidget;
class QMenu;
class QMessageBox;
class QLabel;

namespace moderato::ui {

class UserGuide;

class AnalysisPage;
class AnalysisRunner;
class DatasetPage;
class ImportDialog;
class ProjectDocument;
class ProjectSidebar;
class RecoveryStore;
struct LoadOutcome;

class MainWindow : public QMainWindow {
    Q_OBJECT
public:
    // How a load ended.
    enum LoadResult { Loaded, Failed, Cancelled };
    Q_ENUM(LoadResult)

    explicit MainWindow(QWidget* parent = nullptr);
    ~MainWindow() override;

    ProjectDocument* document() const { return doc_; }
    AnalysisRunner* runner() const { return runner_; }
    ProjectSidebar* sidebar() const { return sidebar_; }
    AnalysisPage* analysisPage() const { return analysisPage_; }
    DatasetPage* datasetPage() const { return datasetPage_; }
    RecoveryStore* recovery() const { return recovery_; }

    // Opens a project (.moderato) or imports a data file (with the import
    // dialog when interactive). Returns at once; the file is read in a worker
    // and loadFinished() follows (failures are reported then).
    void openPath(const QString& path);
    void openProject(const QString& path);
    // The same for a project held in memory (`project`, e.g. recovered edits;
    // null: read `path`), reading datasets listed in `moved` from those files.
    // `adopted` runs once the document holds it. `passwords`: for PostgreSQL
    // datasets, besides those given earlier in this session.
    void openProjectFrom(const QString& path, std::shared_ptr<const Project> project, const DataLocations& moved,
                         std::function<void()> adopted = {}, const DatabasePasswords& passwords = {});
    // Asked when a project's data file is missing: the dataset id, the path the
    // project records and the file looked for; returns the chosen file (empty:
    // cancel). Interactive windows ask with a file chooser (shell/locate_data).
    using DataLocator = std::function<QString(const QString& dataset, const QString& recorded, const QString& file)>;
    void setDataLocator(DataLocator locator) { locator_ = std::move(locator); }
    // Asked when a project's PostgreSQL server wants a password: its address;
    // returns the password, or nothing to cancel. Interactive windows ask in a
    // password box. Passwords are kept in memory for this session only.
    using PasswordAsker = std::function<std::optional<QString>(const QString& location)>;
    void setPasswordAsker(PasswordAsker asker) { passwordAsker_ = std::move(asker); }
    // File › Connect to PostgreSQL…: the connection dialog, then the import
    // dialog for the server's table or query.
    void connectToDatabase();
    // Reads a data file with these options (no dialog) and adds it as a
    // dataset; asynchronous like openProject().
    void importData(const QString& path, const CsvOptions& options);
    // Whether a project or data file is being read, and stopping it (the
    // project stays as it was).
    bool isLoading() const { return load_ != nullptr; }
    void cancelLoad();
    // How long a load runs before its progress dialog opens (ms; 0: at once).
    void setProgressDelay(int ms) { progressDelayMs_ = ms; }
    bool save();
    bool saveAs(const QString& path);

    void showAnalysis(const QString& id);
    void showDataset(const QString& id);
    // File › New Analysis: a new analysis of the dataset on show (or of the
    // shown analysis's dataset, else the first), shown; empty id when there is no data.
    QString newAnalysis();
    // Help › User Guide (created on first use).
    UserGuide* showUserGuide();

    // Non-interactive mode (tests, scripts): messages are recorded instead of
    // shown in dialogs, and no dialog asks anything.
    void setInteractive(bool on) { interactive_ = on; }
    QString lastMessage() const { return lastMessage_; }
    // Tells the user (a dialog when interactive) and records it as lastMessage().
    void report(const QString& title, const QString& text, bool warning = true);

Q_SIGNALS:
    void messageReported(const QString& title, const QString& text);
    // The load of `path` progressed (thousandths) or ended.
    void loadProgress(int permille);
    void loadFinished(const QString& path, moderato::ui::MainWindow::LoadResult result);

protected:
    void closeEvent(QCloseEvent* event) override;
    void dragEnterEvent(QDragEnterEvent* event) override;
    void dropEvent(QDropEvent* event) override;

private:
    void buildMenus();
    // The tool bar: File › New Analysis as a button (the menu's own action).
    void buildToolBar();
    // Where Save and Save As propose to save: the project file; unsaved, a
    // project named after the first data file, beside it; with no data, the
    // home folder.
    QString suggestedProjectPath() const;
    // A message box opened over the window (never run in a loop of its own); deletes itself.
    QMessageBox* showMessageBox(int icon, const QString& title, const QString& text);
    // Runs `work` in a BackgroundJob with progress (and a progress dialog
    // when interactive); `done` adopts the outcome on the UI thread.
    void startLoad(const QString& path, const QString& text, BackgroundJob::Work work,
                   std::function<LoadResult(bool cancelled)> done);
    LoadResult adoptProject(const QString& path, LoadOutcome& outcome, bool cancelled);
    // A data file was missing: asks for it and opens again with it (true), or
    // leaves things as they are (false: cancelled, or nobody to ask).
    bool locateMissing(const QString& path, const LoadOutcome& outcome);
    // A PostgreSQL server asked for a password: asks for it and opens again
    // with it (true), or leaves things as they are (false).
    bool askPassword(const QString& path, const LoadOutcome& outcome);
    // Adds what the import dialog read from a PostgreSQL server.
    void addServerDataset(const ImportDialog& dialog, const std::string& password);
    LoadResult addImported(const QString& path, const CsvOptions& options, const LoadOutcome& outcome, bool cancelled);
    // Asks whether to save unsaved changes. Like the file choosers, this is
    // a question run modally (a loop of its own): its answer decides the
    // next step, and no work of ours runs while it is open. Everything that
    // only informs (message boxes, the import and export dialogs) is opened.
    bool confirmDiscard();
    void addRecent(const QString& path);
    void rebuildRecentMenu();
    void updateTitle();
    void exportFigure();
    // Shows the Memo section of the analysis on screen; saveKind >= 0 then asks where to save (MemoSection::SaveKind).
    void showMemo(int saveKind);
    void copySelection();
    void showFirstItem();
    // After a data file became dataset `id`: remember the file, show its analysis.
    void showAddedDataset(const QString& path, const std::string& id);

    ProjectDocument* doc_;
    AnalysisRunner* runner_;
    ProjectSidebar* sidebar_;
    QStackedWidget* pages_;
    QLabel* welcome_;
    UserGuide* guide_ = nullptr;
    DatasetPage* datasetPage_;
    AnalysisPage* analysisPage_;
    RecoveryStore* recovery_;
    DataLocator locator_;
    PasswordAsker passwordAsker_;
    QMenu* recentMenu_ = nullptr;
    QAction* newAnalysisAction_ = nullptr;
    bool interactive_ = true;
    QString lastMessage_;
    BackgroundJob* load_ = nullptr;  // the load in progress
    QString loadingPath_;
    int progressDelayMs_;
};

// Whether a path names a project file (by extension).
bool isProjectPath(const QString& path);

}  // namespace moderato::ui
