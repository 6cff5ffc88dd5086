// The Probe screen for a multilevel analysis (the warehouse-picking sample:
// pickers in 60 warehouses, weeks on the job × automation, a random slope
// for weeks): the Effect plot's dotted lines where the groups' own slopes
// lie, and the Lines plot's faint lines of 20 groups' own fits, against
// core's fit of the same analysis computed here (direct_fit) and the
// definitions: effect ± 1.959964 × √τ (the normal 97.5 % quantile, from
// memory), and the fixed part at a group's automation plus its modes.
#include <gtest/gtest.h>

#include <cmath>

#include "common/direct_fit.hpp"
#include "common/figure_caption.hpp"
#include "moderato/probing/multilevel_probe.hpp"
#include "moderato/support/report_text.hpp"
#include "probe_window.hpp"
#include "qstring_print.hpp"
#include "ui_test_util.hpp"

using namespace moderato;

TEST(ProbeMultilevel, EffectPlotShowsWhereTheGroupsOwnSlopesLie) {
    const QString project = test::sampleProject(QStringLiteral("warehouse-picking"));
    test::ProbeWindow pw(project);
    const test::DirectFit direct = test::direct_fit(project.toStdString());
    ASSERT_TRUE(direct.fit.multilevel);
    const double tau = direct.fit.multilevel->covariance(1, 1);
    const auto& e = pw.section->effectPlot()->data();
    ASSERT_EQ(e.groupSpread.size(), e.curve.size());
    EXPECT_EQ(e.groupSpreadName, QStringLiteral("95% of groups' own slopes"));
    // 1.959963984540054: the normal 97.5 % quantile (from memory); tau: core's fit (direct_fit, computed here).
    for (std::size_t k = 0; k < e.curve.size(); k += 16) {
        EXPECT_NEAR(e.groupSpread[k].upper - e.curve[k].estimate, 1.959963984540054 * std::sqrt(tau), 1e-9);
        EXPECT_NEAR(e.curve[k].estimate - e.groupSpread[k].lower, 1.959963984540054 * std::sqrt(tau), 1e-9);
    }
}

TEST(ProbeMultilevel, LinesPlotDrawsTwentyGroupsOwnLines) {
    const QString project = test::sampleProject(QStringLiteral("warehouse-picking"));
    test::ProbeWindow pw(project);
    const test::DirectFit direct = test::direct_fit(project.toStdString());
    const auto& l = pw.section->linesPlot()->data();
    ASSERT_EQ(l.groupLines.size(), 20u);
    EXPECT_EQ(l.groupLinesName, QStringLiteral("20 of 60 groups' own lines"));
    const auto chosen = group_lines(direct.design, direct.fit, "weeks_on_job", "automation_pct", 20);
    const Eigen::VectorXd& f = direct.fit.beta;
    const auto at = [&](std::vector<std::string> factors) { return f[test::coefficient_index(direct.fit, factors)]; };
    const double b0 = at({"intercept"}), bx = at({"weeks_on_job"}), bw = at({"automation_pct"}),
                 bxw = at({"weeks_on_job", "automation_pct"});
    // The shift control is held at its reference level (day) on every line, as on the main lines.
    for (std::size_t g = 0; g < chosen.size(); ++g)
        for (const CurvePoint& c : {l.groupLines[g].front(), l.groupLines[g].back()}) {
            const double w = chosen[g].moderator;
            const double want =
                b0 + bx * c.x + bw * w + bxw * c.x * w + chosen[g].intercept_shift + chosen[g].slope_shift * c.x;
            // want: the definition applied to core's fit (direct_fit and group_lines, computed here).
            EXPECT_NEAR(c.estimate, want, 1e-9 * std::abs(want)) << chosen[g].group;
        }
}

// Figure captions name a multilevel model, its groups and how it was
// estimated (the words of core's fit: REML, Satterthwaite df).
TEST(ProbeMultilevel, CaptionsNameTheGroupsAndTheEstimation) {
    const test::DirectFit direct =
        test::direct_fit(test::sampleProject(QStringLiteral("warehouse-picking")).toStdString());
    const AnalysisRun run = run_analysis(direct.table, direct.analysis);
    const QString caption = ui::figureCaption(direct.analysis, run);
    EXPECT_TRUE(caption.startsWith(QStringLiteral("Multilevel linear model of items_per_hour"))) << caption;
    EXPECT_TRUE(caption.contains(QStringLiteral("60 groups of warehouse"))) << caption;
    EXPECT_TRUE(caption.contains(QStringLiteral("model-based (REML, Satterthwaite df) SEs"))) << caption;
}

// The side panel's joint test names the multilevel standard errors and
// writes Satterthwaite's df to four significant digits (format_df).
TEST(ProbeMultilevel, TheJointTestNamesItsStandardErrorsAndDf) {
    const QString project = test::sampleProject(QStringLiteral("warehouse-picking"));
    test::ProbeWindow pw(project);
    const test::DirectProbe direct = test::direct_probe(project.toStdString());
    const QString df = QString::fromStdString(format_df(direct.probe.interaction_test->df2));
    ASSERT_EQ(df.size(), 5) << df;  // e.g. "51.88"
    const QString text = pw.section->summaryText();
    EXPECT_TRUE(text.contains(QStringLiteral("with model-based (REML, Satterthwaite df) standard errors"))) << text;
    EXPECT_TRUE(text.contains(QStringLiteral("F(1, %1) = ").arg(df))) << text;
}
