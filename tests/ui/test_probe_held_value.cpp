// The value a second moderator is held at while the Probe section probes
// the first: its default (the mean), the mean ± SD buttons, a typed value and
// a categorical level, each one undoable edit, named in the readout and the
// plot titles. Numbers are checked against core called directly (core
// probe() with ProbeSpec.second_value on the same data) and the closed form
// of a three-way model's conditional effect.
#include <gtest/gtest.h>

#include <QComboBox>
#include <QDoubleSpinBox>
#include <QLabel>
#include <QTest>
#include <QTextBoundaryFinder>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>
#include <utility>
#include <vector>

#include "common/direct_fit.hpp"
#include "common/figure_caption.hpp"
#include "common/held_value_text.hpp"
#include "common/tolerance.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/probing/probe_curves.hpp"
#include "moderato/probing/response_scale.hpp"
#include "probe/held_value_control.hpp"
#include "probe_window.hpp"
#include "screenshot.hpp"
#include "sections/probe_section.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::rel;

namespace {

// Mean and SD (n - 1, common practice) of a column over the rows where every listed column is present.
std::pair<double, double> meanSd(const Table& t, const std::string& column, const std::vector<std::string>& used) {
    std::vector<double> v;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        bool complete = true;
        for (const auto& c : used) complete &= !t.at(c).is_missing(r);
        if (complete) v.push_back(t.at(column).numbers[r]);
    }
    double mean = 0;
    for (double x : v) mean += x;
    mean /= static_cast<double>(v.size());
    double ss = 0;
    for (double x : v) ss += (x - mean) * (x - mean);
    return {mean, std::sqrt(ss / static_cast<double>(v.size() - 1))};
}

QLabel* labelContaining(QWidget* root, const QString& text) {
    for (QLabel* l : root->findChildren<QLabel*>())
        if (l->text().contains(text)) return l;
    return nullptr;
}

}  // namespace

