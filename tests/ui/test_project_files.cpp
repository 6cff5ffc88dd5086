// Project files in the workbench: opening broken projects gives a clear
// message and writes nothing; save and reopen gives the same project; undo
// and redo restore exact states; recent files; dropping files on the window;
// the command line of the `moderato` executable.
#include <gtest/gtest.h>

#include <QAction>
#include <QApplication>
#include <QDragEnterEvent>
#include <QDropEvent>
#include <QFile>
#include <QLabel>
#include <QMenu>
#include <QMenuBar>
#include <QMimeData>
#include <QProcess>
#include <QSettings>
#include <QTemporaryDir>
#include <QTest>
#include <QTextEdit>
#include <QTreeWidgetItem>
#include <QUndoStack>
#include <QUrl>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include "common/file_bytes.hpp"
#include "common/folder_snapshot.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/support/sha256.hpp"
#include "qstring_print.hpp"
#include "sample_window.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "shell/project_sidebar.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::waitForRun;
namespace fs = std::filesystem;

namespace {

std::string readBytes(const QString& path) { return test::read_file(path.toStdString()); }
void writeBytes(const QString& path, const std::string& bytes) { test::write_file(path.toStdString(), bytes); }

// Every entry under a test's folder (tests/common/folder_snapshot.hpp). Equal
// snapshots: nothing was written, added (no temporary file left) or removed.
using Snapshot = test::FolderSnapshot;
Snapshot snapshot(const QTemporaryDir& dir) { return test::snapshot_folder(dir.path().toStdString()); }

std::string replaced(std::string text, const std::string& from, const std::string& to) {
    const auto at = text.find(from);
    EXPECT_NE(at, std::string::npos) << from;
    if (at != std::string::npos) text.replace(at, from.size(), to);
    return text;
}

bool contains(const QString& text, const QString& part) { return text.contains(part); }

// The text of every label and text box on a widget (what the user can read).
QString visibleText(QWidget* root) {
    QStringList parts;
    for (auto* label : root->findChildren<QLabel*>()) parts << label->text();
    for (auto* edit : root->findChildren<QTextEdit*>()) parts << edit->toPlainText();
    return parts.join(QLatin1Char('\n'));
}

}  // namespace

// ---------------------------------------------------------------- opening broken projects

class BrokenProjects : public ::testing::Test {
protected:
    void SetUp() override {
        ASSERT_TRUE(dir.isValid());
        project = test::copySample(QStringLiteral("coffee-discount"), dir);
        data = dir.filePath(QStringLiteral("spend.csv"));
        ASSERT_TRUE(QFile::exists(project));
        ASSERT_TRUE(QFile::exists(data));
        w.setInteractive(false);
        // A good project is open first: a failed open must not lose it.
        ASSERT_TRUE(good.isValid());
        goodProject = test::copySample(QStringLiteral("orchard-nitrogen"), good);
        ASSERT_TRUE(test::openProject(w, goodProject)) << w.lastMessage().toStdString();
        goodState = w.document()->project();
    }
    void expectGoodProjectStillOpen() {
        EXPECT_TRUE(w.document()->project() == goodState);
        EXPECT_EQ(w.document()->filePath(), QFileInfo(goodProject).absoluteFilePath());
    }

    QTemporaryDir dir, good;
    QString project, data, goodProject;
    Project goodState;
    MainWindow w;
};

TEST_F(BrokenProjects, CorruptProjectNamesFileLineAndColumn) {
    const std::string text = readBytes(project);
    writeBytes(project, text.substr(0, text.size() / 2));
    const Snapshot before = snapshot(dir);
    EXPECT_FALSE(test::openProject(w, project));
    const QString message = w.lastMessage();
    EXPECT_TRUE(contains(message, project)) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("line "))) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("column "))) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("not valid JSON"))) << message.toStdString();
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");
    expectGoodProjectStillOpen();
}

TEST_F(BrokenProjects, NewerSchemaIsRefusedWithBothVersions) {
    writeBytes(project, replaced(readBytes(project), "\"schema_version\": " + std::to_string(kProjectSchemaVersion),
                                 "\"schema_version\": 42"));
    const Snapshot before = snapshot(dir);
    EXPECT_FALSE(test::openProject(w, project));
    const QString message = w.lastMessage();
    EXPECT_TRUE(contains(message, project)) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("newer Moderato"))) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("schema 42"))) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("schema %1").arg(kProjectSchemaVersion))) << message.toStdString();
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");
    expectGoodProjectStillOpen();
}

