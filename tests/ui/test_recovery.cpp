// Crash recovery: the workbench keeps a recovery copy of unsaved edits in the
// user's state folder (XDG_STATE_HOME, a temporary folder here: ui_test_main),
// removes it on a clean quit, a save or an undo back to the saved state, and
// offers a dead process's copy back on the next start. The last test kills a
// real `moderato` process with SIGKILL and starts it again.
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <QApplication>
#include <QDir>
#include <QFile>
#include <QProcess>
#include <QSignalSpy>
#include <QTemporaryDir>
#include <QUndoStack>

#include "common/file_bytes.hpp"
#include "common/folder_snapshot.hpp"
#include "model/project_document.hpp"
#include "model/recovery_store.hpp"
#include "moderato/project/recovery_copy.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "moderato/support/sha256.hpp"
#include "qstring_print.hpp"
#include "sample_window.hpp"
#include "shell/recovery_prompt.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// Renames the window's first analysis: one undo step, as the sidebar's rename does.
void rename(MainWindow& w, const std::string& name) {
    Analysis a = w.document()->project().analyses.front();
    a.name = name;
    w.document()->setAnalysis(a, QStringLiteral("Rename analysis"));
}

RecoveryCopy readCopy(const QString& file) {
    return recovery_from_json(read_file_bytes(file.toStdString()), file.toStdString());
}

// A process id that no longer runs: a child that exited and was reaped (by construction, POSIX wait(2)).
long long deadPid() {
    const pid_t child = ::fork();
    if (child == 0) ::_exit(0);
    int status = 0;
    ::waitpid(child, &status, 0);
    return child;
}

// The recovery copies (*.json) in a folder.
QStringList copiesIn(const QString& folder) { return QDir(folder).entryList({QStringLiteral("*.json")}, QDir::Files); }

}  // namespace

TEST(Recovery, FolderFollowsXdgStateHome) {
    // XDG Base Directory specification: $XDG_STATE_HOME, else ~/.local/state; ui_test_main sets it.
    EXPECT_EQ(RecoveryStore::defaultFolder(), qEnvironmentVariable("XDG_STATE_HOME") + "/moderato/recovery");
}

TEST(Recovery, AnEditIsKeptWithinTheIntervalAndNeverBesideTheProject) {
    test::SampleWindow win;
    const QString project = win.copy(QStringLiteral("coffee-discount"));
    ASSERT_TRUE(win.open(project));
    RecoveryStore* store = win.w.recovery();
    const auto besideBefore = test::snapshot_folder(win.dir.path().toStdString());
    EXPECT_FALSE(QFile::exists(store->copyPath()));  // opening is not an edit

    QSignalSpy written(store, &RecoveryStore::written);
    QElapsedTimer t;
    t.start();
    rename(win.w, "first");
    rename(win.w, "second");  // a burst of edits: one write
    ASSERT_TRUE(test::waitUntil([&] { return QFile::exists(store->copyPath()); }, 8000));
    // Written one interval after the first edit, not at once: the burst is coalesced. Qt's default
    // coarse timers may fire up to 5 % early (QTimer documentation, Qt::CoarseTimer).
    EXPECT_GE(t.elapsed(), RecoveryStore::kDefaultIntervalMs * 95 / 100 - 20);
    EXPECT_EQ(written.count(), 1);
    EXPECT_TRUE(store->copyPath().startsWith(RecoveryStore::defaultFolder()));
    EXPECT_EQ(test::folder_changes(besideBefore, test::snapshot_folder(win.dir.path().toStdString())), "");

    const RecoveryCopy copy = readCopy(store->copyPath());
    EXPECT_EQ(copy.pid, ::getpid());
    EXPECT_EQ(copy.project_path, QFileInfo(project).absoluteFilePath().toStdString());
    EXPECT_EQ(copy.project.analyses.front().name, "second");
    // Data paths are absolute (what restoring needs wherever the copy is read).
    EXPECT_EQ(copy.data_paths.at("spend"), QFileInfo(win.dir.filePath("spend.csv")).absoluteFilePath().toStdString());
    EXPECT_EQ(copy.project_sha256, sha256_file(project.toStdString()));
}

