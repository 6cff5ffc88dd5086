// The set-up most workbench tests share: a main window that asks the user
// nothing (setInteractive(false)), shown at a realistic size, with a project
// open in it and the run of the analysis it shows ended.
//
//   test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
//   win.showSection(AnalysisPage::Checks);
#pragma once

#include <gtest/gtest.h>

#include <QSize>
#include <QString>
#include <QTemporaryDir>
#include <QTest>
#include <QUndoStack>
#include <memory>

#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

namespace moderato::test {

// Whether analysis `id`'s run has ended and the window is idle: no fit is
// running, it left a result or an error, and the Probe section is not
// preparing its plots in a worker (big data: ProbeSection::isPreparing).
inline bool runEnded(const ui::MainWindow& w, const QString& id) {
    return !w.runner()->busy(id) && !w.analysisPage()->probe()->isPreparing() &&
           (w.runner()->result(id) || !w.runner()->error(id).isEmpty());
}

// Processes events until that holds or `ms` pass; whether it held.
inline bool waitForRun(const ui::MainWindow& w, const QString& id, int ms = 10000) {
    return waitUntil([&] { return runEnded(w, id); }, ms);
}

struct SampleWindow {
    QTemporaryDir dir;  // for copies of sample projects (copy()); outlives the window
    ui::MainWindow w;
    QString id;  // the analysis the window shows, once a project is open

    // The window alone, shown, with nothing open yet.
    explicit SampleWindow(QSize size = {1400, 900}) {
        w.setInteractive(false);
        w.resize(size);
        w.show();
    }
    // The window with `project` open and its run ended with a result.
    explicit SampleWindow(const QString& project, QSize size = {1400, 900}) : SampleWindow(size) {
        EXPECT_TRUE(open(project)) << w.runner()->error(id).toStdString();
    }

    // Opens `project` and waits until the run of the analysis it shows has
    // ended; whether it ended with a result. A failed open, or a run that does
    // not end, is a test failure here.
    bool open(const QString& project) {
        const bool loaded = openProject(w, project);
        EXPECT_TRUE(loaded) << w.lastMessage().toStdString();
        if (!loaded) return false;
        id = w.analysisPage()->analysisId();
        EXPECT_TRUE(waitForRun()) << "the run of analysis '" << id.toStdString() << "' did not end";
        return w.runner()->result(id) != nullptr;
    }
    // Copies sample `name` into `dir`; returns the copy's project file (not opened).
    QString copy(const QString& name) const { return copySample(name, dir); }

    bool waitForRun() const { return test::waitForRun(w, id); }
    std::shared_ptr<const AnalysisRun> run() const { return w.runner()->result(id); }
    const Analysis& analysis() const { return *w.document()->analysis(id); }
    QUndoStack* undo() const { return w.document()->undoStack(); }

    // Shows one section of the analysis and waits until the window is on screen.
    void showSection(ui::AnalysisPage::Section section) {
        w.analysisPage()->showSection(section);
        EXPECT_TRUE(QTest::qWaitForWindowExposed(&w));
    }
    // Makes the window the active one (window shortcuts need it).
    void activate() {
        w.activateWindow();
        EXPECT_TRUE(QTest::qWaitForWindowActive(&w));
    }
};

}  // namespace moderato::test