TEST_F(BrokenProjects, ChangedDataFileOpensWithAWarning) {
    // One byte of the data: the first data row's first digit, 0-9 -> another digit.
    std::string bytes = readBytes(data);
    const auto row = bytes.find('\n') + 1;
    auto at = row;
    while (at < bytes.size() && !std::isdigit(static_cast<unsigned char>(bytes[at]))) ++at;
    ASSERT_LT(at, bytes.size());
    bytes[at] = bytes[at] == '9' ? '1' : static_cast<char>(bytes[at] + 1);
    writeBytes(data, bytes);
    const Snapshot before = snapshot(dir);
    EXPECT_TRUE(test::openProject(w, project)) << w.lastMessage().toStdString();
    const QString message = w.lastMessage();
    EXPECT_TRUE(contains(message, QStringLiteral("changed since the project was saved"))) << message.toStdString();
    EXPECT_TRUE(contains(message, data)) << message.toStdString();
    // The analysis is computed from the file as it is now.
    const QString id = w.analysisPage()->analysisId();
    ASSERT_TRUE(waitForRun(w, id));
    EXPECT_TRUE(w.runner()->error(id).isEmpty()) << w.runner()->error(id).toStdString();
    EXPECT_EQ(w.document()->table("spend")->rows(), read_csv(data.toStdString()).rows());
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");
    // Not modified: opening is not an edit (saving accepts the new file).
    EXPECT_FALSE(w.document()->isModified());
}

TEST_F(BrokenProjects, VanishedDataFileNamesDatasetAndPath) {
    ASSERT_TRUE(QFile::remove(data));
    const Snapshot before = snapshot(dir);
    EXPECT_FALSE(test::openProject(w, project));
    const QString message = w.lastMessage();
    EXPECT_TRUE(contains(message, QStringLiteral("'spend'"))) << message.toStdString();
    EXPECT_TRUE(contains(message, data)) << message.toStdString();
    EXPECT_TRUE(contains(message, QStringLiteral("missing"))) << message.toStdString();
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");
    expectGoodProjectStillOpen();
}

TEST_F(BrokenProjects, ColumnThatNoLongerExistsIsShownOnTheAnalysis) {
    // The data file lost a column the analysis uses (renamed in the header).
    std::string bytes = readBytes(data);
    bytes = replaced(bytes, "discount_pct", "discount_share");
    writeBytes(data, bytes);
    const Snapshot before = snapshot(dir);
    EXPECT_TRUE(test::openProject(w, project)) << w.lastMessage().toStdString();
    const QString id = w.analysisPage()->analysisId();
    ASSERT_EQ(id, QStringLiteral("discount-loyalty"));
    ASSERT_TRUE(waitForRun(w, id));
    EXPECT_FALSE(w.runner()->result(id));
    const QString error = w.runner()->error(id);
    EXPECT_TRUE(contains(error, QStringLiteral("'discount_pct'"))) << error.toStdString();
    EXPECT_TRUE(contains(error, QStringLiteral("Focal predictor"))) << error.toStdString();
    EXPECT_TRUE(contains(error, QStringLiteral("'discount × loyalty'"))) << error.toStdString();
    EXPECT_TRUE(contains(error, QStringLiteral("spend.csv"))) << error.toStdString();
    // The analysis page shows the reason.
    EXPECT_TRUE(contains(visibleText(w.analysisPage()), QStringLiteral("'discount_pct'")))
        << visibleText(w.analysisPage()).toStdString();
    // The file change is also reported (the hash differs).
    EXPECT_TRUE(contains(w.lastMessage(), QStringLiteral("changed since"))) << w.lastMessage().toStdString();
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");
}

// ---------------------------------------------------------------- save and reopen

