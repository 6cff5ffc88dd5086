// Commands a user reaches for: Undo with the focus in a value box, File ›
// New Analysis (and its tool bar button), Duplicate showing the copy, Help ›
// User Guide, where Save As starts. Driven with
// key presses and menu actions as a user would trigger them; what they
// change is read back from the project ("common practice" for editors:
// Ctrl+Z undoes the last change wherever the focus is).
#include <gtest/gtest.h>

#include <QAction>
#include <QApplication>
#include <QDir>
#include <QDoubleSpinBox>
#include <QFile>
#include <QFileDialog>
#include <QFileInfo>
#include <QImage>
#include <QLineEdit>
#include <QMenu>
#include <QMenuBar>
#include <QTest>
#include <QTextBrowser>
#include <QTextDocument>
#include <QTimer>
#include <QToolBar>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>
#include <functional>

#include "probe/moderator_slider.hpp"
#include "sample_window.hpp"
#include "sections/memo_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "shell/project_sidebar.hpp"
#include "shell/user_guide.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

QAction* menuAction(MainWindow& w, const QString& menuTitle, const QString& text) {
    for (auto* menu : w.menuBar()->findChildren<QMenu*>())
        if (menu->title().remove(QLatin1Char('&')) == menuTitle)
            for (auto* a : menu->actions())
                if (a->text().remove(QLatin1Char('&')) == text) return a;
    ADD_FAILURE() << "no " << text.toStdString() << " in " << menuTitle.toStdString();
    return nullptr;
}

// Runs `open` (which opens a save dialog), reads where the dialog starts
// (its folder, the name in its file name box) and cancels it.
struct DialogStart {
    QString folder, name;
    bool asked = false;
};
DialogStart saveDialogStart(const std::function<void()>& open) {
    DialogStart start;
    QTimer answer;
    QObject::connect(&answer, &QTimer::timeout, [&] {
        auto* dialog = qobject_cast<QFileDialog*>(QApplication::activeModalWidget());
        auto* name = dialog ? dialog->findChild<QLineEdit*>(QStringLiteral("fileNameEdit")) : nullptr;
        if (!name) return;
        answer.stop();
        start = {QFileInfo(dialog->directory().absolutePath()).canonicalFilePath(), name->text(), true};
        QTimer::singleShot(0, dialog, &QDialog::reject);
    });
    answer.start(20);
    QTimer::singleShot(5000, &answer, [&] { answer.stop(); });  // no dialog: the test fails, it does not hang
    open();
    return start;
}

}  // namespace

TEST(Commands, UndoKeysWorkWithTheFocusInTheModeratorValueBox) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    win.activate();
    QDoubleSpinBox* box = win.w.analysisPage()->probe()->moderatorSlider()->valueBox();
    const double before = win.analysis().probe.current;
    // Step the value with the keyboard, keep it (Enter): one undo step.
    box->setFocus();
    ASSERT_TRUE(test::waitUntil([&] { return box->hasFocus(); }, 2000));
    QTest::keyClick(box, Qt::Key_Up);
    QTest::keyClick(box, Qt::Key_Return);
    ASSERT_TRUE(test::waitUntil([&] { return !std::isnan(win.analysis().probe.current); }, 3000));
    const double moved = win.analysis().probe.current;
    EXPECT_NE(moved, before);
    ASSERT_TRUE(box->hasFocus());
    // Ctrl+Z with the focus still in the box undoes the project's change.
    QTest::keyClick(box, Qt::Key_Z, Qt::ControlModifier);
    EXPECT_TRUE(test::waitUntil(
        [&] {
            const double now = win.analysis().probe.current;
            return now == before || (std::isnan(now) && std::isnan(before));
        },
        3000))
        << "still " << win.analysis().probe.current;
    // And Ctrl+Shift+Z redoes it.
    QTest::keyClick(box, Qt::Key_Z, Qt::ControlModifier | Qt::ShiftModifier);
    EXPECT_TRUE(test::waitUntil([&] { return win.analysis().probe.current == moved; }, 3000));
}

TEST(Commands, NewAnalysisFromTheFileMenuIsShownAndUndoable) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("coffee-discount")));
    const std::size_t before = win.w.document()->project().analyses.size();
    QAction* action = menuAction(win.w, QStringLiteral("File"), QStringLiteral("New Analysis"));
    ASSERT_TRUE(action);
    EXPECT_EQ(action->shortcut(), QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_N));
    action->trigger();
    ASSERT_EQ(win.w.document()->project().analyses.size(), before + 1);
    const std::string id = win.w.document()->project().analyses.back().id;
    EXPECT_EQ(win.w.analysisPage()->analysisId().toStdString(), id);  // shown at once
    EXPECT_EQ(win.w.document()->project().analyses.back().dataset, "spend");
    EXPECT_EQ(win.undo()->undoText(), QStringLiteral("New analysis"));
    win.undo()->undo();
    EXPECT_EQ(win.w.document()->project().analyses.size(), before);
}

TEST(Commands, DuplicateShowsTheCopy) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("coffee-discount")));
    ProjectSidebar* bar = win.w.sidebar();
    QTreeWidgetItem* item = nullptr;
    for (auto* found :
         bar->findItems(QString::fromStdString(win.analysis().name), Qt::MatchExactly | Qt::MatchRecursive))
        item = found;
    ASSERT_TRUE(item);
    // The sidebar's context menu, as a right-click opens it; "Duplicate" chosen from it.
    QTimer::singleShot(0, [&] {
        auto* menu = qobject_cast<QMenu*>(QApplication::activePopupWidget());
        ASSERT_TRUE(menu);
        for (auto* a : menu->actions())
            if (a->text() == QStringLiteral("Duplicate")) {
                menu->setActiveAction(a);
                QTest::keyClick(menu, Qt::Key_Return);
                return;
            }
        menu->close();
        ADD_FAILURE() << "no Duplicate in the menu";
    });
    const QPoint at = bar->visualItemRect(item).center();
    QContextMenuEvent event(QContextMenuEvent::Mouse, at, bar->viewport()->mapToGlobal(at));
    QApplication::sendEvent(bar->viewport(), &event);
    ASSERT_EQ(win.w.document()->project().analyses.size(), 2u);
    EXPECT_EQ(win.w.analysisPage()->analysisId().toStdString(), win.w.document()->project().analyses.back().id);
}

