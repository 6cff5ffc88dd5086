// The Probe section, driven like a user drives it: mouse drags on the Effect
// plot, the slider's buttons, Pin, undo and redo. Every number on screen is
// checked against core called directly on the same data ("core probe() on
// the same data"), and where the algebra is simple against the closed form.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QAction>
#include <QComboBox>
#include <QMenu>
#include <QSlider>
#include <QTest>
#include <QToolButton>
#include <QUndoStack>
#include <algorithm>
#include <cmath>
#include <fstream>
#include <random>

#include "common/direct_fit.hpp"
#include "common/tolerance.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/probing/probe_curves.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "probe/moderator_slider.hpp"
#include "probe/pinned_table.hpp"
#include "probe/readout_panel.hpp"
#include "probe_window.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::rel;

namespace {

// A main window showing the first analysis's Probe section at a realistic size.
using Window = test::ProbeWindow;

// Drags the Effect plot's handle from its current value to value `to`, with
// intermediate mouse moves like a real drag.
void drag(EffectPlot* plot, double to, int steps = 12) {
    QCustomPlot* p = plot->figurePlot();
    const int y = plot->plotAreaMiddleY();
    const int x0 = static_cast<int>(std::lround(plot->pixelOfValue(plot->current())));
    const int x1 = static_cast<int>(std::lround(plot->pixelOfValue(to)));
    QTest::mousePress(p, Qt::LeftButton, Qt::NoModifier, QPoint(x0, y));
    for (int i = 1; i <= steps; ++i) QTest::mouseMove(p, QPoint(x0 + (x1 - x0) * i / steps, y));
    QTest::mouseRelease(p, Qt::LeftButton, Qt::NoModifier, QPoint(x1, y));
}

void expectSamePoint(const EffectPoint& shown, const EffectPoint& core, double tol = 1e-10) {
    EXPECT_LE(rel(shown.estimate, core.estimate), tol);
    EXPECT_LE(rel(shown.std_error, core.std_error), tol);
    EXPECT_LE(rel(shown.ci_lower, core.ci_lower), tol);
    EXPECT_LE(rel(shown.ci_upper, core.ci_upper), tol);
    EXPECT_LE(rel(shown.statistic, core.statistic), tol);
    EXPECT_LE(std::abs(shown.p_value - core.p_value), 1e-12 + tol * core.p_value);
}

}  // namespace