TEST(ProjectFiles, SaveReopenGivesTheSameProject) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    const QString data = dir.filePath(QStringLiteral("spend.csv"));
    const std::string dataBytes = readBytes(data), projectBytes = readBytes(project);
    MainWindow w;
    w.setInteractive(false);
    ASSERT_TRUE(test::openProject(w, project)) << w.lastMessage().toStdString();
    EXPECT_FALSE(w.windowTitle().contains(QLatin1Char('*'))) << w.windowTitle().toStdString();
    const QString id = QStringLiteral("discount-loyalty");
    // Edits of several kinds, each through the document.
    w.sidebar()->renameAnalysis(id, QStringLiteral("Discount by loyalty (weekly)"));
    Analysis a = *w.document()->analysis(id);
    a.se = SeKind::HC1;
    a.level = 0.9;
    a.probe.current = 0.5;
    a.probe.simultaneous_band = true;
    a.figure.dpi = 600;
    a.figure.greyscale = true;
    w.document()->setAnalysis(a, QStringLiteral("Settings"));
    const QString copyId = w.sidebar()->duplicateAnalysis(id);
    ASSERT_FALSE(copyId.isEmpty());
    EXPECT_TRUE(w.windowTitle().contains(QStringLiteral(" *"))) << w.windowTitle().toStdString();

    // Save elsewhere: a folder beside the data.
    ASSERT_TRUE(QDir(dir.path()).mkdir(QStringLiteral("saved")));
    const QString saved = dir.filePath(QStringLiteral("saved/copy.moderato"));
    ASSERT_TRUE(w.saveAs(saved)) << w.lastMessage().toStdString();
    EXPECT_FALSE(w.document()->isModified());
    EXPECT_FALSE(w.windowTitle().contains(QLatin1Char('*'))) << w.windowTitle().toStdString();
    EXPECT_TRUE(w.windowTitle().contains(QStringLiteral("copy.moderato"))) << w.windowTitle().toStdString();
    // Path normalisation: the data path is now relative to the new project
    // file, and the recorded hash is the data file's SHA-256.
    const DataSource* source = w.document()->project().dataset("spend");
    ASSERT_TRUE(source);
    EXPECT_EQ(source->path, "../spend.csv");
    EXPECT_EQ(source->sha256, sha256_file(data.toStdString()));  // core sha256_file (FIPS 180-2 tested)
    EXPECT_EQ(readBytes(data), dataBytes) << "the data file was written";

    // The saved file read back through core equals the document.
    const Project onDisk = read_project_file(saved.toStdString());
    EXPECT_TRUE(onDisk == w.document()->project());
    // Reopened in another window: the same project, the same results.
    MainWindow again;
    again.setInteractive(false);
    ASSERT_TRUE(test::openProject(again, saved)) << again.lastMessage().toStdString();
    EXPECT_TRUE(again.document()->project() == w.document()->project());
    EXPECT_TRUE(again.lastMessage().isEmpty()) << again.lastMessage().toStdString();  // no warnings
    const Analysis* reopened = again.document()->analysis(id);
    ASSERT_TRUE(reopened);
    EXPECT_EQ(reopened->name, "Discount by loyalty (weekly)");
    EXPECT_EQ(reopened->se, SeKind::HC1);
    EXPECT_EQ(reopened->probe.current, 0.5);
    EXPECT_EQ(again.document()->project().analyses.size(), 2u);
    ASSERT_TRUE(waitForRun(w, id));
    ASSERT_TRUE(waitForRun(again, id));
    ASSERT_TRUE(w.runner()->result(id) && again.runner()->result(id));
    EXPECT_TRUE(w.runner()->result(id)->fit.beta == again.runner()->result(id)->fit.beta);

    // Apart from the data path, the original project file and the saved one
    // describe the same datasets.
    const Project original = read_project_file(project.toStdString());
    EXPECT_EQ(original.datasets[0].path, "spend.csv");
    EXPECT_EQ(original.datasets[0].sha256, onDisk.datasets[0].sha256);
    EXPECT_EQ(readBytes(project), projectBytes) << "Save As wrote over the original project";
}