TEST(ProbeHeldValue, SecondModeratorHeldValueIsOneUndoableEditMatchingCore) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    EXPECT_FALSE(s->heldValueControl()->isVisible()) << "no second moderator yet";

    // The three-way model, built through the document as the Specify section does.
    Analysis threeWay = win.analysis();
    threeWay.roles.second_moderator = "slope_pct";
    threeWay.roles.controls.clear();
    win.w.document()->setAnalysis(threeWay, QStringLiteral("Make slope_pct the second moderator"));
    ASSERT_TRUE(test::waitUntil([&] { return s->heldValueControl()->isVisible() && s->engine().valid(); }));
    ASSERT_TRUE(win.waitForRun());
    HeldValueControl* held = s->heldValueControl();

    const auto edit = [](Analysis& a) {
        a.roles.second_moderator = "slope_pct";
        a.roles.controls.clear();
    };
    const test::DirectProbe base = test::direct_probe(path.toStdString(), edit);
    const Table& table = *base.loaded.tables.at(base.analysis.dataset);
    const auto [mean, sd] =
        meanSd(table, "slope_pct", {"yield_t_ha", "nitrogen_kg_ha", "soil_moisture_pct", "slope_pct"});
    // By default the second moderator is held at its mean, and the readout says so.
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("slope_pct held at %1 (mean)").arg(test::fourDigits(mean))))
        << s->readoutText().toStdString();

    // Closed form: the effect of x at moderator z and second moderator w is b_x + b_xz z + b_xw w + b_xzw z w.
    const std::string x = "nitrogen_kg_ha", z = "soil_moisture_pct", w = "slope_pct";
    const int bx = test::coefficient_index(base.fit, {x}), bxz = test::coefficient_index(base.fit, {x, z}),
              bxw = test::coefficient_index(base.fit, {x, w}), bxzw = test::coefficient_index(base.fit, {x, z, w});
    ASSERT_TRUE(bx >= 0 && bxz >= 0 && bxw >= 0 && bxzw >= 0);
    const Eigen::VectorXd& b = base.fit.beta;
    auto checkAt = [&](double heldAt) {
        SCOPED_TRACE(heldAt);
        const double m = s->currentModeratorValue();
        // Source: core probe() with ProbeSpec.second_value on the same data.
        const test::DirectProbe core = test::direct_probe(path.toStdString(), [&](Analysis& a) {
            edit(a);
            a.probe.second_value = heldAt;
        });
        const EffectPoint expected = effect_at(core.probe.effect_function, m, core.fit, core.probe.observed_range);
        const EffectPoint shown = s->currentEffect();
        EXPECT_LE(rel(shown.estimate, expected.estimate), 1e-10);
        EXPECT_LE(rel(shown.std_error, expected.std_error), 1e-10);
        EXPECT_LE(rel(shown.ci_lower, expected.ci_lower), 1e-10);
        EXPECT_LE(rel(shown.ci_upper, expected.ci_upper), 1e-10);
        EXPECT_NEAR(shown.estimate, b[bx] + b[bxz] * m + b[bxw] * heldAt + b[bxzw] * m * heldAt, 1e-10);
        EXPECT_TRUE(s->readoutText().contains(test::fourDigits(expected.estimate))) << s->readoutText().toStdString();
    };

    // mean + SD through its button: one undo step, and the readout, the subtitles and core agree.
    const int steps = win.undo()->count();
    QTest::mouseClick(held->presetButton(QStringLiteral("mean+sd")), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] {
        return !std::isnan(win.analysis().probe.second_value) &&
               s->readoutText().contains(QStringLiteral("(mean + 1 SD)"));
    }));
    EXPECT_NEAR(win.analysis().probe.second_value, mean + sd, 1e-10 * std::abs(mean));
    EXPECT_EQ(win.undo()->count(), steps + 1);
    EXPECT_TRUE(s->readoutText().contains(
        QStringLiteral("slope_pct held at %1 (mean + 1 SD)").arg(test::fourDigits(mean + sd))))
        << s->readoutText().toStdString();
    QLabel* linesTitle = labelContaining(s, QStringLiteral("Lines plot"));
    QLabel* effectTitle = labelContaining(s, QStringLiteral("Effect plot"));
    ASSERT_TRUE(linesTitle && effectTitle);
    for (QLabel* l : {linesTitle, effectTitle})
        EXPECT_TRUE(l->text().contains(
            QStringLiteral("with slope_pct held at %1 (mean + 1 SD)").arg(test::fourDigits(mean + sd))))
            << l->text().toStdString();
    checkAt(mean + sd);

    // A typed value.
    QDoubleSpinBox* box = held->valueBox();
    box->setFocus();
    box->selectAll();
    QTest::keyClicks(box, QStringLiteral("4"));
    QTest::keyClick(box, Qt::Key_Return);
    ASSERT_TRUE(test::waitUntil(
        [&] { return win.analysis().probe.second_value == 4.0 && s->engine().analysis().probe.second_value == 4.0; }));
    EXPECT_EQ(win.undo()->count(), steps + 2);
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("slope_pct held at 4"))) << s->readoutText().toStdString();
    checkAt(4.0);
    // An exported figure's caption says so too.
    const auto run = win.w.runner()->result(win.id);
    ASSERT_TRUE(run);
    EXPECT_TRUE(figureCaption(win.analysis(), *run).contains(QStringLiteral("slope_pct held at 4 ·")))
        << figureCaption(win.analysis(), *run).toStdString();
    // Where a long caption wraps, "n = <count>" stays on one line: Unicode line
    // breaking (UAX #14, as Qt's QTextBoundaryFinder implements it) finds no
    // break opportunity inside it.
    const QString caption = figureCaption(win.analysis(), *run);
    const qsizetype n = caption.lastIndexOf(QStringLiteral(" · n")) + 3;
    ASSERT_GT(n, 3) << caption.toStdString();
    QTextBoundaryFinder lines(QTextBoundaryFinder::Line, caption);
    for (qsizetype p = n + 1; p < caption.size(); ++p) {
        lines.setPosition(p);
        EXPECT_FALSE(lines.isAtBoundary()) << "a line may break at " << p << " in " << caption.toStdString();
    }
    test::saveScreenshot(&win.w, QStringLiteral("three-way-probe.png"));

    // Undo goes back to mean + SD, then to the mean; redo comes forward again.
    win.undo()->undo();
    ASSERT_TRUE(test::waitUntil([&] { return s->readoutText().contains(QStringLiteral("(mean + 1 SD)")); }));
    checkAt(mean + sd);
    win.undo()->undo();
    ASSERT_TRUE(test::waitUntil([&] { return s->readoutText().contains(QStringLiteral("(mean)")); }));
    EXPECT_TRUE(std::isnan(win.analysis().probe.second_value));
    checkAt(mean);
    win.undo()->redo();
    win.undo()->redo();
    ASSERT_TRUE(test::waitUntil([&] { return s->readoutText().contains(QStringLiteral("slope_pct held at 4")); }));
    EXPECT_EQ(win.analysis().probe.second_value, 4.0);
    checkAt(4.0);
    // The mean button goes back to the default (NaN = its mean), one more step.
    QTest::mouseClick(held->presetButton(QStringLiteral("mean")), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return std::isnan(win.analysis().probe.second_value); }));
    EXPECT_EQ(win.undo()->count(), steps + 3);
}