TEST(Probe, DraggingTheHandleUpdatesTheReadoutFromCore) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    Window win(path);
    ProbeSection* s = win.section;
    EffectPlot* effect = s->effectPlot();
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    const auto [lo, hi] = core.probe.observed_range;
    // Default: the moderator's mean (core).
    EXPECT_DOUBLE_EQ(s->currentModeratorValue(), core.probe.moderator_mean);

    int fullReplots = 0;
    QObject::connect(effect->figurePlot(), &QCustomPlot::beforeReplot, [&] { ++fullReplots; });
    QObject::connect(s->linesPlot()->figurePlot(), &QCustomPlot::beforeReplot, [&] { ++fullReplots; });
    const int undoBefore = win.undo()->count();
    const double target = lo + 0.3 * (hi - lo);
    drag(effect, target);

    // Within a pixel of where the mouse was released.
    const double pixel =
        (effect->data().axis.second - effect->data().axis.first) / effect->figurePlot()->axisRect()->width();
    const double m = s->currentModeratorValue();
    EXPECT_NEAR(m, target, 1.5 * pixel);
    EXPECT_EQ(fullReplots, 0) << "a drag redraws the moving layers only";

    // Source: core probe() on the same data, then infer() at m.
    const EffectPoint expected = effect_at(core.probe.effect_function, m, core.fit, core.probe.observed_range);
    expectSamePoint(s->currentEffect(), expected);
    // Closed form: effect b1 + b3 m, variance V11 + 2 m V13 + m^2 V33.
    const int b1 = test::coefficient_index(core.fit, {core.analysis.roles.focal});
    const int b3 = test::coefficient_index(core.fit, {core.analysis.roles.focal, core.analysis.roles.moderator});
    ASSERT_GE(b1, 0);
    ASSERT_GE(b3, 0);
    const Eigen::MatrixXd& V = core.fit.covariance;
    EXPECT_NEAR(s->currentEffect().estimate, core.fit.beta[b1] + core.fit.beta[b3] * m, 1e-12);
    EXPECT_NEAR(s->currentEffect().std_error, std::sqrt(V(b1, b1) + 2 * m * V(b1, b3) + m * m * V(b3, b3)), 1e-12);

    // What the readout says.
    const QString text = s->readoutText();
    EXPECT_TRUE(text.contains(test::fourDigits(expected.estimate))) << text.toStdString();
    EXPECT_TRUE(text.contains(test::fourDigits(expected.std_error))) << text.toStdString();
    EXPECT_TRUE(text.contains(QStringLiteral("HC3"))) << "the SE kind is stated";
    EXPECT_TRUE(text.contains(QStringLiteral("95%"))) << "the level is stated";
    EXPECT_TRUE(text.contains(QStringLiteral("t(%1)").arg(core.fit.df_inference))) << text.toStdString();

    // The highlighted line on the Lines plot is core's prediction at m.
    const auto line = prediction_line(core.design, core.fit, core.analysis.roles.focal,
                                      typical_values(core.design, {{core.analysis.roles.moderator, m}}),
                                      {core.probe.focal_range.first, core.probe.focal_range.second});
    const auto& shownLine = s->linesPlot()->highlight();
    ASSERT_GE(shownLine.size(), 2u);
    EXPECT_NEAR(shownLine.front().estimate, line.front().estimate, 1e-9);
    EXPECT_NEAR(shownLine.back().estimate, line.back().estimate, 1e-9);

    // One drag = one undo step that keeps the value.
    EXPECT_EQ(win.undo()->count(), undoBefore + 1);
    EXPECT_DOUBLE_EQ(win.analysis().probe.current, m);
    win.undo()->undo();
    EXPECT_TRUE(std::isnan(win.analysis().probe.current));
    EXPECT_DOUBLE_EQ(s->currentModeratorValue(), core.probe.moderator_mean);
    win.undo()->redo();
    EXPECT_DOUBLE_EQ(s->currentModeratorValue(), m);

    // Dragging beyond the data is allowed and marked.
    drag(effect, hi + 0.08 * (hi - lo));
    EXPECT_GT(s->currentModeratorValue(), hi);
    EXPECT_TRUE(s->currentEffect().beyond_data);
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("beyond the data")));
}

TEST(Probe, SliderDragMovesTheSameValue) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    Window win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    QSlider* slider = s->slider();
    // Keyboard: End moves to the top of the observed range.
    slider->setFocus();
    QTest::keyClick(slider, Qt::Key_End);
    const double m = s->currentModeratorValue();
    const double hi = core.probe.observed_range.second;
    EXPECT_NEAR(m, hi, 1e-12 * std::abs(hi));
    expectSamePoint(s->currentEffect(), effect_at(core.probe.effect_function, m, core.fit, core.probe.observed_range));
    EXPECT_DOUBLE_EQ(s->effectPlot()->current(), m) << "the handle follows the slider";
    EXPECT_DOUBLE_EQ(win.analysis().probe.current, m) << "a key step is kept in the analysis";
}