TEST(Recovery, SaveUndoToSavedStateAndCleanQuitRemoveTheCopy) {
    test::SampleWindow win;
    ASSERT_TRUE(win.open(win.copy(QStringLiteral("coffee-discount"))));
    RecoveryStore* store = win.w.recovery();
    store->setInterval(50);
    rename(win.w, "edited");
    ASSERT_TRUE(test::waitUntil([&] { return QFile::exists(store->copyPath()); }));
    win.undo()->undo();  // back to the saved state: nothing unsaved to keep
    EXPECT_TRUE(test::waitUntil([&] { return !QFile::exists(store->copyPath()); }));

    win.undo()->redo();
    ASSERT_TRUE(test::waitUntil([&] { return QFile::exists(store->copyPath()); }));
    ASSERT_TRUE(win.w.save());
    EXPECT_FALSE(QFile::exists(store->copyPath()));

    rename(win.w, "edited again");
    ASSERT_TRUE(test::waitUntil([&] { return QFile::exists(store->copyPath()); }));
    EXPECT_TRUE(win.w.close());  // a clean quit (this window asks nothing: not interactive)
    EXPECT_FALSE(QFile::exists(store->copyPath()));
}

TEST(Recovery, OnlyCopiesOfEndedProcessesAreOfferedAndBrokenOnesMovedAside) {
    QTemporaryDir folder;
    RecoveryCopy live, dead;
    live.pid = ::getppid();  // the process that started this test still runs
    live.process_start = process_start_time(live.pid);
    dead.pid = deadPid();
    dead.written = "2026-01-02T03:04:05Z";
    write_file_atomically(folder.filePath("live.json").toStdString(), recovery_to_json(live));
    write_file_atomically(folder.filePath("dead.json").toStdString(), recovery_to_json(dead));
    write_file_atomically(folder.filePath("broken.json").toStdString(), "{\"moderato_recovery\": 1, \"pid\": ");

    const RecoveryStore::Scan scan = RecoveryStore::findOrphans(folder.path());
    ASSERT_EQ(scan.orphans.size(), 1u);
    EXPECT_EQ(scan.orphans[0].file, folder.filePath("dead.json"));
    EXPECT_EQ(scan.orphans[0].copy.written, dead.written);
    ASSERT_EQ(scan.problems.size(), 1);
    EXPECT_TRUE(scan.problems[0].contains(folder.filePath("broken.json"))) << scan.problems[0];
    EXPECT_FALSE(QFile::exists(folder.filePath("broken.json")));
    EXPECT_TRUE(QFile::exists(folder.filePath("broken.json.unreadable")));
    // Offered once: the moved-aside copy is not read again.
    EXPECT_TRUE(RecoveryStore::findOrphans(folder.path()).problems.isEmpty());
}

TEST(Recovery, RestoredEditsAreUnsavedAndBelongToTheirProject) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    const std::string projectBytes = test::read_file(project.toStdString());
    QString copyFile;
    {
        test::SampleWindow before;
        ASSERT_TRUE(before.open(project));
        rename(before.w, "kept across the crash");
        before.w.recovery()->writeNow();
        // What a killed process leaves: its copy, naming a process that is gone.
        RecoveryCopy copy = readCopy(before.w.recovery()->copyPath());
        copy.pid = deadPid();
        copyFile = before.w.recovery()->folder() + "/killed.json";
        write_file_atomically(copyFile.toStdString(), recovery_to_json(copy));
    }
    test::SampleWindow after;
    ASSERT_TRUE(test::finishLoad(after.w, [&] { EXPECT_TRUE(offerRecovery(&after.w, RecoveryAnswer::Restore)); }) ==
                MainWindow::Loaded);
    ProjectDocument* doc = after.w.document();
    EXPECT_EQ(doc->project().analyses.front().name, "kept across the crash");
    EXPECT_TRUE(doc->isModified());
    EXPECT_EQ(doc->filePath(), QFileInfo(project).absoluteFilePath());
    EXPECT_FALSE(doc->confirmSaveTarget());                           // the project file is as the edits left it
    EXPECT_FALSE(QFile::exists(copyFile));                            // taken over by this window's own copy
    EXPECT_EQ(test::read_file(project.toStdString()), projectBytes);  // restoring writes nothing
    ASSERT_TRUE(after.w.save());
    EXPECT_EQ(read_project_file(project.toStdString()).analyses.front().name, "kept across the crash");
}

