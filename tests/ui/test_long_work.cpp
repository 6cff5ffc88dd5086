// Long work in the main window: opening a project and reading a data file
// run in a worker while the window stays live. The load reports its
// progress, a timer keeps firing meanwhile, Cancel (the progress dialog's
// button, clicked with the mouse) leaves the open project exactly as it was,
// and the import dialog opens without holding the caller.
//
// The big data file is about 36 MB: more than two of core's 16 MiB read
// blocks (csv.hpp, CsvTuning), so a whole read reports progress at least
// once before its end.
#include <gtest/gtest.h>

#include <QCryptographicHash>
#include <QFile>
#include <QFileInfo>
#include <QProgressBar>
#include <QPushButton>
#include <QSettings>
#include <QSignalSpy>
#include <QStatusBar>
#include <QTemporaryDir>
#include <QTest>
#include <QTimer>

#include "common/job_progress_dialog.hpp"
#include "data/import_dialog.hpp"
#include "model/project_document.hpp"
#include "qt_file_bytes.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::fileHash;

namespace {

constexpr qint64 kBlockBytes = qint64{16} << 20;  // core's read block (CsvTuning::block_size)

// Writes a CSV with the columns of the orchard-nitrogen sample and about
// 36 MB of rows (values made up by arithmetic; a block of 4000 rows repeated).
bool writeBigOrchardCsv(const QString& path) {
    QFile f(path);
    if (!f.open(QIODevice::WriteOnly)) return false;
    f.write("yield_t_ha,nitrogen_kg_ha,soil_moisture_pct,slope_pct\n");
    QByteArray block;
    for (int i = 0; i < 4000; ++i)
        block += QByteArray::number(20 + (i % 997) * 0.013, 'f', 2) + ',' + QByteArray::number(40 + i % 120) + ',' +
                 QByteArray::number(10 + (i % 331) * 0.1, 'f', 1) + ',' + QByteArray::number((i % 97) * 0.2, 'f', 1) +
                 '\n';
    while (f.size() < 36'000'000)
        if (f.write(block) != block.size()) return false;
    return true;
}

// One such file for the tests that only read it.
QString bigOrchardCsv() {
    static QTemporaryDir dir;
    static const QString path = writeBigOrchardCsv(dir.filePath(QStringLiteral("plots.csv")))
                                    ? dir.filePath(QStringLiteral("plots.csv"))
                                    : QString();
    return path;
}

}  // namespace