TEST(ProbeHeldValue, HeldValueLabelsNameTheChoice) {
    // mean 30, SD 5 (hand-made values).
    EXPECT_EQ(heldValueLabel(std::nan(""), 30, 5), QStringLiteral("30 (mean)"));
    EXPECT_EQ(heldValueLabel(35, 30, 5), QStringLiteral("35 (mean + 1 SD)"));
    EXPECT_EQ(heldValueLabel(25, 30, 5), QStringLiteral("25 (mean − 1 SD)"));
    EXPECT_EQ(heldValueLabel(31, 30, 5), QStringLiteral("31"));
    EXPECT_EQ(heldValueLabel(std::nan(""), 0, 0, {QStringLiteral("APAC"), QStringLiteral("EU")}),
              QStringLiteral("'APAC' (reference level)"));
    EXPECT_EQ(heldValueLabel(1, 0, 0, {QStringLiteral("APAC"), QStringLiteral("EU")}), QStringLiteral("'EU'"));
    EXPECT_EQ(heldValueLabel(std::nan(""), 0.43, 0.5, {}, true), QStringLiteral("0.4300 (mean)"));  // 4 digits
    EXPECT_EQ(heldValueLabel(1, 0.43, 0.5, {}, true), QStringLiteral("1"));
}

TEST(ProbeHeldValue, CategoricalSecondModeratorIsHeldAtALevel) {
    // Core's ProbeSpec.second_value for a categorical column is a level index (reference = 0).
    const QString path = test::sampleProject(QStringLiteral("trial-conversion"));
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    const auto edit = [](Analysis& a) {
        a.roles.second_moderator = "region";
        a.roles.controls.clear();
        a.probe.scale = ProbeScale::Model;
    };
    Analysis a = win.analysis();
    edit(a);
    win.w.document()->setAnalysis(a, QStringLiteral("Make region the second moderator"));
    ASSERT_TRUE(test::waitUntil([&] { return s->heldValueControl()->isVisible() && s->engine().valid(); }));
    ASSERT_TRUE(win.waitForRun());
    const test::DirectProbe base = test::direct_probe(path.toStdString(), edit);
    const CategoricalInfo* cat = base.design.categorical("region");
    ASSERT_NE(cat, nullptr);
    QComboBox* levels = s->heldValueControl()->levelChoice();
    ASSERT_TRUE(levels->isVisible());
    ASSERT_EQ(levels->count(), static_cast<int>(cat->levels.size()));
    EXPECT_FALSE(s->heldValueControl()->valueBox()->isVisible());
    EXPECT_TRUE(s->readoutText().contains(
        QStringLiteral("region held at '%1' (reference level)").arg(QString::fromStdString(cat->reference))))
        << s->readoutText().toStdString();

    // The next level, chosen with the keyboard: one undo step holding region at level index 1.
    levels->setFocus();
    QTest::keyClick(levels, Qt::Key_Down);
    ASSERT_TRUE(test::waitUntil([&] { return s->engine().analysis().probe.second_value == 1.0; }));
    const QString level1 = QString::fromStdString(cat->levels[1]);
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("region held at '%1'").arg(level1)))
        << s->readoutText().toStdString();
    const double m = s->currentModeratorValue();
    // Source: core probe() with ProbeSpec.second_value = 1 on the same data.
    const test::DirectProbe core = test::direct_probe(path.toStdString(), [&](Analysis& x) {
        edit(x);
        x.probe.second_value = 1;
    });
    const EffectPoint expected = effect_at(core.probe.effect_function, m, core.fit, core.probe.observed_range);
    EXPECT_LE(rel(s->currentEffect().estimate, expected.estimate), 1e-10);
    EXPECT_LE(rel(s->currentEffect().std_error, expected.std_error), 1e-10);

    // The probability scale holds the same level. Source: core probability_effect with region at index 1.
    a = win.analysis();
    a.probe.scale = ProbeScale::Outcome;
    win.w.document()->setAnalysis(a, QStringLiteral("Probe on the probability scale"));
    ASSERT_TRUE(test::waitUntil([&] { return s->engine().valid() && s->engine().probability(); }));
    ASSERT_TRUE(win.w.runner()->error(win.id).isEmpty()) << win.w.runner()->error(win.id).toStdString();
    ScaleRequest req;
    req.focal = "setup_sessions";
    req.moderator = "employees";
    req.values["region"] = 1;
    const EffectPoint p = probability_effect(core.design, core.fit, req, s->currentModeratorValue());
    EXPECT_LE(rel(s->currentEffect().estimate, p.estimate), 1e-10);
    EXPECT_LE(rel(s->currentEffect().std_error, p.std_error), 1e-10);
    // And with no level chosen, core's probability probe holds region at its reference level (index 0).
    ProbeSpec ps;
    ps.focal = "setup_sessions";
    ps.moderator = "employees";
    ps.second_moderator = "region";
    const ProbeResult atReference = probe_response(core.design, core.fit, ps, Averaging::Sample);
    req.values["region"] = 0;
    const EffectPoint p0 = probability_effect(core.design, core.fit, req, atReference.effects.front().moderator_value);
    EXPECT_LE(rel(atReference.effects.front().estimate, p0.estimate), 1e-12);
}
