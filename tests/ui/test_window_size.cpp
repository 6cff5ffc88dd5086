// The window fits a common laptop screen (1280 × 720 is a usual smallest
// desktop size today, common practice): no section may demand more.
#include <gtest/gtest.h>

#include "model/analysis_runner.hpp"
#include "sample_window.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato::ui;

TEST(WindowSize, EverySectionOfEverySampleFitsA1280By720Screen) {
    for (const QString& name : moderato::test::sampleNames()) {
        SCOPED_TRACE(name.toStdString());
        moderato::test::SampleWindow win(moderato::test::sampleProject(name));
        ASSERT_TRUE(win.run());
        MainWindow& w = win.w;
        for (int s = AnalysisPage::Specify; s <= AnalysisPage::Checks; ++s) {
            w.analysisPage()->showSection(static_cast<AnalysisPage::Section>(s));
            QCoreApplication::processEvents();
            const QSize min = w.minimumSizeHint().expandedTo(w.minimumSize());
            EXPECT_LE(min.width(), 1280) << "section " << s;
            EXPECT_LE(min.height(), 720) << "section " << s;
        }
    }
}
