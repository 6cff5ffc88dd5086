// The shell: each sample project opens with a ready analysis, and the
// numbers on the analysis come from the same core calls the CLI makes.
#include <gtest/gtest.h>

#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

TEST(Shell, EverySampleProjectOpensWithAReadyAnalysis) {
    for (const QString& name : test::sampleNames()) {
        SCOPED_TRACE(name.toStdString());
        MainWindow w;
        w.setInteractive(false);
        ASSERT_TRUE(test::openProject(w, test::sampleProject(name))) << w.lastMessage().toStdString();
        ASSERT_FALSE(w.document()->project().analyses.empty());
        const QString id = w.analysisPage()->analysisId();
        ASSERT_FALSE(id.isEmpty());
        ASSERT_TRUE(test::waitUntil([&] { return w.runner()->result(id) || !w.runner()->error(id).isEmpty(); }));
        EXPECT_TRUE(w.runner()->error(id).isEmpty()) << w.runner()->error(id).toStdString();
        const auto run = w.runner()->result(id);
        ASSERT_TRUE(run);
        // The same fit computed directly through core (what moderato-cli does).
        const LoadedProject loaded = load_project(test::sampleProject(name).toStdString());
        const Analysis& a = loaded.project.analyses.front();
        const Design d = build_design(*loaded.tables.at(a.dataset), model_spec(a));
        const FitResult direct = fit_design(d, model_spec(a));
        ASSERT_EQ(direct.beta.size(), run->fit.beta.size());
        for (Eigen::Index i = 0; i < direct.beta.size(); ++i) EXPECT_DOUBLE_EQ(direct.beta[i], run->fit.beta[i]);
        EXPECT_TRUE(loaded.warnings.empty()) << "sample data changed since the project was written";
    }
}
