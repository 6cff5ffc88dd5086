// The Probe plots' axes respect the data: they span the observed values
// (plus a margin), never stretch to Johnson–Neyman boundaries beyond the
// data unless asked ("Extend to boundaries", one undo step), write such a
// boundary as a note at the plot's edge, and never invent impossible values
// (an axis below 0 for a variable observed only at 0 or above, a
// probability outside 0 to 1). The region of significance is said in the
// memo's sentence, and a linear model's readout names no scale.
//
// Expected ranges are re-derived here from the rule itself (observed range
// of the used rows from core probe() on the same data, the 8% margin, the
// floor at 0), not read back from the code under test.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QCheckBox>
#include <QTemporaryDir>
#include <QTest>
#include <QUndoStack>
#include <algorithm>
#include <cmath>
#include <fstream>
#include <limits>
#include <random>

#include "common/direct_fit.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reporting/memo.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "plots/surface_plot.hpp"
#include "probe_window.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

constexpr double kMargin = 0.08;  // the Effect plot's margin, a fraction of the observed width (the rule)

// The sample's wind analysis on the Probe section.
struct TurbineWind : test::ProbeWindow {
    TurbineWind() : ProbeWindow(test::sampleProject(QStringLiteral("turbine-repairs"))) {
        w.showAnalysis(QStringLiteral("experience-wind"));
        id = QStringLiteral("experience-wind");
        EXPECT_TRUE(waitForRun());
        EXPECT_TRUE(
            test::waitUntil([&] { return section->engine().valid() && section->engine().moderator() == "wind_ms"; }));
        settle();
    }
};

// Core's probe of the project's analysis `id`, called directly on the same data.
test::DirectProbe coreProbe(const QString& project, const std::string& id) {
    const LoadedProject loaded = load_project(project.toStdString());
    Analysis chosen;
    for (const Analysis& a : loaded.project.analyses)
        if (a.id == id) chosen = a;
    return test::direct_probe(project.toStdString(), [&](Analysis& a) { a = chosen; });
}

// Every text item drawn on a plot, and the texts over its plot area.
QStringList plotTexts(QCustomPlot* plot) {
    QStringList out;
    for (int i = 0; i < plot->itemCount(); ++i)
        if (auto* t = qobject_cast<QCPItemText*>(plot->item(i))) out << t->text();
    // The notes over the plot area (text elements of the layout).
    for (auto* t : plot->findChildren<QCPTextElement*>())
        if (t->visible() && !t->text().isEmpty()) out << t->text();
    return out;
}

// x in 0..4 (some exactly 0), z in 0..10 (one exactly 0), y >= 0 (some exactly 0): the effect of
// x, 1 − 0.08 z, changes sign at z = 12.5, beyond the data, with a small standard error, so both
// Johnson–Neyman boundaries lie a little above the observed z.
QString writeBeyondProject(const QTemporaryDir& dir) {
    std::mt19937 rng(20250611);
    std::normal_distribution<double> noise(0, 0.3);
    std::uniform_real_distribution<double> ux(0, 4), uz(0, 10);
    std::ofstream csv(dir.filePath(QStringLiteral("beyond.csv")).toStdString());
    csv << "y,x,z\n";
    for (int i = 0; i < 400; ++i) {
        const double x = i == 0 ? 0.0 : std::round(10 * ux(rng)) / 10, z = i == 0 ? 0.0 : uz(rng);
        csv << std::max(0.0, 0.2 + x * (1 - 0.08 * z) + noise(rng)) << ',' << x << ',' << z << '\n';
    }
    csv.close();
    Project p;
    DataSource src;
    src.id = "beyond";
    src.path = "beyond.csv";
    p.datasets.push_back(src);
    Analysis a;
    a.id = "beyond";
    a.name = "x by z";
    a.dataset = "beyond";
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "z";
    p.analyses.push_back(a);
    const QString path = dir.filePath(QStringLiteral("beyond.moderato"));
    write_project_file(p, path.toStdString());
    return path;
}

// The lowest value drawn on the Lines plot: bands, the slider's line at the axis ends, the points.
double lowestDrawn(const LinesPlotData& d) {
    double lo = std::numeric_limits<double>::infinity();
    for (const auto& l : d.lines)
        for (const auto& p : l.points) lo = std::min({lo, p.lower, p.estimate});
    for (const auto& p : d.yExtent) lo = std::min(lo, p.lower);
    if (d.showPoints && d.points && d.points->rows > 0) lo = std::min(lo, d.points->yRange.first);
    return lo;
}

}  // namespace