TEST(Probe, PinAddsARowThatUndoRemovesAndRedoRestores) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    Window win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    PinnedTableModel* table = s->pinnedTable()->model();
    // Before pinning: core's defaults (mean and +-1 SD), not removable.
    ASSERT_EQ(table->rowCount(), 3);
    for (const auto& r : table->rows()) EXPECT_FALSE(r.pinned);
    const auto defaults = table->rows();

    const auto [lo, hi] = core.probe.observed_range;
    const double m = lo + 0.8 * (hi - lo);
    s->setCurrentModeratorValue(m);
    QTest::mouseClick(s->moderatorSlider()->pinButton(), Qt::LeftButton);
    // The pin joins the defaults (they stay), and the rows are in order of value.
    ASSERT_TRUE(test::waitUntil([&] { return table->rowCount() == 4; }));
    EXPECT_EQ(win.analysis().probe.pinned, std::vector<double>{m});
    int pinnedRows = 0;
    for (int k = 0; k < 4; ++k) {
        const auto& r = table->rows()[static_cast<std::size_t>(k)];
        if (k > 0) {
            EXPECT_LT(table->rows()[static_cast<std::size_t>(k - 1)].point.moderator_value, r.point.moderator_value);
        }
        pinnedRows += r.pinned;
        if (!r.pinned) continue;
        EXPECT_DOUBLE_EQ(r.point.moderator_value, m);
        EXPECT_EQ(r.pinIndex, 0);
        // Source: core probe() on the same data with the value pinned.
        ProbeSpec ps;
        ps.focal = core.analysis.roles.focal;
        ps.moderator = core.analysis.roles.moderator;
        ps.at = {m};
        expectSamePoint(r.point, probe(core.design, core.fit, ps).effects.front());
        EXPECT_FALSE(r.point.beyond_data);
    }
    EXPECT_EQ(pinnedRows, 1);
    for (const auto& d : defaults) {
        bool kept = false;
        for (const auto& r : table->rows()) kept |= r.point.moderator_value == d.point.moderator_value && !r.pinned;
        EXPECT_TRUE(kept) << d.label.toStdString();
    }
    EXPECT_EQ(s->linesPlot()->lineCount(), 4) << "one line per row";
    // The table copies as tab-separated text with the moderator's name in the header.
    const QString tsv = s->pinnedTable()->tsv();
    EXPECT_TRUE(tsv.startsWith(QString::fromStdString(core.analysis.roles.moderator) + QLatin1Char('\t')));
    EXPECT_EQ(tsv.count(QLatin1Char('\n')), 5);

    win.undo()->undo();
    ASSERT_TRUE(test::waitUntil([&] { return table->rowCount() == 3; }));
    EXPECT_TRUE(win.analysis().probe.pinned.empty());
    for (const auto& r : table->rows()) EXPECT_FALSE(r.pinned);
    win.undo()->redo();
    ASSERT_TRUE(test::waitUntil([&] { return table->rowCount() == 4; }));

    // A pinned value beyond the data is flagged, last by value; Remove takes a pinned row away (undoable).
    s->setCurrentModeratorValue(hi + 0.1 * (hi - lo));
    s->pinCurrentValue();
    ASSERT_TRUE(test::waitUntil([&] { return table->rowCount() == 5; }));
    EXPECT_TRUE(table->rows().back().point.beyond_data);
    EXPECT_TRUE(table->rows().back().pinned);
    EXPECT_EQ(table->data(table->index(4, PinnedTableModel::Note), Qt::DisplayRole).toString(),
              QStringLiteral("beyond the data"));
    int first = -1;
    for (int k = 0; k < 5 && first < 0; ++k)
        if (table->rows()[static_cast<std::size_t>(k)].pinned) first = k;
    ASSERT_GE(first, 0);
    s->pinnedTable()->view()->selectRow(first);
    QTest::mouseClick(s->pinnedTable()->findChild<QToolButton*>(QStringLiteral("pinned-remove")), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return table->rowCount() == 4; }));
    EXPECT_EQ(win.analysis().probe.pinned.size(), 1u);
    EXPECT_GT(win.analysis().probe.pinned.front(), hi);
}

TEST(Probe, MeanAndSdButtonsUseTheRowsTheModelUses) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    Window win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    // Independently of the design: the moderator over rows where every model column is present.
    const Table& t = *core.loaded.tables.at(core.analysis.dataset);
    std::vector<std::string> cols{core.analysis.roles.outcome, core.analysis.roles.focal,
                                  core.analysis.roles.moderator};
    for (const auto& c : core.analysis.roles.controls) cols.push_back(c);
    std::vector<double> z;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        bool complete = true;
        for (const auto& c : cols) complete &= !t.at(c).is_missing(r);
        if (complete) z.push_back(t.at(core.analysis.roles.moderator).numbers[r]);
    }
    ASSERT_GT(z.size(), 10u);
    double mean = 0;
    for (double v : z) mean += v;
    mean /= static_cast<double>(z.size());
    double ss = 0;
    for (double v : z) ss += (v - mean) * (v - mean);
    const double sd = std::sqrt(ss / static_cast<double>(z.size() - 1));  // common practice: n - 1

    ModeratorSlider* slider = s->moderatorSlider();
    QTest::mouseClick(slider->presetButton(QStringLiteral("mean+sd")), Qt::LeftButton);
    EXPECT_NEAR(s->currentModeratorValue(), mean + sd, 1e-10 * std::abs(mean));
    EXPECT_NEAR(win.analysis().probe.current, mean + sd, 1e-10 * std::abs(mean));
    QTest::mouseClick(slider->presetButton(QStringLiteral("mean-sd")), Qt::LeftButton);
    EXPECT_NEAR(s->currentModeratorValue(), mean - sd, 1e-10 * std::abs(mean));
    QTest::mouseClick(slider->presetButton(QStringLiteral("mean")), Qt::LeftButton);
    EXPECT_NEAR(s->currentModeratorValue(), mean, 1e-10 * std::abs(mean));
    expectSamePoint(s->currentEffect(), effect_at(core.probe.effect_function, s->currentModeratorValue(), core.fit,
                                                  core.probe.observed_range));

    // The 25th percentile: common practice (linear interpolation between order statistics).
    std::sort(z.begin(), z.end());
    const double h = 0.25 * static_cast<double>(z.size() - 1);
    const std::size_t k = static_cast<std::size_t>(std::floor(h));
    const double p25 = z[k] + (h - static_cast<double>(k)) * (z[std::min(k + 1, z.size() - 1)] - z[k]);
    QMenu* menu = slider->presetButton(QStringLiteral("percentiles"))->menu();
    ASSERT_NE(menu, nullptr);
    QAction* a25 = menu->findChild<QAction*>(QStringLiteral("percentile-25"));
    ASSERT_NE(a25, nullptr);
    a25->trigger();
    EXPECT_NEAR(s->currentModeratorValue(), p25, 1e-10 * std::abs(p25));
    // Three button presses and a menu choice: four undo steps, not merged.
    EXPECT_GE(win.undo()->count(), 4);
}

