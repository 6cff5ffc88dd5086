// The straight-line check in the Probe section, driven through its widgets:
// the binned-estimates switch with its bin count and the smooth-curve switch
// (each one undo step), the Effect plot gaining and losing the overlays, and
// the panel's text. The data (tests/common/straight_line_data.hpp) follow an
// exactly straight interaction with no noise, so by construction every
// bin's effect at its median and every point of the smooth curve equal
// 2 + 0.3·z; the bins' medians are re-derived here from the binning's
// definition. The turbine sample shows the check as saved in its project.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QCheckBox>
#include <QDoubleSpinBox>
#include <QScrollArea>
#include <QSpinBox>
#include <QTest>
#include <QUndoStack>
#include <cmath>

#include "common/number_text.hpp"
#include "common/straight_line_data.hpp"
#include "moderato/project/project.hpp"
#include "probe/straight_line_panel.hpp"
#include "probe_window.hpp"
#include "qstring_print.hpp"
#include "screenshot.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

QString writeLineProject(const QTemporaryDir& dir) {
    test::ExactLine().write_csv(dir.filePath(QStringLiteral("line.csv")).toStdString());
    Project p;
    DataSource src;
    src.id = "line";
    src.path = "line.csv";
    p.datasets.push_back(src);
    Analysis a;
    a.id = "line";
    a.name = "x by z";
    a.dataset = "line";
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "z";
    p.analyses.push_back(a);
    const QString path = dir.filePath(QStringLiteral("line.moderato"));
    write_project_file(p, path.toStdString());
    return path;
}

// The Effect plot's graphs whose legend name starts with `prefix`.
std::vector<QCPGraph*> graphsNamed(ProbeSection* s, const QString& prefix) {
    std::vector<QCPGraph*> out;
    QCustomPlot* plot = s->effectPlot()->figurePlot();
    for (int i = 0; i < plot->graphCount(); ++i)
        if (plot->graph(i)->name().startsWith(prefix)) out.push_back(plot->graph(i));
    return out;
}

// Scrolls `w` into view (as a user would) and clicks it near its left edge
// (a check box's box and label; a wide check box ignores clicks beyond its label).
void click(QWidget* w) {
    ASSERT_NE(w, nullptr);
    for (QWidget* p = w->parentWidget(); p; p = p->parentWidget())
        if (auto* scroll = qobject_cast<QScrollArea*>(p)) scroll->ensureWidgetVisible(w);
    QCoreApplication::processEvents();
    QTest::mouseClick(w, Qt::LeftButton, Qt::NoModifier, QPoint(8, w->height() / 2));
}

struct LineWindow : test::SampleWindow {
    QTemporaryDir data;
    ProbeSection* section = nullptr;
    LineWindow() : SampleWindow(QSize(1400, 900)) {
        EXPECT_TRUE(open(writeLineProject(data)));
        showSection(AnalysisPage::Probe);
        section = w.analysisPage()->probe();
    }
    StraightLinePanel* panel() const { return section->straightLinePanel(); }
    // After a switch: the run (in a worker for the smooth curve) ends and the plots are redrawn.
    void settle() {
        EXPECT_TRUE(waitForRun());
        for (int i = 0; i < 5; ++i) QCoreApplication::processEvents();
        section->effectPlot()->figurePlot()->replot();
    }
};

}  // namespace

