// Work in a worker never shows an outdated answer. The analysis runner, the
// Probe section and the Checks section compute in a worker (their thresholds
// set to 0 here, so the small sample projects take the path that big data
// take); when the user
// changes the model while a worker runs, the old worker's result is dropped
// and never reaches the screen, and Cancel (the button, clicked with the
// mouse) stops waiting and keeps what was on show.
//
// Expected values come from core called directly on the same settings (the
// run the workbench shows must be the run of the newest settings, by
// construction of "newest request wins").
#include <gtest/gtest.h>

#include <QLabel>
#include <QProgressBar>
#include <QPushButton>
#include <QSignalSpy>
#include <QTest>
#include <QThreadPool>
#include <QTimer>
#include <vector>

#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/estimation/diagnostics.hpp"
#include "sample_window.hpp"
#include "sections/checks_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// Waits until every worker of the pool has returned, then delivers what they sent.
void drainWorkers() {
    QThreadPool::globalInstance()->waitForDone();
    QCoreApplication::processEvents();
    QCoreApplication::processEvents();
}

void setSe(test::SampleWindow& win, SeKind se) {
    Analysis a = win.analysis();
    a.se = se;
    win.w.document()->setAnalysis(a, QStringLiteral("Standard errors"));
}

// The same analysis with one control fewer: a different fit (fewer coefficients).
void dropControl(test::SampleWindow& win) {
    Analysis a = win.analysis();
    ASSERT_FALSE(a.roles.controls.empty());
    a.roles.controls.pop_back();
    win.w.document()->setAnalysis(a, QStringLiteral("Controls"));
}

}  // namespace

TEST(StaleResults, AResultForSettingsChangedSinceIsNeverShown) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    AnalysisRunner* runner = win.w.runner();
    runner->setBackgroundThreshold(0);  // every fit in a worker
    std::vector<SeKind> shown;          // the SE kind of every run the sections were handed
    QObject::connect(runner, &AnalysisRunner::resultChanged, runner, [&](const QString& id) {
        if (id == win.id && runner->result(id)) shown.push_back(runner->result(id)->spec.se);
    });
    // Two changes in one turn of the event loop: the first worker's fit is
    // outdated before it can report.
    setSe(win, SeKind::HC1);
    EXPECT_TRUE(runner->busy(win.id));
    setSe(win, SeKind::HC2);
    ASSERT_TRUE(win.waitForRun());
    drainWorkers();  // the first worker has certainly reported by now
    ASSERT_EQ(shown.size(), 1u);
    EXPECT_EQ(shown.front(), SeKind::HC2);
    // The numbers are those of the newest settings (core, called directly).
    const auto run = win.run();
    const AnalysisRun direct = run_analysis(run->table, win.analysis());
    ASSERT_EQ(run->fit.coefficients.size(), direct.fit.coefficients.size());
    for (std::size_t k = 0; k < direct.fit.coefficients.size(); ++k)
        EXPECT_EQ(run->fit.coefficients[k].std_error, direct.fit.coefficients[k].std_error) << k;
}

TEST(StaleResults, CancelKeepsTheEarlierRunAndTheNextChangeFitsAgain) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    AnalysisRunner* runner = win.w.runner();
    AnalysisPage* page = win.w.analysisPage();
    runner->setBackgroundThreshold(0);
    const auto before = win.run();
    ASSERT_TRUE(before);
    // Kinds other than the one on show, so each change asks for a new fit.
    const SeKind dropped = before->spec.se == SeKind::HC1 ? SeKind::HC4 : SeKind::HC1;
    const SeKind next = before->spec.se == SeKind::HC2 ? SeKind::HC0 : SeKind::HC2;
    setSe(win, dropped);
    ASSERT_TRUE(runner->busy(win.id));
    ASSERT_TRUE(page->cancelButton()->isVisible());
    EXPECT_TRUE(page->busyIndicator()->isVisible());
    QTest::mouseClick(page->cancelButton(), Qt::LeftButton);
    EXPECT_FALSE(runner->busy(win.id));
    EXPECT_TRUE(runner->stopped(win.id));
    EXPECT_FALSE(page->cancelButton()->isVisible());
    EXPECT_FALSE(page->busyIndicator()->isVisible());
    EXPECT_TRUE(page->findChild<QLabel*>(QStringLiteral("analysis-status"))->text().contains(QStringLiteral("cancel")));
    drainWorkers();
    EXPECT_EQ(win.run(), before);  // the worker's fit was dropped
    EXPECT_EQ(win.run()->spec.se, before->spec.se);
    // The next change fits again, and its result shows.
    setSe(win, next);
    EXPECT_TRUE(runner->busy(win.id));
    ASSERT_TRUE(win.waitForRun());
    EXPECT_FALSE(runner->stopped(win.id));
    ASSERT_TRUE(win.run());
    EXPECT_EQ(win.run()->spec.se, next);
    // Going back to the settings on show after a cancel needs no fit: it is no longer "cancelled".
    setSe(win, dropped);
    QTest::mouseClick(page->cancelButton(), Qt::LeftButton);
    ASSERT_TRUE(runner->stopped(win.id));
    setSe(win, next);
    EXPECT_FALSE(runner->busy(win.id));
    EXPECT_FALSE(runner->stopped(win.id));
    EXPECT_TRUE(page->findChild<QLabel*>(QStringLiteral("analysis-status"))->text().isEmpty());
}

