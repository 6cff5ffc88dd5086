// The main window: menus, the Project sidebar, and the page of the selected
// dataset or analysis. Opens projects and data files (menu, command line,
// drag and drop), saves projects, remembers recent files and window state.
#pragma once

#include <QMainWindow>
#include <QStringList>
#include <string>

#include "moderato/reading/csv.hpp"

class QStackedWidget;
class QMenu;
class QLabel;

namespace moderato::ui {

class AnalysisPage;
class AnalysisRunner;
class DatasetPage;
class ProjectDocument;
class ProjectSidebar;

class MainWindow : public QMainWindow {
    Q_OBJECT
public:
    explicit MainWindow(QWidget* parent = nullptr);
    ~MainWindow() override;

    ProjectDocument* document() const { return doc_; }
    AnalysisRunner* runner() const { return runner_; }
    ProjectSidebar* sidebar() const { return sidebar_; }
    AnalysisPage* analysisPage() const { return analysisPage_; }
    DatasetPage* datasetPage() const { return datasetPage_; }

    // Opens a project (.moderato) or imports a data file (with the import
    // dialog when interactive). Returns false and reports when it fails.
    bool openPath(const QString& path);
    bool openProject(const QString& path);
    // Reads a data file with these options (no dialog) and adds it as a dataset.
    bool importData(const QString& path, const CsvOptions& options);
    bool save();
    bool saveAs(const QString& path);

    void showAnalysis(const QString& id);
    void showDataset(const QString& id);

    // Non-interactive mode (tests, scripts): messages are recorded instead of
    // shown in dialogs, and no dialog asks anything.
    void setInteractive(bool on) { interactive_ = on; }
    QString lastMessage() const { return lastMessage_; }

Q_SIGNALS:
    void messageReported(const QString& title, const QString& text);

protected:
    void closeEvent(QCloseEvent* event) override;
    void dragEnterEvent(QDragEnterEvent* event) override;
    void dropEvent(QDropEvent* event) override;

private:
    void buildMenus();
    void report(const QString& title, const QString& text, bool warning = true);
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
    DatasetPage* datasetPage_;
    AnalysisPage* analysisPage_;
    QMenu* recentMenu_ = nullptr;
    bool interactive_ = true;
    QString lastMessage_;
};

// Whether a path names a project file (by extension).
bool isProjectPath(const QString& path);

}  // namespace moderato::ui