// The binned estimates: the switch adds one square a bin at each bin's
// median, at the straight line's value there (by construction); the bin count
// changes them; each change is one undo step, and undo takes them away again.
TEST(StraightLineCheck, BinnedEstimatesFollowTheSwitchAndTheBinCount) {
    LineWindow t;
    ASSERT_TRUE(t.panel()->isVisibleTo(t.section));
    const int graphsBefore = t.section->effectPlot()->figurePlot()->graphCount();
    EXPECT_TRUE(graphsNamed(t.section, QStringLiteral("binned estimates")).empty());
    EXPECT_FALSE(t.panel()->text().contains(QStringLiteral("Test of the straight line")));
    const int undoBefore = t.undo()->count();

    click(t.panel()->binnedToggle());
    t.settle();
    EXPECT_EQ(t.undo()->count(), undoBefore + 1);
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Show the binned estimates"));
    EXPECT_TRUE(t.analysis().probe.show_binned);
    const auto check = [&](int bins) {
        const auto g = graphsNamed(t.section, QStringLiteral("binned estimates"));
        ASSERT_EQ(g.size(), 1u) << "one graph of full bins (each holds 240 / bins rows, over the rule's 40)";
        const std::vector<double> medians = test::bin_medians(test::ExactLine().z, bins);  // re-derived
        ASSERT_EQ(g[0]->data()->size(), bins);
        int k = 0;
        for (auto it = g[0]->data()->constBegin(); it != g[0]->data()->constEnd(); ++it, ++k) {
            EXPECT_NEAR(it->key, medians[static_cast<std::size_t>(k)], 1e-12);
            // By construction: the effect at z = m is 2 + 0.3·m.
            EXPECT_NEAR(it->value, test::ExactLine::effect_at(medians[static_cast<std::size_t>(k)]), 1e-8);
        }
    };
    check(3);
    const QString text = t.panel()->text();
    const auto run = t.run();
    ASSERT_TRUE(run && run->binned);
    EXPECT_TRUE(text.contains(QStringLiteral("Test of the straight line"))) << text;
    EXPECT_TRUE(text.contains(pClauseText(run->binned->linearity.p_value))) << text;
    EXPECT_TRUE(text.contains(QString::fromStdString(linearity_sentence(*run->binned)))) << text;
    EXPECT_TRUE(text.contains(QStringLiteral("Rule: "))) << text;
    EXPECT_TRUE(text.contains(QStringLiteral("is not proof of a straight-line effect"))) << text;

    // Four bins: one step, by the spin box's arrow key.
    t.panel()->binsBox()->setFocus();
    QTest::keyClick(t.panel()->binsBox(), Qt::Key_Up);
    t.settle();
    EXPECT_EQ(t.analysis().probe.bins, 4);
    EXPECT_EQ(t.undo()->count(), undoBefore + 2);
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Use 4 bins"));
    check(4);

    t.undo()->undo();
    t.settle();
    check(3);
    t.undo()->undo();
    t.settle();
    EXPECT_FALSE(t.panel()->binnedToggle()->isChecked());
    EXPECT_TRUE(graphsNamed(t.section, QStringLiteral("binned estimates")).empty());
    EXPECT_EQ(t.section->effectPlot()->figurePlot()->graphCount(), graphsBefore);
    t.undo()->redo();
    t.settle();
    EXPECT_TRUE(t.panel()->binnedToggle()->isChecked());
    check(3);
}

// The smooth curve: computed in a worker, drawn along the moderator at the
// straight line's values (a local straight line reproduces an exactly
// straight interaction, by construction), its bandwidth in the legend and
// the panel; undo and redo take it away and bring it back.
TEST(StraightLineCheck, SmoothCurveFollowsTheSwitchWithItsBandwidth) {
    LineWindow t;
    const int graphsBefore = t.section->effectPlot()->figurePlot()->graphCount();
    click(t.panel()->smoothToggle());
    EXPECT_TRUE(t.w.runner()->busy(t.id)) << "the smooth curve is computed off the UI thread";
    t.settle();
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Show the smooth curve"));
    const auto run = t.run();
    ASSERT_TRUE(run && run->smooth) << (run && !run->straight_line_notes.empty() ? run->straight_line_notes[0] : "");
    const QString bandwidth = numberText(run->smooth->bandwidth);
    const auto curves = graphsNamed(t.section, QStringLiteral("smooth curve"));
    ASSERT_FALSE(curves.empty());
    EXPECT_EQ(curves[0]->name(), QStringLiteral("smooth curve, 95% band dotted"));
    int finite = 0;
    for (QCPGraph* g : curves)
        for (auto it = g->data()->constBegin(); it != g->data()->constEnd(); ++it) {
            if (!std::isfinite(it->value)) continue;
            ++finite;
            EXPECT_NEAR(it->value, test::ExactLine::effect_at(it->key), 1e-7) << "at z = " << it->key;
        }
    EXPECT_GE(finite, 50);  // SmoothOptions: at least 50 grid points
    EXPECT_FALSE(graphsNamed(t.section, QStringLiteral("95% band of the smooth curve")).empty());
    const QString text = t.panel()->text();
    EXPECT_TRUE(text.contains(QStringLiteral("Bandwidth %1").arg(bandwidth))) << text;
    EXPECT_TRUE(text.contains(QStringLiteral("cross-validation"))) << text;
    EXPECT_TRUE(text.contains(QStringLiteral("200 bootstrap replicates"))) << text;

    t.undo()->undo();
    t.settle();
    EXPECT_TRUE(graphsNamed(t.section, QStringLiteral("smooth curve")).empty());
    EXPECT_EQ(t.section->effectPlot()->figurePlot()->graphCount(), graphsBefore);
    t.undo()->redo();
    t.settle();
    EXPECT_FALSE(graphsNamed(t.section, QStringLiteral("smooth curve")).empty());
    EXPECT_TRUE(t.panel()->smoothToggle()->isChecked());
}