TEST(Commands, UserGuideShowsTheShippedGuideWithItsPictures) {
    test::SampleWindow win;
    QAction* action = menuAction(win.w, QStringLiteral("Help"), QStringLiteral("User Guide"));
    ASSERT_TRUE(action);
    action->trigger();
    auto* guide = win.w.findChild<UserGuide*>(QStringLiteral("user-guide"));
    ASSERT_TRUE(guide);
    EXPECT_TRUE(guide->isVisible());
    const QString text = guide->browser()->toPlainText();
    EXPECT_TRUE(text.startsWith(QStringLiteral("Moderato user guide"))) << text.left(80).toStdString();
    EXPECT_TRUE(text.contains(QStringLiteral("Specify · Estimates · Probe · Checks · Memo")));
    // The pictures come from inside the program, not from a docs folder beside it.
    const QVariant picture = guide->browser()->document()->resource(
        QTextDocument::ImageResource, QUrl(QStringLiteral("screenshots/coffee-discount-3-probe.png")));
    const QImage image = picture.value<QImage>();
    EXPECT_FALSE(image.isNull());
    EXPECT_GT(image.width(), 400);
    action->trigger();  // a second time: the same window, raised
    EXPECT_EQ(win.w.findChildren<UserGuide*>().size(), 1);
}

// Issue 12: "New analysis" was reachable only from a menu; the tool bar has
// it as a button (the File menu's own action, so one command, one shortcut).
TEST(Commands, NewAnalysisHasAToolBarButton) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("coffee-discount")));
    auto* bar = win.w.findChild<QToolBar*>(QStringLiteral("main-toolbar"));
    ASSERT_TRUE(bar);
    EXPECT_TRUE(bar->isVisible());
    QAction* action = menuAction(win.w, QStringLiteral("File"), QStringLiteral("New Analysis"));
    ASSERT_TRUE(action);
    auto* button = qobject_cast<QToolButton*>(bar->widgetForAction(action));
    ASSERT_TRUE(button) << "no tool bar button for File › New Analysis";
    EXPECT_TRUE(button->isVisible());
    EXPECT_EQ(button->text().remove(QLatin1Char('&')), QStringLiteral("New Analysis"));
    const std::size_t before = win.w.document()->project().analyses.size();
    QTest::mouseClick(button, Qt::LeftButton);
    ASSERT_EQ(win.w.document()->project().analyses.size(), before + 1);
    EXPECT_EQ(win.w.analysisPage()->analysisId().toStdString(), win.w.document()->project().analyses.back().id);
}

// Issue 12: the project's save dialog started in the home folder with no
// name. Common practice for editors: a saved document's dialog starts at its
// file; a new one beside the file it came from, named after it.
TEST(Commands, SaveAsStartsBesideTheProjectOrTheDataFileWithASuggestedName) {
    test::SampleWindow win;
    // A data file imported into a new project: beside the data file, named after it.
    ASSERT_TRUE(QDir(win.dir.path()).mkpath(QStringLiteral("trips")));
    const QString data = win.dir.filePath(QStringLiteral("trips/ferry-trips.csv"));
    ASSERT_TRUE(QFile::copy(test::samplesDir() + QStringLiteral("/coffee-discount/spend.csv"), data));
    ASSERT_TRUE(test::importData(win.w, data)) << win.w.lastMessage().toStdString();
    QAction* saveAs = menuAction(win.w, QStringLiteral("File"), QStringLiteral("Save As…"));
    ASSERT_TRUE(saveAs);
    DialogStart start = saveDialogStart([&] { saveAs->trigger(); });
    ASSERT_TRUE(start.asked) << "Save As opened no dialog";
    const QString trips = QFileInfo(win.dir.filePath(QStringLiteral("trips"))).canonicalFilePath();
    EXPECT_EQ(start.folder, trips);
    EXPECT_EQ(start.name, QStringLiteral("ferry-trips.moderato"));
    EXPECT_TRUE(win.w.document()->filePath().isEmpty()) << "cancelled: nothing saved";
    // The memo of the new project's analysis: beside the data file too.
    win.id = win.w.analysisPage()->analysisId();
    ASSERT_TRUE(win.waitForRun());
    start = saveDialogStart([&] { win.w.analysisPage()->memo()->saveWithDialog(MemoSection::SaveHtml); });
    ASSERT_TRUE(start.asked) << "Save memo opened no dialog";
    EXPECT_EQ(start.folder, trips);
    EXPECT_TRUE(start.name.endsWith(QStringLiteral(".html"))) << start.name.toStdString();

    // A project opened from its file: at that file.
    const QString project = win.copy(QStringLiteral("orchard-nitrogen"));
    ASSERT_TRUE(win.open(project));
    start = saveDialogStart([&] { saveAs->trigger(); });
    ASSERT_TRUE(start.asked);
    EXPECT_EQ(start.folder, QFileInfo(win.dir.path()).canonicalFilePath());
    EXPECT_EQ(start.name, QStringLiteral("orchard-nitrogen.moderato"));
}