TEST(ProjectFiles, SavingOverADataFileIsRefused) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    const QString data = dir.filePath(QStringLiteral("spend.csv"));
    MainWindow w;
    w.setInteractive(false);
    ASSERT_TRUE(test::openProject(w, project));
    w.sidebar()->renameAnalysis(QStringLiteral("discount-loyalty"), QStringLiteral("renamed"));
    const Snapshot before = snapshot(dir);
    EXPECT_FALSE(w.saveAs(data));
    EXPECT_TRUE(contains(w.lastMessage(), QStringLiteral("data file of dataset 'spend'")))
        << w.lastMessage().toStdString();
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");
    // A folder in the way: the write fails, nothing is left behind.
    ASSERT_TRUE(QDir(dir.path()).mkpath(QStringLiteral("taken.moderato/inner")));
    const Snapshot withFolder = snapshot(dir);
    EXPECT_FALSE(w.saveAs(dir.filePath(QStringLiteral("taken.moderato"))));
    EXPECT_TRUE(contains(w.lastMessage(), QStringLiteral("taken.moderato"))) << w.lastMessage().toStdString();
    EXPECT_EQ(test::folder_changes(withFolder, snapshot(dir)), "");
    // Still modified, still the old file.
    EXPECT_TRUE(w.document()->isModified());
    EXPECT_EQ(w.document()->filePath(), QFileInfo(project).absoluteFilePath());
    EXPECT_TRUE(w.windowTitle().contains(QStringLiteral(" *")));
}

// ---------------------------------------------------------------- undo and redo

TEST(ProjectFiles, UndoRedoRestoreExactStates) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    ASSERT_TRUE(dir.path().size() > 0);
    QTemporaryDir other;
    const QString extraCsv = other.filePath(QStringLiteral("tickets.csv"));
    ASSERT_TRUE(QFile::copy(test::samplesDir() + QStringLiteral("/helpdesk-staffing/tickets.csv"), extraCsv));
    MainWindow w;
    w.setInteractive(false);
    ASSERT_TRUE(test::openProject(w, project));
    ProjectDocument* doc = w.document();
    const QString id = QStringLiteral("discount-loyalty");
    const auto sidebarNames = [&] {
        QStringList names;
        for (auto* item : w.sidebar()->findItems(QStringLiteral("*"), Qt::MatchWildcard | Qt::MatchRecursive))
            if (item->parent()) names << item->text(0);
        return names;
    };

    std::vector<Project> states{doc->project()};
    std::vector<QStringList> shown{sidebarNames()};
    w.sidebar()->renameAnalysis(id, QStringLiteral("Spend: discount by loyalty"));
    states.push_back(doc->project());
    shown.push_back(sidebarNames());
    EXPECT_TRUE(w.windowTitle().endsWith(QStringLiteral(" * — Moderato"))) << w.windowTitle().toStdString();
    w.sidebar()->removeAnalysis(id);
    states.push_back(doc->project());
    shown.push_back(sidebarNames());
    ASSERT_TRUE(test::importData(w, extraCsv)) << w.lastMessage().toStdString();
    states.push_back(doc->project());
    shown.push_back(sidebarNames());

    ASSERT_EQ(states[1].analyses[0].name, "Spend: discount by loyalty");
    ASSERT_TRUE(states[2].analyses.empty());
    ASSERT_TRUE(states[2].figures.empty());  // the analysis's figure went with it
    ASSERT_EQ(states[3].datasets.size(), 2u);
    ASSERT_EQ(states[3].analyses.size(), 1u);  // a first analysis with guessed roles
    EXPECT_TRUE(shown[1].contains(QStringLiteral("Spend: discount by loyalty")));
    EXPECT_TRUE(shown[3].contains(QStringLiteral("tickets.csv")));

    QUndoStack* undo = doc->undoStack();
    for (int k = 2; k >= 0; --k) {
        SCOPED_TRACE("undo to state " + std::to_string(k));
        undo->undo();
        EXPECT_TRUE(doc->project() == states[static_cast<std::size_t>(k)]);
        EXPECT_EQ(sidebarNames(), shown[static_cast<std::size_t>(k)]);
    }
    EXPECT_FALSE(doc->isModified());
    EXPECT_FALSE(w.windowTitle().contains(QLatin1Char('*'))) << w.windowTitle().toStdString();
    for (int k = 1; k <= 3; ++k) {
        SCOPED_TRACE("redo to state " + std::to_string(k));
        undo->redo();
        EXPECT_TRUE(doc->project() == states[static_cast<std::size_t>(k)]);
        EXPECT_EQ(sidebarNames(), shown[static_cast<std::size_t>(k)]);
    }
    EXPECT_TRUE(w.windowTitle().contains(QStringLiteral(" *")));
    // The analysis restored by undo is computed again.
    undo->undo();
    undo->undo();
    ASSERT_TRUE(doc->analysis(id));
    ASSERT_TRUE(waitForRun(w, id));
    EXPECT_TRUE(w.runner()->result(id)) << w.runner()->error(id).toStdString();
    // Saving clears the star; undo after the save marks it modified again.
    ASSERT_TRUE(w.save()) << w.lastMessage().toStdString();
    EXPECT_FALSE(w.windowTitle().contains(QLatin1Char('*')));
    undo->undo();
    EXPECT_TRUE(w.windowTitle().contains(QStringLiteral(" *")));
    EXPECT_TRUE(doc->project() == states[0]);
}

