// Jitter on the Lines plot: a discrete focal predictor (a few whole values)
// has its data points spread a little sideways, the same way on every draw,
// by default and with a toggle beside "Data points"; a continuous focal
// predictor is drawn as it is and offers no toggle.
#include <gtest/gtest.h>

#include <qcustomplot.h>

#include <QCheckBox>
#include <QTest>
#include <algorithm>
#include <cmath>
#include <map>

#include "plots/lines_plot.hpp"
#include "plots/observed_points.hpp"
#include "sample_window.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// The x of every data point drawn (the scatter-only graphs of small discs).
std::vector<double> pointXs(LinesPlot* lines) {
    std::vector<double> xs;
    QCustomPlot* plot = lines->figurePlot();
    for (int i = 0; i < plot->graphCount(); ++i) {
        QCPGraph* g = plot->graph(i);
        if (g->lineStyle() != QCPGraph::lsNone || g->scatterStyle().shape() != QCPScatterStyle::ssDisc) continue;
        for (auto it = g->data()->constBegin(); it != g->data()->constEnd(); ++it) xs.push_back(it->key);
    }
    std::sort(xs.begin(), xs.end());
    return xs;
}

}  // namespace

TEST(LinesJitter, DiscreteValuesAreFoundAndTheSpreadIsSeeded) {
    LinesPoints p;
    p.rows = 6;
    p.x = {{1, 2, 2, 3}, {4, 4}};
    p.y = {{0, 0, 0, 0}, {0, 0}};
    EXPECT_TRUE(discreteFocal(p));
    EXPECT_DOUBLE_EQ(jitterWidth(p), 0.15);  // 0.15 × the gap of 1 between whole values
    p.x[1] = {4, 4.5};
    EXPECT_FALSE(discreteFocal(p));  // 4.5 is not whole
    LinesPoints many;
    many.x = {{}};
    for (int v = 0; v < 13; ++v) many.x[0].push_back(v);
    many.y = {std::vector<double>(13, 0.0)};
    many.rows = 13;
    EXPECT_FALSE(discreteFocal(many));  // 13 values: more than 12
    const std::vector<double> x{2, 2, 2, 2, 2, 2, 2, 2};
    const auto a = jittered(x, 0, 0.15), b = jittered(x, 0, 0.15), c = jittered(x, 1, 0.15);
    EXPECT_EQ(a, b);  // seeded: the same each time
    EXPECT_NE(a, c);  // another group, other offsets
    for (double v : a) EXPECT_LE(std::abs(v - 2), 0.15);
    EXPECT_GT(*std::max_element(a.begin(), a.end()) - *std::min_element(a.begin(), a.end()), 0.05);
}

TEST(LinesJitter, HelpdeskAgentsAreSpreadByDefaultAndTheToggleTurnsItOff) {
    // helpdesk-staffing: agents_on_shift takes the whole values 3 to 14 (12 values).
    test::SampleWindow win(test::sampleProject(QStringLiteral("helpdesk-staffing")));
    win.showSection(AnalysisPage::Probe);
    auto* lines = win.w.findChild<LinesPlot*>();
    auto* toggle = win.w.findChild<QCheckBox*>(QStringLiteral("jitter-toggle"));
    ASSERT_TRUE(lines && toggle);
    ASSERT_EQ(lines->pointsMode(), 1);
    EXPECT_TRUE(toggle->isVisible());
    EXPECT_TRUE(toggle->isChecked());
    EXPECT_TRUE(lines->pointsJittered());
    const std::vector<double> spread = pointXs(lines);
    ASSERT_FALSE(spread.empty());
    std::map<long, int> perValue;
    int moved = 0;
    for (double x : spread) {
        const long v = std::lround(x);
        EXPECT_LE(std::abs(x - v), 0.15 + 1e-12) << x;
        ++perValue[v];
        moved += x != static_cast<double>(v);
    }
    EXPECT_GT(moved, static_cast<int>(spread.size()) / 2);
    EXPECT_EQ(perValue.begin()->first, 3);
    EXPECT_EQ(perValue.rbegin()->first, 14);
    // A redraw draws the same points.
    lines->setGreyscale(true);
    lines->setGreyscale(false);
    EXPECT_EQ(pointXs(lines), spread);

    // Off: each point at its value, the same count per value; stored, and undoable.
    QTest::mouseClick(toggle, Qt::LeftButton, {}, QPoint(4, toggle->height() / 2));
    ASSERT_TRUE(test::waitUntil([&] { return !lines->pointsJittered(); }, 5000));
    EXPECT_FALSE(win.analysis().probe.jitter);
    const std::vector<double> plain = pointXs(lines);
    ASSERT_EQ(plain.size(), spread.size());
    std::map<long, int> plainPerValue;
    for (double x : plain) {
        EXPECT_EQ(x, std::round(x));
        ++plainPerValue[std::lround(x)];
    }
    EXPECT_EQ(plainPerValue, perValue);
    win.undo()->undo();
    ASSERT_TRUE(test::waitUntil([&] { return lines->pointsJittered(); }, 5000));
    EXPECT_TRUE(win.analysis().probe.jitter);
    EXPECT_EQ(pointXs(lines), spread);
}

TEST(LinesJitter, AContinuousFocalPredictorIsNotSpread) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    auto* lines = win.w.findChild<LinesPlot*>();
    auto* toggle = win.w.findChild<QCheckBox*>(QStringLiteral("jitter-toggle"));
    ASSERT_TRUE(lines && toggle);
    EXPECT_FALSE(toggle->isVisible());
    EXPECT_FALSE(lines->pointsJittered());
}
