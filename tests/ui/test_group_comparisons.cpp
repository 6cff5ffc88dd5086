// A categorical moderator with three groups in the workbench: the joint test
// of the interaction and every pairwise difference in the Probe summary, the
// adjustment chosen above the plots, and the reference level chosen in
// Specify — each driven with the keyboard and undone. Every number shown is
// checked against core's probe() on the same data (whose numbers are checked
// against statsmodels in tests/core/test_slope_contrasts.cpp).
#include <gtest/gtest.h>

#include <QComboBox>
#include <QLabel>
#include <QTest>
#include <QUndoStack>

#include "common/direct_fit.hpp"
#include "common/number_text.hpp"
#include "moderato/probing/probe.hpp"
#include "plots/lines_plot.hpp"
#include "sample_window.hpp"
#include "sections/probe_section.hpp"
#include "sections/specify_section.hpp"
#include "shell/analysis_page.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

const QString kHelpdesk = QStringLiteral("helpdesk-staffing");

// The summary line of one pair as the workbench writes it.
QString pairLine(const SlopeContrast& c, double level) {
    return QStringLiteral("%1 − %2: %3 (SE %4, %5 CI %6 to %7), %8, adjusted %9")
        .arg(QString::fromStdString(c.second), QString::fromStdString(c.first), numberText(c.estimate),
             numberText(c.std_error), levelText(level), numberText(c.ci_lower), numberText(c.ci_upper),
             pClauseText(c.p_value), pClauseText(c.p_adjusted));
}

ProbeResult coreProbe(const std::string& project, Adjustment adjustment) {
    test::DirectFit d = test::direct_fit(project);
    ProbeSpec ps;
    ps.focal = d.analysis.roles.focal;
    ps.moderator = d.analysis.roles.moderator;
    ps.adjustment = adjustment;
    return probe(d.design, d.fit, ps);
}

}  // namespace

TEST(GroupComparisons, ProbeShowsTheJointTestAndEveryPairWithTheChosenAdjustment) {
    test::SampleWindow win(test::sampleProject(kHelpdesk));
    win.showSection(AnalysisPage::Probe);
    ProbeSection* probe = win.w.analysisPage()->probe();
    QComboBox* adjust = probe->adjustmentChoice();
    ASSERT_TRUE(adjust->isVisible());  // three groups of shift: three pairs
    EXPECT_EQ(adjust->currentData().toInt(), static_cast<int>(Adjustment::Holm));

    const std::string project = test::sampleProject(kHelpdesk).toStdString();
    const ProbeResult holm = coreProbe(project, Adjustment::Holm);
    ASSERT_EQ(holm.slope_contrasts.size(), 3u);
    const QString summary = probe->summaryText();
    const WaldTest& t = *holm.interaction_test;
    EXPECT_TRUE(
        summary.contains(QStringLiteral("Joint test of the interaction with HC3 standard errors (the test "
                                        "to report): F(%1, %2) = %3, %4.")
                             .arg(exactText(t.df1), exactText(t.df2), numberText(t.statistic), pClauseText(t.p_value))))
        << summary.toStdString();
    EXPECT_TRUE(summary.contains(QStringLiteral("(p Holm-adjusted)")));
    for (const auto& c : holm.slope_contrasts)
        EXPECT_TRUE(summary.contains(pairLine(c, holm.level))) << pairLine(c, holm.level).toStdString();

    // Bonferroni, chosen with the keyboard: one undo step, a new run, new numbers.
    const int steps = win.undo()->count();
    test::chooseByKeys(adjust, adjust->findData(static_cast<int>(Adjustment::Bonferroni)));
    ASSERT_TRUE(test::waitUntil([&] {
        return win.run() && win.run()->probe && win.run()->probe->adjustment == Adjustment::Bonferroni &&
               test::runEnded(win.w, win.id);
    }));
    EXPECT_EQ(win.analysis().probe.adjustment, Adjustment::Bonferroni);
    EXPECT_EQ(win.undo()->count(), steps + 1);
    const ProbeResult bonf = coreProbe(project, Adjustment::Bonferroni);
    const QString after = probe->summaryText();
    EXPECT_TRUE(after.contains(QStringLiteral("(p Bonferroni-adjusted)")));
    for (const auto& c : bonf.slope_contrasts) EXPECT_TRUE(after.contains(pairLine(c, bonf.level)));

    win.undo()->undo();
    ASSERT_TRUE(test::waitUntil([&] {
        return win.run() && win.run()->probe && win.run()->probe->adjustment == Adjustment::Holm &&
               test::runEnded(win.w, win.id);
    }));
    EXPECT_EQ(adjust->currentData().toInt(), static_cast<int>(Adjustment::Holm));
    EXPECT_TRUE(probe->summaryText().contains(QStringLiteral("(p Holm-adjusted)")));
}