TEST(Recovery, AChangedProjectFileMakesSaveAskWhere) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    QString copyFile;
    {
        test::SampleWindow before;
        ASSERT_TRUE(before.open(project));
        rename(before.w, "edits");
        before.w.recovery()->writeNow();
        RecoveryCopy copy = readCopy(before.w.recovery()->copyPath());
        copy.pid = deadPid();
        copyFile = before.w.recovery()->folder() + "/killed.json";
        write_file_atomically(copyFile.toStdString(), recovery_to_json(copy));
    }
    test::write_file(project.toStdString(),
                     test::read_file(project.toStdString()) + "\n");  // saved elsewhere meanwhile
    const std::string changedBytes = test::read_file(project.toStdString());
    test::SampleWindow after;
    ASSERT_EQ(test::finishLoad(after.w, [&] { offerRecovery(&after.w, RecoveryAnswer::Restore); }), MainWindow::Loaded);
    EXPECT_TRUE(after.w.document()->confirmSaveTarget());
    EXPECT_TRUE(after.w.lastMessage().contains("changed since these edits were made")) << after.w.lastMessage();
    EXPECT_FALSE(after.w.save());  // asks where (and this test window asks nothing): nothing written
    EXPECT_EQ(test::read_file(project.toStdString()), changedBytes);
}

TEST(Recovery, OpenBothShowsTheSavedProjectAndTheEditsInASecondWindow) {
    QTemporaryDir dir;
    const QString project = test::copySample(QStringLiteral("coffee-discount"), dir);
    {
        test::SampleWindow before;
        ASSERT_TRUE(before.open(project));
        rename(before.w, "the edits");
        before.w.recovery()->writeNow();
        RecoveryCopy copy = readCopy(before.w.recovery()->copyPath());
        copy.pid = deadPid();
        write_file_atomically((before.w.recovery()->folder() + "/killed.json").toStdString(), recovery_to_json(copy));
    }
    test::SampleWindow win;
    ASSERT_EQ(test::finishLoad(win.w, [&] { EXPECT_TRUE(offerRecovery(&win.w, RecoveryAnswer::Both)); }),
              MainWindow::Loaded);
    MainWindow* second = nullptr;
    for (QWidget* top : QApplication::topLevelWidgets())
        if (auto* m = qobject_cast<MainWindow*>(top); m && m != &win.w && m->isVisible()) second = m;
    ASSERT_NE(second, nullptr);
    second->setInteractive(false);
    ASSERT_TRUE(test::waitUntil([&] { return second->document()->isModified(); }));
    EXPECT_NE(win.w.document()->project().analyses.front().name, "the edits");  // as saved
    EXPECT_FALSE(win.w.document()->isModified());
    EXPECT_EQ(second->document()->project().analyses.front().name, "the edits");
    // Both windows name the same file: saving the edits asks where.
    EXPECT_TRUE(second->document()->confirmSaveTarget());
    EXPECT_EQ(second->document()->filePath(), QFileInfo(project).absoluteFilePath());
    second->close();  // deletes itself (and its recovery copy)
}