TEST(ProjectFiles, SidebarEditsAreOneUndoStepEach) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    MainWindow w;
    w.setInteractive(false);
    w.show();
    ASSERT_TRUE(test::openProject(w, project));
    ProjectDocument* doc = w.document();
    QUndoStack* undo = doc->undoStack();
    const QString id = QStringLiteral("discount-loyalty");
    const Project start = doc->project();
    // Nothing to remove: no undo step.
    w.sidebar()->removeAnalysis(QStringLiteral("no-such-analysis"));
    w.sidebar()->removeFigure(QStringLiteral("no-such-figure"));
    w.sidebar()->renameAnalysis(id, QStringLiteral("   "));
    w.sidebar()->renameAnalysis(id, QString::fromStdString(start.analyses[0].name));
    EXPECT_EQ(undo->count(), 0);
    EXPECT_FALSE(doc->isModified());
    // Duplicate: a new id and name, one step.
    const QString copy = w.sidebar()->duplicateAnalysis(id);
    EXPECT_EQ(copy, QStringLiteral("discount-loyalty-2"));
    ASSERT_TRUE(doc->analysis(copy));
    EXPECT_EQ(doc->analysis(copy)->name, start.analyses[0].name + " (copy)");
    EXPECT_EQ(undo->count(), 1);
    // Clicking the copy in the sidebar shows it.
    QTreeWidgetItem* item = nullptr;
    for (auto* found : w.sidebar()->findItems(QString::fromStdString(start.analyses[0].name + " (copy)"),
                                              Qt::MatchExactly | Qt::MatchRecursive))
        item = found;
    ASSERT_TRUE(item);
    QTest::mouseClick(w.sidebar()->viewport(), Qt::LeftButton, Qt::NoModifier,
                      w.sidebar()->visualItemRect(item).center());
    EXPECT_EQ(w.analysisPage()->analysisId(), copy);
    // Removing the figure, then the shown analysis: the page goes to another item.
    w.sidebar()->removeFigure(QString::fromStdString(start.figures[0].id));
    EXPECT_TRUE(doc->project().figures.empty());
    w.sidebar()->removeAnalysis(copy);
    EXPECT_EQ(w.analysisPage()->analysisId(), id);
    EXPECT_EQ(undo->count(), 3);
    for (int k = 0; k < 3; ++k) undo->undo();
    EXPECT_TRUE(doc->project() == start);
    EXPECT_FALSE(doc->isModified());
}

TEST(ProjectFiles, UndoneDatasetDoesNotLeaveItsTableBehind) {
    // Two different files with the same name: after undoing the first import,
    // the second one gets the same id and must show its own columns.
    QTemporaryDir dir;
    ASSERT_TRUE(QDir(dir.path()).mkpath(QStringLiteral("a")));
    ASSERT_TRUE(QDir(dir.path()).mkpath(QStringLiteral("b")));
    const QString first = dir.filePath(QStringLiteral("a/data.csv")),
                  second = dir.filePath(QStringLiteral("b/data.csv"));
    writeBytes(first, "alpha,beta,gamma\n1,2,3\n4,5,6\n7,8,10\n");
    writeBytes(second, "height,weight,age,group\n1.7,60,30,a\n1.8,75,41,b\n1.6,55,25,a\n");
    MainWindow w;
    w.setInteractive(false);
    ASSERT_TRUE(test::importData(w, first));
    ASSERT_TRUE(w.document()->table("data"));
    EXPECT_TRUE(w.document()->table("data")->find("alpha"));
    w.document()->undoStack()->undo();
    EXPECT_TRUE(w.document()->project().datasets.empty());
    ASSERT_TRUE(test::importData(w, second));
    ASSERT_EQ(w.document()->project().datasets.size(), 1u);
    const auto table = w.document()->table(w.document()->project().datasets[0].id);
    ASSERT_TRUE(table);
    EXPECT_TRUE(table->find("height"));
    EXPECT_FALSE(table->find("alpha"));
    EXPECT_EQ(table->cols(), 4u);
}