TEST(Probe, GroupsDrawOneLinePerGroupAndTheCrossoverOnlyWhenItExists) {
    for (const QString& name : {QStringLiteral("coffee-discount"), QStringLiteral("helpdesk-staffing")}) {
        SCOPED_TRACE(name.toStdString());
        const QString path = test::sampleProject(name);
        Window win(path);
        ProbeSection* s = win.section;
        const test::DirectProbe core = test::direct_probe(path.toStdString());
        const auto run = win.w.runner()->result(win.id);
        ASSERT_TRUE(run);
        ASSERT_EQ(run->kind, ProbeKind::Groups);
        const std::size_t groups = core.probe.effects.size();
        EXPECT_EQ(s->linesPlot()->lineCount(), static_cast<int>(groups));
        // Source: core's crossovers; a diamond for each crossing inside the observed focal range.
        int crossings = 0;
        for (const Crossover& c : core.probe.crossovers)
            crossings += std::isfinite(c.focal_value) && c.within_observed_range ? 1 : 0;
        EXPECT_EQ(s->linesPlot()->crossoverMarkerCount(), crossings);
        // The Effect plot shows one interval per group; the slider steps through the groups.
        EXPECT_TRUE(s->effectPlot()->data().groups);
        EXPECT_EQ(s->effectPlot()->data().groupEffects.size(), groups);
        EXPECT_EQ(s->slider()->maximum(), static_cast<int>(groups) - 1);
        for (std::size_t k = 0; k < groups; ++k) {
            s->slider()->setValue(static_cast<int>(k));
            EXPECT_DOUBLE_EQ(s->currentModeratorValue(), static_cast<double>(k));
            expectSamePoint(s->currentEffect(), core.probe.effects[k]);
        }
        // A click on a group's column in the Effect plot selects that group.
        EffectPlot* effect = s->effectPlot();
        QTest::mouseClick(effect->figurePlot(), Qt::LeftButton, Qt::NoModifier,
                          QPoint(static_cast<int>(effect->pixelOfValue(0.0)), effect->plotAreaMiddleY()));
        EXPECT_DOUBLE_EQ(s->currentModeratorValue(), 0.0);
        expectSamePoint(s->currentEffect(), core.probe.effects[0]);
    }
}

TEST(Probe, CoffeeDiscountLinesCrossWhereCoreSays) {
    const QString path = test::sampleProject(QStringLiteral("coffee-discount"));
    Window win(path);
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_EQ(core.probe.crossovers.size(), 1u);
    const Crossover& c = core.probe.crossovers.front();
    // Closed form: the two groups' lines meet where b2 + b3 x = 0, x = -b2 / b3.
    const int b2 = test::coefficient_index(core.fit, {core.analysis.roles.moderator});
    const int b3 = test::coefficient_index(core.fit, {core.analysis.roles.focal, core.analysis.roles.moderator});
    ASSERT_GE(b2, 0);
    ASSERT_GE(b3, 0);
    EXPECT_NEAR(c.focal_value, -core.fit.beta[b2] / core.fit.beta[b3], 1e-9 * (1 + std::abs(c.focal_value)));
    const LinesPlotData& d = win.section->linesPlot()->data();
    if (c.within_observed_range) {
        ASSERT_EQ(d.crossings.size(), 1u);
        EXPECT_DOUBLE_EQ(d.crossings.front().x, c.focal_value);
    } else {
        EXPECT_TRUE(d.crossings.empty());
        EXPECT_TRUE(win.section->summaryText().contains(QStringLiteral("beyond the data")));
    }
}