TEST(ProbeAxes, TurbineWindKeepsToTheDataAndWritesTheBoundaryAsANote) {
    TurbineWind win;
    ProbeSection* s = win.section;
    const test::DirectProbe core = coreProbe(test::sampleProject(QStringLiteral("turbine-repairs")), "experience-wind");
    ASSERT_TRUE(core.probe.johnson_neyman);
    const auto [lo, hi] = core.probe.observed_range;
    ASSERT_GE(lo, 0.0) << "wind speed is observed only at 0 or above";
    std::vector<double> below;
    for (double b : core.probe.johnson_neyman->boundaries)
        if (b < lo) below.push_back(b);
    ASSERT_FALSE(below.empty()) << "the sample has a boundary at a negative wind speed";

    // The axis: the observed range plus the margin, the margin cut at 0.
    const double w = hi - lo;
    const EffectPlot* effect = s->effectPlot();
    EXPECT_DOUBLE_EQ(effect->data().axis.first, std::max(0.0, lo - kMargin * w));
    EXPECT_DOUBLE_EQ(effect->data().axis.second, hi + kMargin * w);
    const QCPRange shown = const_cast<EffectPlot*>(effect)->figurePlot()->xAxis->range();
    EXPECT_GE(shown.lower, 0.0);
    EXPECT_DOUBLE_EQ(shown.lower, effect->data().axis.first);
    for (double b : below) {
        EXPECT_EQ(std::count(effect->drawnBoundaries().begin(), effect->drawnBoundaries().end(), b), 0);
    }
    // The boundary is written at the left edge instead, and drawn on the plot.
    ASSERT_EQ(effect->boundaryNotes().size(), 1);
    const QString note = effect->boundaryNotes().front();
    EXPECT_TRUE(note.startsWith(QStringLiteral("←"))) << note.toStdString();
    EXPECT_TRUE(note.contains(test::fourDigits(below.front()))) << note.toStdString();
    EXPECT_TRUE(note.contains(QStringLiteral("beyond the data"))) << note.toStdString();
    EXPECT_TRUE(plotTexts(const_cast<EffectPlot*>(effect)->figurePlot()).contains(note));

    // Extended to the boundaries: still not below 0 (a negative wind speed is impossible), so the note stays.
    QCheckBox* extend = s->extendToggle();
    ASSERT_TRUE(extend->isVisible());
    QTest::mouseClick(extend, Qt::LeftButton, {}, QPoint(8, extend->height() / 2));
    ASSERT_TRUE(win.analysis().probe.extend_to_boundaries);
    EXPECT_GE(s->effectPlot()->data().axis.first, 0.0);
    EXPECT_EQ(s->effectPlot()->boundaryNotes().size(), 1);

    // Lines plot: experience is never negative, and the margin adds no negative hours beyond the lines.
    LinesPlot* lines = s->linesPlot();
    EXPECT_GE(lines->figurePlot()->xAxis->range().lower, 0.0);
    const double drawn = lowestDrawn(lines->data());
    const double yLower = lines->figurePlot()->yAxis->range().lower;
    if (drawn >= 0) EXPECT_GE(yLower, 0.0);
    else EXPECT_DOUBLE_EQ(yLower, drawn) << "a line below 0 sets the edge; no margin below it";
}

TEST(ProbeAxes, ExtendToBoundariesWidensTheAxisInOneUndoStep) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = writeBeyondProject(dir);
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_TRUE(core.probe.johnson_neyman);
    const auto [lo, hi] = core.probe.observed_range;
    const double w = hi - lo;
    std::vector<double> above;
    for (double b : core.probe.johnson_neyman->boundaries)
        if (b > hi + kMargin * w && b < hi + w) above.push_back(b);
    ASSERT_FALSE(above.empty()) << "a boundary beyond the data, within a width of it";

    // Default: the data and the margin (z is observed from 0, so no room below 0); the boundary is a note.
    EXPECT_DOUBLE_EQ(s->effectPlot()->data().axis.first, 0.0);
    EXPECT_DOUBLE_EQ(s->effectPlot()->data().axis.second, hi + kMargin * w);
    ASSERT_EQ(s->effectPlot()->boundaryNotes().size(), 1);
    EXPECT_TRUE(s->effectPlot()->boundaryNotes().front().endsWith(QStringLiteral("→")));
    EXPECT_TRUE(s->effectPlot()->drawnBoundaries().empty());

    // Ticked: one undoable edit; the axis takes in every boundary and the notes go.
    QCheckBox* extend = s->extendToggle();
    ASSERT_FALSE(extend->isChecked());
    const int before = win.undo()->count();
    QTest::mouseClick(extend, Qt::LeftButton, {}, QPoint(8, extend->height() / 2));
    EXPECT_EQ(win.undo()->count(), before + 1);
    EXPECT_TRUE(win.analysis().probe.extend_to_boundaries);
    for (double b : above) {
        EXPECT_GT(s->effectPlot()->data().axis.second, b);
        EXPECT_GT(s->effectPlot()->figurePlot()->xAxis->range().upper, b);
    }
    EXPECT_TRUE(s->effectPlot()->boundaryNotes().isEmpty());
    EXPECT_EQ(s->effectPlot()->drawnBoundaries(), above);
    EXPECT_DOUBLE_EQ(s->effectPlot()->data().axis.first, 0.0) << "never below 0 for z observed from 0";

    win.undo()->undo();
    EXPECT_FALSE(win.analysis().probe.extend_to_boundaries);
    EXPECT_FALSE(extend->isChecked());
    EXPECT_DOUBLE_EQ(s->effectPlot()->data().axis.second, hi + kMargin * w);
    EXPECT_EQ(s->effectPlot()->boundaryNotes().size(), 1);
    win.undo()->redo();
    EXPECT_TRUE(extend->isChecked());
    EXPECT_TRUE(s->effectPlot()->boundaryNotes().isEmpty());
}