// ---------------------------------------------------------------- recent files, drag and drop

TEST(ProjectFiles, RecentFilesListTheNewestFirst) {
    QSettings().remove(QStringLiteral("recentFiles"));
    QTemporaryDir dir1, dir2;
    const QString p1 = test::copySample(QStringLiteral("coffee-discount"), dir1);
    const QString p2 = test::copySample(QStringLiteral("orchard-nitrogen"), dir2);
    MainWindow w;
    w.setInteractive(false);
    ASSERT_TRUE(test::openProject(w, p1));
    ASSERT_TRUE(test::openProject(w, p2));
    ASSERT_TRUE(test::openProject(w, p1));
    const QStringList recent = QSettings().value(QStringLiteral("recentFiles")).toStringList();
    ASSERT_EQ(recent.size(), 2);
    EXPECT_EQ(recent[0], QFileInfo(p1).absoluteFilePath());
    EXPECT_EQ(recent[1], QFileInfo(p2).absoluteFilePath());
    // The File menu shows them.
    QMenu* recentMenu = nullptr;
    for (auto* menu : w.menuBar()->findChildren<QMenu*>())
        if (menu->title().remove(QLatin1Char('&')) == QStringLiteral("Open Recent")) recentMenu = menu;
    ASSERT_TRUE(recentMenu);
    QStringList texts;
    for (auto* action : recentMenu->actions()) texts << action->text();
    EXPECT_EQ(texts,
              (QStringList{QStringLiteral("coffee-discount.moderato"), QStringLiteral("orchard-nitrogen.moderato")}));
    // Choosing one opens it.
    EXPECT_EQ(test::finishLoad(w, [&] { recentMenu->actions()[1]->trigger(); }), MainWindow::Loaded);
    EXPECT_EQ(w.document()->filePath(), QFileInfo(p2).absoluteFilePath());
    // A failed open does not enter the list.
    QTemporaryDir dir3;
    const QString broken = test::copySample(QStringLiteral("helpdesk-staffing"), dir3);
    writeBytes(broken, "{ not json");
    EXPECT_FALSE(test::openProject(w, broken));
    EXPECT_FALSE(
        QSettings().value(QStringLiteral("recentFiles")).toStringList().contains(QFileInfo(broken).absoluteFilePath()));
    QSettings().remove(QStringLiteral("recentFiles"));
}

namespace {
// A drag over the window and a drop, as the platform delivers them: the
// drop goes to the widget that accepted the drag. Returns whether the
// window accepted the drag.
bool dragAndDrop(MainWindow& w, const QUrl& url) {
    QMimeData mime;
    mime.setUrls({url});
    QDragEnterEvent enter(QPoint(50, 50), Qt::CopyAction, &mime, Qt::LeftButton, Qt::NoModifier);
    enter.setAccepted(false);
    QApplication::sendEvent(&w, &enter);
    if (!enter.isAccepted()) return false;
    QDropEvent drop(QPointF(50, 50), Qt::CopyAction, &mime, Qt::LeftButton, Qt::NoModifier);
    drop.setAccepted(false);
    QApplication::sendEvent(&w, &drop);
    EXPECT_TRUE(drop.isAccepted());
    return true;
}
}  // namespace