TEST(Recovery, DiscardRemovesTheCopy) {
    QTemporaryDir dir;
    RecoveryCopy copy;
    copy.pid = deadPid();
    test::SampleWindow win;
    const QString file = win.w.recovery()->folder() + "/discard-me.json";
    QDir().mkpath(win.w.recovery()->folder());
    write_file_atomically(file.toStdString(), recovery_to_json(copy));
    EXPECT_FALSE(offerRecovery(&win.w, RecoveryAnswer::Discard));
    EXPECT_FALSE(QFile::exists(file));
    EXPECT_FALSE(win.w.document()->isModified());
}

// ---------------------------------------------------------------- a real process, killed

namespace {

QProcess* startWorkbench(const QString& state, const QStringList& args, const QMap<QString, QString>& extra) {
    auto* p = new QProcess;
    QProcessEnvironment env = QProcessEnvironment::systemEnvironment();
    env.insert("QT_QPA_PLATFORM", "offscreen");
    env.insert("XDG_STATE_HOME", state);
    env.insert("XDG_CONFIG_HOME", state + "/config");  // settings and recent files stay in the test's folder
    for (auto it = extra.begin(); it != extra.end(); ++it) env.insert(it.key(), it.value());
    p->setProcessEnvironment(env);
    p->start(QStringLiteral(MODERATO_GUI_EXE), args);
    EXPECT_TRUE(p->waitForStarted(10000));
    return p;
}

// The copy of process `pid` in `folder`, once it holds an analysis named `name` (empty: none within `ms`).
QString waitForCopy(const QString& folder, long long pid, const std::string& name, int ms = 30000) {
    QString found;
    test::waitUntil(
        [&] {
            for (const QString& f : copiesIn(folder)) {
                try {
                    const RecoveryCopy c = readCopy(folder + "/" + f);
                    if (c.pid == pid && !c.project.analyses.empty() && c.project.analyses.front().name == name)
                        found = folder + "/" + f;
                } catch (const InputError&) {
                }
            }
            return !found.isEmpty();
        },
        ms);
    return found;
}

}  // namespace

TEST(Recovery, KilledWorkbenchGetsItsEditsBackOnTheNextStart) {
    QTemporaryDir dir, state;
    const QString project = test::copySample(QStringLiteral("orchard-nitrogen"), dir);
    const std::string projectBytes = test::read_file(project.toStdString());
    const QString folder = state.path() + "/moderato/recovery";

    std::unique_ptr<QProcess> first(
        startWorkbench(state.path(), {project}, {{"MODERATO_TEST_RENAME", "before the kill"}}));
    const QString copy = waitForCopy(folder, first->processId(), "before the kill");
    ASSERT_FALSE(copy.isEmpty()) << first->readAllStandardError().toStdString();
    first->kill();  // SIGKILL (QProcess::kill on Unix): no clean-up runs
    ASSERT_TRUE(first->waitForFinished(10000));
    EXPECT_EQ(first->exitStatus(), QProcess::CrashExit);
    ASSERT_TRUE(QFile::exists(copy));  // left behind by the killed process

    std::unique_ptr<QProcess> second(startWorkbench(state.path(), {}, {{"MODERATO_RECOVERY_ANSWER", "restore"}}));
    // The restored document holds the edit and is unsaved: the new process keeps it in its own copy.
    const QString again = waitForCopy(folder, second->processId(), "before the kill");
    EXPECT_FALSE(again.isEmpty()) << second->readAllStandardError().toStdString();
    if (!again.isEmpty()) {
        EXPECT_EQ(readCopy(again).project_path, QFileInfo(project).absoluteFilePath().toStdString());
    }
    EXPECT_FALSE(QFile::exists(copy));                                // the dead process's copy was taken over
    EXPECT_EQ(test::read_file(project.toStdString()), projectBytes);  // the project itself was never written
    second->kill();
    second->waitForFinished(10000);
}