// The bandwidth box: typing a bandwidth is one undo step, the curve is then
// fitted at it ("given"), and undo goes back to cross-validation.
TEST(StraightLineCheck, TypedBandwidthIsUsedAndUndone) {
    LineWindow t;
    click(t.panel()->smoothToggle());
    t.settle();
    QDoubleSpinBox* box = t.panel()->bandwidthBox();
    ASSERT_TRUE(box->isEnabled());
    EXPECT_EQ(box->text(), QStringLiteral("bandwidth by cross-validation"));
    box->setFocus();
    box->selectAll();
    QTest::keyClicks(box, QStringLiteral("1.5"));
    QTest::keyClick(box, Qt::Key_Return);
    t.settle();
    EXPECT_EQ(t.analysis().probe.smooth_bandwidth, 1.5);
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Use bandwidth 1.500"));
    auto run = t.run();
    ASSERT_TRUE(run && run->smooth);
    EXPECT_EQ(run->smooth->bandwidth, 1.5);
    EXPECT_EQ(run->smooth->method, BandwidthMethod::Given);
    EXPECT_TRUE(t.panel()->text().contains(QStringLiteral("as given"))) << t.panel()->text();
    t.undo()->undo();
    t.settle();
    EXPECT_TRUE(std::isnan(t.analysis().probe.smooth_bandwidth));
    run = t.run();
    ASSERT_TRUE(run && run->smooth);
    EXPECT_EQ(run->smooth->method, BandwidthMethod::CrossValidation);
}

// The turbine sample's wind analysis keeps the check on in its project file:
// opened, the Effect plot shows both parts and the panel its test and bandwidth.
TEST(StraightLineCheck, TurbineSampleShowsTheCheckAsSaved) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("turbine-repairs")));
    win.w.showAnalysis(QStringLiteral("experience-wind"));
    win.id = QStringLiteral("experience-wind");
    ASSERT_TRUE(win.waitForRun());
    win.showSection(AnalysisPage::Probe);
    ProbeSection* s = win.w.analysisPage()->probe();
    for (int i = 0; i < 5; ++i) QCoreApplication::processEvents();
    ASSERT_TRUE(win.analysis().probe.show_binned && win.analysis().probe.show_smooth);
    const auto run = win.run();
    ASSERT_TRUE(run && run->binned && run->smooth);
    EXPECT_FALSE(graphsNamed(s, QStringLiteral("binned estimates")).empty() &&
                 graphsNamed(s, QStringLiteral("bin with few rows")).empty());
    EXPECT_FALSE(graphsNamed(s, QStringLiteral("smooth curve")).empty());
    const QString text = s->straightLinePanel()->text();
    EXPECT_TRUE(text.contains(QStringLiteral("Bandwidth %1").arg(numberText(run->smooth->bandwidth)))) << text;
    EXPECT_TRUE(text.contains(QString::fromStdString(linearity_sentence(*run->binned)))) << text;
    test::saveScreenshot(&win.w, QStringLiteral("straight-line-turbine.png"));
}