TEST(ProjectFiles, DroppingACsvAddsADataset) {
    QTemporaryDir dir;
    const QString csv = dir.filePath(QStringLiteral("plots.csv"));
    ASSERT_TRUE(QFile::copy(test::samplesDir() + QStringLiteral("/orchard-nitrogen/plots.csv"), csv));
    const Snapshot before = snapshot(dir);
    MainWindow w;
    w.setInteractive(false);
    bool accepted = false;
    ASSERT_EQ(test::finishLoad(w, [&] { accepted = dragAndDrop(w, QUrl::fromLocalFile(csv)); }), MainWindow::Loaded);
    ASSERT_TRUE(accepted);
    ASSERT_EQ(w.document()->project().datasets.size(), 1u);
    const DataSource& source = w.document()->project().datasets[0];
    EXPECT_EQ(source.id, "plots");
    const auto table = w.document()->table(source.id);
    ASSERT_TRUE(table);
    // Default import options: the same table core reads (what moderato-cli reads).
    const Table direct = read_csv(csv.toStdString());
    EXPECT_EQ(table->rows(), direct.rows());
    EXPECT_EQ(table->cols(), direct.cols());
    // A first analysis with guessed roles, shown.
    ASSERT_EQ(w.document()->project().analyses.size(), 1u);
    EXPECT_EQ(w.analysisPage()->analysisId(), QString::fromStdString(w.document()->project().analyses[0].id));
    EXPECT_TRUE(w.document()->isModified());
    EXPECT_TRUE(w.windowTitle().contains(QStringLiteral(" *")));
    EXPECT_EQ(test::folder_changes(before, snapshot(dir)), "");

    // Dropping a project file opens the project.
    QTemporaryDir pdir;
    const QString project = test::copySample(QStringLiteral("volunteer-onboarding"), pdir);
    ASSERT_EQ(test::finishLoad(w, [&] { accepted = dragAndDrop(w, QUrl::fromLocalFile(project)); }),
              MainWindow::Loaded);
    ASSERT_TRUE(accepted);
    EXPECT_EQ(w.document()->filePath(), QFileInfo(project).absoluteFilePath()) << w.lastMessage().toStdString();
    EXPECT_EQ(w.document()->project().datasets.size(), 1u);
    EXPECT_FALSE(w.document()->isModified());

    // Something that is not a local file is not accepted.
    EXPECT_FALSE(dragAndDrop(w, QUrl(QStringLiteral("https://example.org/data.csv"))));
}

// ---------------------------------------------------------------- the command line

namespace {
struct ProcessRun {
    int exitCode = -1;
    QString out, err;
};
ProcessRun runModerato(const QStringList& arguments) {
    QProcess p;
    QProcessEnvironment env = QProcessEnvironment::systemEnvironment();
    env.insert(QStringLiteral("QT_QPA_PLATFORM"), QStringLiteral("offscreen"));
    p.setProcessEnvironment(env);
    p.start(QStringLiteral(MODERATO_GUI_EXE), arguments);
    ProcessRun r;
    if (!p.waitForFinished(30000)) {
        p.kill();
        p.waitForFinished();
        return r;
    }
    r.exitCode = p.exitStatus() == QProcess::NormalExit ? p.exitCode() : -1;
    r.out = QString::fromUtf8(p.readAllStandardOutput());
    r.err = QString::fromUtf8(p.readAllStandardError());
    return r;
}
}  // namespace

TEST(CommandLine, VersionPrintsTheProjectVersion) {
    const ProcessRun r = runModerato({QStringLiteral("--version")});
    EXPECT_EQ(r.exitCode, 0) << r.err.toStdString();
    // MODERATO_VERSION is the CMake project version, given to every target.
    EXPECT_EQ(r.out.trimmed(), QStringLiteral("Moderato " MODERATO_VERSION)) << r.out.toStdString();
}

TEST(CommandLine, HelpListsTheOptionsAndTheFileArgument) {
    const ProcessRun r = runModerato({QStringLiteral("--help")});
    EXPECT_EQ(r.exitCode, 0) << r.err.toStdString();
    EXPECT_TRUE(r.out.contains(QStringLiteral("Usage:"))) << r.out.toStdString();
    EXPECT_TRUE(r.out.contains(QStringLiteral("--version"))) << r.out.toStdString();
    EXPECT_TRUE(r.out.contains(QStringLiteral("--help"))) << r.out.toStdString();
    EXPECT_TRUE(r.out.contains(QStringLiteral("[file]"))) << r.out.toStdString();
    EXPECT_TRUE(r.out.contains(QStringLiteral(".moderato"))) << r.out.toStdString();
}

TEST(CommandLine, UnknownOptionFails) {
    const ProcessRun r = runModerato({QStringLiteral("--no-such-option")});
    EXPECT_NE(r.exitCode, 0);
    EXPECT_TRUE(r.err.contains(QStringLiteral("no-such-option"))) << r.err.toStdString();
}
