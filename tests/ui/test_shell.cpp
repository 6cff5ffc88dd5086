// The shell: each sample project opens with a ready analysis, and the
// numbers on the analysis come from the same core calls the CLI makes.
#include <gtest/gtest.h>

#include "common/direct_fit.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "sample_window.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

TEST(Shell, EverySampleProjectOpensWithAReadyAnalysis) {
    for (const QString& name : test::sampleNames()) {
        SCOPED_TRACE(name.toStdString());
        test::SampleWindow win;
        MainWindow& w = win.w;
        const bool ran = win.open(test::sampleProject(name));
        ASSERT_FALSE(w.document()->project().analyses.empty());
        ASSERT_FALSE(win.id.isEmpty());
        EXPECT_TRUE(w.runner()->error(win.id).isEmpty()) << w.runner()->error(win.id).toStdString();
        ASSERT_TRUE(ran);
        const auto run = win.run();
        // The same fit computed directly through core (what moderato-cli does).
        const test::DirectFit direct = test::direct_fit(test::sampleProject(name).toStdString());
        ASSERT_EQ(direct.fit.beta.size(), run->fit.beta.size());
        for (Eigen::Index i = 0; i < direct.fit.beta.size(); ++i)
            EXPECT_DOUBLE_EQ(direct.fit.beta[i], run->fit.beta[i]);
        EXPECT_TRUE(direct.loaded.warnings.empty()) << "sample data changed since the project was written";
    }
}