TEST(ProbeAxes, NonNegativeVariablesGetNoNegativeMargin) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = writeBeyondProject(dir);
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    // y has zeros among its values and is drawn as points: the margin below stops at 0.
    LinesPlot* lines = s->linesPlot();
    ASSERT_TRUE(lines->data().showPoints);
    const double drawn = lowestDrawn(lines->data());
    const QCPRange y = lines->figurePlot()->yAxis->range();
    if (drawn >= 0) EXPECT_DOUBLE_EQ(y.lower, 0.0) << "the points reach 0; the margin stops there";
    else EXPECT_DOUBLE_EQ(y.lower, drawn);
    // x is observed from 0: the Lines plot's x axis starts at 0.
    EXPECT_DOUBLE_EQ(lines->figurePlot()->xAxis->range().lower, 0.0);

    // The Surface plot: x and z both observed from 0; their axes start at 0 (the first cells show half).
    ASSERT_TRUE(s->surfaceToggle()->isVisible());
    QTest::mouseClick(s->surfaceToggle(), Qt::LeftButton);
    SurfacePlot* surface = s->surfacePlot();
    ASSERT_TRUE(surface->colorMap());
    EXPECT_DOUBLE_EQ(surface->figurePlot()->xAxis->range().lower, 0.0);
    EXPECT_DOUBLE_EQ(surface->figurePlot()->yAxis->range().lower, 0.0);
}

TEST(ProbeAxes, ProbabilityAxisStaysWithinZeroAndOne) {
    test::ProbeWindow win(test::sampleProject(QStringLiteral("trial-conversion")));
    ProbeSection* s = win.section;
    ASSERT_TRUE(s->engine().probability());
    ASSERT_TRUE(s->linesPlot()->data().showPoints) << "the 0/1 outcomes are drawn at 0 and 1";
    const QCPRange y = s->linesPlot()->figurePlot()->yAxis->range();
    EXPECT_GE(y.lower, 0.0);
    EXPECT_LE(y.upper, 1.0);
    // A probability scale is still named (two scales to choose from).
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Probability scale"))) << s->readoutText().toStdString();
}

TEST(ProbeAxes, SignificanceIsTheMemosSentenceAndALinearModelNamesNoScale) {
    TurbineWind win;
    ProbeSection* s = win.section;
    const auto run = win.run();
    ASSERT_TRUE(run);
    // The memo's findings, from core's memo on the same analysis and run.
    QStringList memo;
    for (const auto& f : memo_findings(win.analysis(), *run)) memo << QString::fromStdString(f);
    const QString summary = s->summaryText();
    int said = 0;
    for (const QString& f : memo)
        if (f.startsWith(QStringLiteral("Among the observed values of wind_ms")) ||
            f.startsWith(QStringLiteral("The Johnson–Neyman boundar"))) {
            EXPECT_TRUE(summary.contains(f)) << f.toStdString() << "\n" << summary.toStdString();
            ++said;
        }
    EXPECT_EQ(said, 2) << "the region and the boundary beyond the data";
    EXPECT_FALSE(summary.contains(QStringLiteral("∞"))) << summary.toStdString();
    // Linear: one scale only, so the readout names none.
    EXPECT_FALSE(s->readoutText().contains(QStringLiteral("scale"), Qt::CaseInsensitive))
        << s->readoutText().toStdString();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("SEs"))) << s->readoutText().toStdString();
}