TEST(LongWork, CancelDuringAProjectLoadKeepsTheOpenProject) {
    QTemporaryDir open, big;
    ASSERT_TRUE(open.isValid() && big.isValid());
    const QString openProject = test::copySample(QStringLiteral("orchard-nitrogen"), open);
    // The same project beside a big data file: reading it takes a while.
    const QString bigProject = test::copySample(QStringLiteral("orchard-nitrogen"), big);
    const QString bigData = big.filePath(QStringLiteral("plots.csv"));
    ASSERT_TRUE(writeBigOrchardCsv(bigData));
    const QByteArray bigHash = fileHash(bigData), projectHash = fileHash(bigProject);

    MainWindow w;
    w.setInteractive(false);
    ASSERT_TRUE(test::openProject(w, openProject)) << w.lastMessage().toStdString();
    w.resize(1200, 800);
    w.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&w));
    // An edit, so the open project differs from its file (and can be undone).
    Analysis edited = w.document()->project().analyses.front();
    edited.name = "renamed before the cancelled open";
    w.document()->setAnalysis(edited, QStringLiteral("Rename"));
    const Project before = w.document()->project();
    const int undoSteps = w.document()->undoStack()->count();
    const QString shownAnalysis = w.analysisPage()->analysisId();
    QSettings().remove(QStringLiteral("recentFiles"));

    // Open the big project with its progress dialog (at once), then Cancel it with the mouse.
    w.setInteractive(true);
    w.setProgressDelay(0);
    QSignalSpy finished(&w, &MainWindow::loadFinished);
    w.openProject(bigProject);
    ASSERT_TRUE(w.isLoading()) << "openProject returns while the file is read";
    auto* dialog = w.findChild<JobProgressDialog*>();
    ASSERT_TRUE(dialog);
    ASSERT_TRUE(dialog->isVisible());
    EXPECT_TRUE(dialog->isModal()) << "window-modal: the project cannot be edited under the load";
    QTest::mouseClick(dialog->cancelButton(), Qt::LeftButton);
    ASSERT_TRUE(finished.count() == 1 || finished.wait(60000));
    EXPECT_EQ(finished.first().at(1).value<MainWindow::LoadResult>(), MainWindow::Cancelled);
    EXPECT_FALSE(w.isLoading());

    // Nothing changed: the project, its file path, its undo history, the page on show.
    EXPECT_TRUE(w.document()->project() == before);
    EXPECT_EQ(w.document()->filePath(), QFileInfo(openProject).absoluteFilePath());
    EXPECT_EQ(w.document()->undoStack()->count(), undoSteps);
    EXPECT_TRUE(w.document()->isModified());
    EXPECT_EQ(w.analysisPage()->analysisId(), shownAnalysis);
    EXPECT_TRUE(w.statusBar()->currentMessage().contains(QStringLiteral("cancelled")))
        << w.statusBar()->currentMessage().toStdString();
    EXPECT_FALSE(QSettings()
                     .value(QStringLiteral("recentFiles"))
                     .toStringList()
                     .contains(QFileInfo(bigProject).absoluteFilePath()));
    // The progress dialog went away; the files are as they were.
    EXPECT_TRUE(test::waitUntil([&] { return w.findChild<JobProgressDialog*>() == nullptr; }));
    EXPECT_EQ(fileHash(bigData), bigHash);
    EXPECT_EQ(fileHash(bigProject), projectHash);
    w.setInteractive(false);
    w.document()->undoStack()->setClean();  // no question on close
}

TEST(LongWork, ProgressIsReportedWhileAFileIsRead) {
    const QString csv = bigOrchardCsv();
    ASSERT_FALSE(csv.isEmpty());
    // More than two read blocks (by construction above).
    ASSERT_GT(QFileInfo(csv).size(), 2 * kBlockBytes);
    MainWindow w;
    w.setInteractive(true);
    w.setProgressDelay(0);
    w.resize(1000, 700);
    w.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&w));
    QSignalSpy progress(&w, &MainWindow::loadProgress);
    QSignalSpy finished(&w, &MainWindow::loadFinished);
    w.importData(csv, CsvOptions{});
    auto* dialog = w.findChild<JobProgressDialog*>();
    ASSERT_TRUE(dialog);
    QProgressBar* bar = dialog->progressBar();
    int barSeen = 0;  // the dialog's bar follows the progress
    QObject::connect(bar, &QProgressBar::valueChanged, [&](int v) { barSeen = std::max(barSeen, v); });
    ASSERT_TRUE(finished.wait(60000));
    EXPECT_EQ(finished.first().at(1).value<MainWindow::LoadResult>(), MainWindow::Loaded)
        << w.lastMessage().toStdString();

    ASSERT_GE(progress.count(), 2);
    int last = -1;
    bool partway = false;
    for (const QList<QVariant>& signal : progress) {
        const int permille = signal.at(0).toInt();
        EXPECT_GE(permille, 0);
        EXPECT_LE(permille, 1000);
        EXPECT_GE(permille, last) << "progress never goes back";
        partway = partway || (permille > 0 && permille < 1000);
        last = permille;
    }
    EXPECT_TRUE(partway) << "a value between the start and the end (the file spans several blocks)";
    EXPECT_EQ(last, 1000) << "the whole file was read";
    EXPECT_GT(barSeen, 0);
    // The table is the whole file: one row per data line (counted here).
    QFile f(csv);
    ASSERT_TRUE(f.open(QIODevice::ReadOnly));
    std::size_t lines = 0;
    while (!f.atEnd()) lines += static_cast<std::size_t>(f.read(1 << 20).count('\n'));
    ASSERT_EQ(w.document()->project().datasets.size(), 1u);
    EXPECT_EQ(w.document()->table(w.document()->project().datasets[0].id)->rows(), lines - 1);
    w.setInteractive(false);
    w.document()->undoStack()->setClean();
}