TEST(StaleResults, ChecksOfAnOutdatedFitAreDropped) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    ChecksSection* checks = win.w.analysisPage()->checks();
    checks->setBackgroundThreshold(0);  // the diagnostics in a worker
    QSignalSpy computed(checks, &ChecksSection::computed);
    win.showSection(AnalysisPage::Checks);
    ASSERT_TRUE(checks->isComputing());
    EXPECT_FALSE(checks->shownDiagnostics());
    dropControl(win);  // a new fit (on this thread: the runner's threshold is untouched)
    ASSERT_TRUE(win.waitForRun());
    ASSERT_TRUE(test::waitUntil([&] { return !checks->isComputing(); }));
    drainWorkers();  // the first pass has certainly reported by now
    EXPECT_EQ(computed.count(), 1);
    const auto run = win.run();
    const auto shown = checks->shownDiagnostics();
    ASSERT_TRUE(shown);
    // Those of the new fit: core's diagnostics of it, called directly.
    const Diagnostics direct = diagnostics(run->design, run->fit);
    EXPECT_EQ(shown->p, direct.p);
    EXPECT_EQ(shown->p, static_cast<int>(run->fit.beta.size()));
    ASSERT_EQ(shown->leverage.size(), direct.leverage.size());
    for (Eigen::Index i = 0; i < direct.leverage.size(); ++i) EXPECT_EQ(shown->leverage[i], direct.leverage[i]) << i;
}

TEST(StaleResults, CancellingTheChecksShowsNothingOldAndComputeAgainWorks) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    ChecksSection* checks = win.w.analysisPage()->checks();
    checks->setBackgroundThreshold(0);
    QSignalSpy computed(checks, &ChecksSection::computed);
    win.showSection(AnalysisPage::Checks);
    ASSERT_TRUE(checks->isComputing());
    QPushButton* cancel = checks->cancelButton();
    ASSERT_TRUE(cancel->isVisible());
    QTest::mouseClick(cancel, Qt::LeftButton);
    EXPECT_FALSE(checks->isComputing());
    drainWorkers();
    EXPECT_EQ(computed.count(), 0);  // the cancelled pass never shows
    EXPECT_FALSE(checks->shownDiagnostics());
    EXPECT_TRUE(checks->findChild<QLabel*>(QStringLiteral("checks-note"))->text().contains(QStringLiteral("cancel")));
    // The same button now computes them again.
    ASSERT_TRUE(cancel->isVisible());
    QTest::mouseClick(cancel, Qt::LeftButton);
    ASSERT_TRUE(checks->isComputing());
    ASSERT_TRUE(test::waitUntil([&] { return !checks->isComputing(); }));
    EXPECT_EQ(computed.count(), 1);
    ASSERT_TRUE(checks->shownDiagnostics());
    EXPECT_EQ(checks->shownDiagnostics()->n, static_cast<std::size_t>(win.run()->design.X.rows()));
    EXPECT_FALSE(cancel->isVisible());
}

TEST(StaleResults, TheProbePlotsFollowTheNewestRunOnly) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    AnalysisPage* page = win.w.analysisPage();
    ProbeSection* probe = page->probe();
    page->setBackgroundThreshold(0);  // the Probe section prepares its engine in a worker
    const auto first = win.run();
    ASSERT_TRUE(first);
    ASSERT_EQ(&probe->engine().run(), first.get());
    std::vector<const AnalysisRun*> built;  // the run of the engine after each preparation ended
    QObject::connect(probe, &ProbeSection::preparingChanged, probe, [&](bool preparing) {
        if (!preparing) QTimer::singleShot(0, probe, [&] { built.push_back(&probe->engine().run()); });
    });
    // Two new fits (on this thread) in one turn: the first run's preparation is dropped.
    setSe(win, first->spec.se == SeKind::HC1 ? SeKind::HC4 : SeKind::HC1);
    const auto second = win.run();
    ASSERT_TRUE(probe->isPreparing());
    EXPECT_EQ(&probe->engine().run(), first.get());  // the earlier plots stay until the new ones are ready
    setSe(win, first->spec.se == SeKind::HC2 ? SeKind::HC0 : SeKind::HC2);
    const auto third = win.run();
    ASSERT_NE(second, third);
    ASSERT_TRUE(win.waitForRun());
    drainWorkers();
    EXPECT_EQ(&probe->engine().run(), third.get());
    for (const AnalysisRun* r : built) EXPECT_NE(r, second.get()) << "an outdated run reached the plots";
    // The readout shows the newest run's effect (core's probe, called directly on it).
    const AnalysisRun direct = run_analysis(third->table, win.analysis());
    ASSERT_FALSE(direct.probe->effects.empty());
    EXPECT_EQ(probe->engine().probe().effects.front().std_error, direct.probe->effects.front().std_error);
}