TEST(Probe, ProbabilityScaleReadoutIsCoresProbabilityEffect) {
    const QString path = test::sampleProject(QStringLiteral("trial-conversion"));
    Window win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_EQ(win.analysis().probe.scale, ProbeScale::Outcome);
    QComboBox* scale = s->scaleChoice();
    ASSERT_TRUE(scale->isVisible());
    // To the log-odds scale with the keyboard, then back.
    scale->setFocus();
    QTest::keyClick(scale, Qt::Key_Up);
    ASSERT_TRUE(
        test::waitUntil([&] { return win.analysis().probe.scale == ProbeScale::Model && !s->engine().probability(); }));
    expectSamePoint(s->currentEffect(), effect_at(core.probe.effect_function, s->currentModeratorValue(), core.fit,
                                                  core.probe.observed_range));
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Log-odds scale")));
    QTest::keyClick(scale, Qt::Key_Down);
    ASSERT_TRUE(test::waitUntil(
        [&] { return win.analysis().probe.scale == ProbeScale::Outcome && s->engine().probability(); }));
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Probability scale")));

    ScaleRequest req;
    req.focal = core.analysis.roles.focal;
    req.moderator = core.analysis.roles.moderator;
    req.averaging = Averaging::Sample;
    // Source: core probability_effect on the same data, averaged over the rows.
    expectSamePoint(s->currentEffect(), probability_effect(core.design, core.fit, req, s->currentModeratorValue()));
    const auto [lo, hi] = core.probe.observed_range;
    drag(s->effectPlot(), lo + 0.7 * (hi - lo));
    const double m = s->currentModeratorValue();
    EXPECT_NEAR(m, lo + 0.7 * (hi - lo), 0.02 * (hi - lo));
    expectSamePoint(s->currentEffect(), probability_effect(core.design, core.fit, req, m));
    // No simultaneous band on the probability scale.
    EXPECT_FALSE(s->bandChoice()->isEnabled());
}

namespace {

// A continuous x continuous project whose effect changes sign inside the data,
// so both boundaries of the region of significance lie in the plot.
QString writeSignChangeProject(const QTemporaryDir& dir) {
    std::mt19937 rng(20240917);
    std::normal_distribution<double> noise(0, 1);
    std::uniform_real_distribution<double> ux(-2, 2), uz(0, 10);
    std::ofstream csv(dir.filePath(QStringLiteral("signs.csv")).toStdString());
    csv << "y,x,z\n";
    for (int i = 0; i < 400; ++i) {
        const double x = ux(rng), z = uz(rng);
        csv << 1 + 0.5 * x + 0.2 * z - 0.12 * x * z + noise(rng) << ',' << x << ',' << z << '\n';
    }
    csv.close();
    Project p;
    DataSource src;
    src.id = "signs";
    src.path = "signs.csv";
    p.datasets.push_back(src);
    Analysis a;
    a.id = "signs";
    a.name = "x by z";
    a.dataset = "signs";
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "z";
    p.analyses.push_back(a);
    const QString path = dir.filePath(QStringLiteral("signs.moderato"));
    write_project_file(p, path.toStdString());
    return path;
}

}  // namespace