TEST(LongWork, TheWindowStaysLiveWhileAFileIsRead) {
    const QString csv = bigOrchardCsv();
    ASSERT_FALSE(csv.isEmpty());
    MainWindow w;
    w.setInteractive(false);
    int ticks = 0, ticksWhenDone = -1;
    QTimer timer;
    timer.setInterval(5);
    QObject::connect(&timer, &QTimer::timeout, [&] { ++ticks; });
    QObject::connect(&w, &MainWindow::loadFinished, [&] { ticksWhenDone = ticks; });
    timer.start();
    QSignalSpy finished(&w, &MainWindow::loadFinished);
    w.importData(csv, CsvOptions{});
    // The call returned before the file was read: nothing is added yet.
    EXPECT_TRUE(w.isLoading());
    EXPECT_TRUE(w.document()->project().datasets.empty());
    ASSERT_TRUE(finished.wait(60000));
    EXPECT_EQ(finished.first().at(1).value<MainWindow::LoadResult>(), MainWindow::Loaded);
    EXPECT_GT(ticksWhenDone, 0) << "the timer fired while the file was read";
    EXPECT_EQ(w.document()->project().datasets.size(), 1u);
    w.document()->undoStack()->setClean();
}

TEST(LongWork, ASecondLoadWaitsForTheFirst) {
    const QString csv = bigOrchardCsv();
    ASSERT_FALSE(csv.isEmpty());
    MainWindow w;
    w.setInteractive(false);
    QSignalSpy finished(&w, &MainWindow::loadFinished);
    w.importData(csv, CsvOptions{});
    ASSERT_TRUE(w.isLoading());
    // Another open while the first runs is refused at once, and says why.
    w.openProject(test::sampleProject(QStringLiteral("coffee-discount")));
    ASSERT_EQ(finished.count(), 1);
    EXPECT_EQ(finished.first().at(0).toString(), test::sampleProject(QStringLiteral("coffee-discount")));
    EXPECT_EQ(finished.first().at(1).value<MainWindow::LoadResult>(), MainWindow::Failed);
    EXPECT_TRUE(w.lastMessage().contains(QStringLiteral("still being read"))) << w.lastMessage().toStdString();
    EXPECT_TRUE(w.isLoading());
    ASSERT_TRUE(finished.wait(60000));
    EXPECT_EQ(finished.last().at(0).toString(), csv);
    EXPECT_EQ(finished.last().at(1).value<MainWindow::LoadResult>(), MainWindow::Loaded);
    w.document()->undoStack()->setClean();
}

TEST(LongWork, TheImportDialogOpensWithoutHoldingTheWindow) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString csv = dir.filePath(QStringLiteral("plots.csv"));
    ASSERT_TRUE(QFile::copy(test::samplesDir() + QStringLiteral("/orchard-nitrogen/plots.csv"), csv));
    MainWindow w;
    w.resize(1000, 700);
    w.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&w));
    w.openPath(csv);  // interactive: the import dialog, opened over the window
    auto* dialog = w.findChild<ImportDialog*>();
    ASSERT_TRUE(dialog);
    EXPECT_TRUE(dialog->isVisible());
    EXPECT_TRUE(w.document()->project().datasets.empty()) << "nothing is added before Load";
    QTest::mouseClick(dialog->findChild<QPushButton*>(QStringLiteral("import-load")), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return !w.document()->project().datasets.empty(); }, 30000));
    EXPECT_EQ(w.document()->project().datasets[0].id, "plots");
    // 480 data rows in the sample file (sample-projects/orchard-nitrogen/plots.csv has 481 lines).
    EXPECT_EQ(w.document()->table("plots")->rows(), 480u);
    EXPECT_TRUE(test::waitUntil([&] { return w.findChild<ImportDialog*>() == nullptr; }))
        << "the dialog deletes itself when it closes";
    w.setInteractive(false);
    w.document()->undoStack()->setClean();
}