TEST(GroupComparisons, NumericModeratorHasNoAdjustmentButStillItsJointTest) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    ProbeSection* probe = win.w.analysisPage()->probe();
    EXPECT_FALSE(probe->adjustmentChoice()->isVisible());
    EXPECT_TRUE(probe->summaryText().contains(QStringLiteral("Joint test of the interaction with HC3")));
    EXPECT_FALSE(probe->summaryText().contains(QStringLiteral("Differences between groups")));
    win.showSection(AnalysisPage::Specify);
    EXPECT_FALSE(win.w.analysisPage()->specify()->referenceBox()->isVisible());  // no categorical moderator
}

TEST(GroupComparisons, ReferenceLevelChosenInSpecifyReordersTheGroupsAndUndoes) {
    test::SampleWindow win(test::sampleProject(kHelpdesk));
    win.showSection(AnalysisPage::Specify);
    QComboBox* box = win.w.analysisPage()->specify()->referenceBox();
    ASSERT_TRUE(box->isVisible());
    ASSERT_EQ(box->count(), 3);
    EXPECT_EQ(box->currentText(), QStringLiteral("day"));  // first in text order: the default
    const int steps = win.undo()->count();
    test::chooseByKeys(box, box->findText(QStringLiteral("night")));
    ASSERT_TRUE(test::waitUntil([&] {
        return win.run() && win.run()->probe && win.run()->probe->effects.front().level == "night" &&
               test::runEnded(win.w, win.id);
    }));
    EXPECT_EQ(win.undo()->count(), steps + 1);  // the keys passed 'evening': one step all the same
    EXPECT_EQ(win.analysis().reference_levels.at("shift"), "night");
    EXPECT_EQ(win.undo()->undoText(), QStringLiteral("Set reference level of 'shift' to 'night'"));
    // the first pair now compares with night; the same difference as core's (day, night), negated (algebra)
    const ProbeResult before = coreProbe(test::sampleProject(kHelpdesk).toStdString(), Adjustment::Holm);
    const SlopeContrast& shown = win.run()->probe->slope_contrasts.front();
    EXPECT_EQ(shown.first, "night");
    EXPECT_EQ(shown.second, "day");
    ASSERT_EQ(before.slope_contrasts[1].first, "day");
    ASSERT_EQ(before.slope_contrasts[1].second, "night");
    EXPECT_NEAR(shown.estimate, -before.slope_contrasts[1].estimate, 1e-10);
    EXPECT_TRUE(win.w.analysisPage()->specify()->equationLabel()->toolTip().contains(QStringLiteral("[shift = day]")));

    win.undo()->undo();
    ASSERT_TRUE(test::waitUntil([&] {
        return win.run() && win.run()->probe && win.run()->probe->effects.front().level == "day" &&
               test::runEnded(win.w, win.id);
    }));
    EXPECT_TRUE(win.analysis().reference_levels.empty());
    EXPECT_EQ(box->currentText(), QStringLiteral("day"));
}

// Three groups cross in three places inside the data: each diamond names its pair.
TEST(GroupComparisons, CrossoverMarkersNameTheirPair) {
    test::SampleWindow win(test::sampleProject(kHelpdesk));
    win.showSection(AnalysisPage::Probe);
    const LinesPlot* lines = win.w.analysisPage()->probe()->linesPlot();
    const ProbeResult& p = *win.run()->probe;
    QStringList want;
    std::size_t pair = 0;
    for (std::size_t a = 0; a < 3; ++a)
        for (std::size_t b = a + 1; b < 3; ++b, ++pair) {
            const Crossover& c = p.crossovers[pair];
            if (c.within_observed_range) want << QString::fromStdString(p.effects[a].level + "/" + p.effects[b].level);
        }
    EXPECT_EQ(want.size(), 3);  // all three inside 3..14 agents (the sample's lines cross at about 8, 9.6, 10.6)
    EXPECT_EQ(lines->crossoverLabels(), want);
    EXPECT_EQ(lines->crossoverMarkerCount(), 3);
}