TEST(Probe, JohnsonNeymanBoundariesDrawnAreCores) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = writeSignChangeProject(dir);
    Window win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_TRUE(core.probe.johnson_neyman);
    const auto& jn = core.probe.johnson_neyman->boundaries;
    ASSERT_EQ(jn.size(), 2u) << "the effect 0.5 - 0.12 z changes sign near z = 4.2";
    const auto& drawn = s->effectPlot()->drawnBoundaries();
    ASSERT_EQ(drawn.size(), jn.size());
    for (std::size_t k = 0; k < jn.size(); ++k) {
        EXPECT_DOUBLE_EQ(drawn[k], jn[k]);  // source: core probe() on the same data
        // Closed form: at a boundary |effect| / SE equals the critical value.
        const double t =
            core.probe.effect_function.effect(jn[k]) / std::sqrt(core.probe.effect_function.variance(jn[k]));
        EXPECT_NEAR(std::abs(t), core.fit.critical_value, 1e-8);
    }
    // The summary says where, in the memo's sentence, naming both boundaries (inside the data).
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("for z below ") + test::fourDigits(jn[0])));
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("for z above ") + test::fourDigits(jn[1])));
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("Among the observed values of z")));

    // The simultaneous band: its own boundaries, and the readout says so.
    QComboBox* band = s->bandChoice();
    band->setFocus();
    QTest::keyClick(band, Qt::Key_Down);
    ASSERT_TRUE(test::waitUntil([&] { return win.analysis().probe.simultaneous_band; }));
    ASSERT_TRUE(core.probe.simultaneous);
    std::vector<double> inside;
    for (double b : core.probe.simultaneous->boundaries)
        if (b >= s->effectPlot()->data().axis.first && b <= s->effectPlot()->data().axis.second) inside.push_back(b);
    EXPECT_EQ(s->effectPlot()->drawnBoundaries(), inside);
    EXPECT_TRUE(s->effectPlot()->data().bandName.contains(QStringLiteral("simultaneous")));
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("simultaneous"))) << s->readoutText().toStdString();
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("simultaneous band")));
    win.undo()->undo();
    EXPECT_FALSE(s->effectPlot()->data().bandName.contains(QStringLiteral("simultaneous")));
}

TEST(Probe, TwoCategoricalPredictorsShowTheCellsView) {
    Window win(test::sampleProject(QStringLiteral("volunteer-onboarding")));
    const auto figures = win.section->figures();
    ASSERT_EQ(figures.size(), 1);
    EXPECT_EQ(figures.front()->figureKey(), QStringLiteral("cells"));
}

TEST(Probe, SurfaceToggleSwapsTheLinesPlotInTheFigures) {
    Window win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    ProbeSection* s = win.section;
    ASSERT_TRUE(s->surfaceToggle()->isVisible());
    auto keys = [&] {
        QStringList k;
        for (FigureSource* f : s->figures()) k << f->figureKey();
        return k;
    };
    EXPECT_EQ(keys(), (QStringList{QStringLiteral("lines"), QStringLiteral("effect")}));
    QTest::mouseClick(s->surfaceToggle(), Qt::LeftButton);
    EXPECT_EQ(keys(), (QStringList{QStringLiteral("surface"), QStringLiteral("effect")}));
    QTest::mouseClick(s->surfaceToggle(), Qt::LeftButton);
    EXPECT_EQ(keys(), (QStringList{QStringLiteral("lines"), QStringLiteral("effect")}));
}

TEST(Probe, AFailedAnalysisShowsItsReasonInsteadOfPlots) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString good = writeSignChangeProject(dir);
    Project p = read_project_file(good.toStdString());
    p.analyses.front().roles.moderator = "not_a_column";
    const QString bad = dir.filePath(QStringLiteral("bad.moderato"));
    write_project_file(p, bad.toStdString());
    test::SampleWindow win;
    ASSERT_FALSE(win.open(bad)) << "the analysis ran";
    ASSERT_FALSE(win.w.runner()->error(win.id).isEmpty());
    ProbeSection* s = win.w.analysisPage()->probe();
    EXPECT_TRUE(s->figures().isEmpty());
    // The reason names the role and the column (source: core's message, shown as it is).
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("not_a_column"))) << s->readoutText().toStdString();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Moderator")));
}

TEST(Probe, GreyscaleFiguresDrawTheLinesInGrey) {
    Window win(test::sampleProject(QStringLiteral("coffee-discount")));
    LinesPlot* lines = win.section->linesPlot();
    auto linePens = [&] {
        std::vector<QColor> colours;
        QCustomPlot* p = lines->figurePlot();
        for (int i = 0; i < p->graphCount(); ++i)
            if (!p->graph(i)->name().isEmpty() && p->graph(i)->lineStyle() != QCPGraph::lsNone)
                colours.push_back(p->graph(i)->pen().color());
        return colours;
    };
    bool anyColour = false;
    for (const QColor& c : linePens()) anyColour |= !(c.red() == c.green() && c.green() == c.blue());
    EXPECT_TRUE(anyColour);
    lines->setGreyscale(true);
    const auto grey = linePens();
    ASSERT_FALSE(grey.empty());
    for (const QColor& c : grey) EXPECT_TRUE(c.red() == c.green() && c.green() == c.blue()) << c.name().toStdString();
    lines->setGreyscale(false);
}
