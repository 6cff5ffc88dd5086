// Probe section polish: where two groups differ (the Johnson–Neyman
// technique on the group gap), the value a second moderator is held at, the
// dark desktop palette, and which scale a logistic probe shows. Numbers are
// checked against core called directly and, where the algebra is simple,
// against the closed form.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QAbstractItemView>
#include <QApplication>
#include <QCheckBox>
#include <QComboBox>
#include <QDir>
#include <QDoubleSpinBox>
#include <QLabel>
#include <QPalette>
#include <QRegularExpression>
#include <QTest>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>

#include "common/figure_caption.hpp"
#include "common/held_value_text.hpp"
#include "common/tolerance.hpp"
#include "data/dataset_page.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/probing/probe_curves.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "probe/gap_text.hpp"
#include "probe/held_value_control.hpp"
#include "probe/readout_panel.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/app_style.hpp"
#include "shell/main_window.hpp"
#include "style/palette_text.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::rel;

namespace {

// Core on its own: the project's first analysis (with `edit` applied) fitted and probed directly.
struct Direct {
    LoadedProject loaded;
    Analysis analysis;
    Design design;
    FitResult fit;
    ProbeResult probe;
};

Direct direct(const QString& projectPath, const std::function<void(Analysis&)>& edit = {}) {
    Direct d;
    d.loaded = load_project(projectPath.toStdString());
    d.analysis = d.loaded.project.analyses.front();
    if (edit) edit(d.analysis);
    const ModelSpec spec = model_spec(d.analysis);
    d.design = build_design(*d.loaded.tables.at(d.analysis.dataset), spec);
    d.fit = fit_design(d.design, spec);
    ProbeSpec ps;
    ps.focal = d.analysis.roles.focal;
    ps.moderator = d.analysis.roles.moderator;
    ps.second_moderator = d.analysis.roles.second_moderator;
    ps.second_value = d.analysis.probe.second_value;
    d.probe = probe(d.design, d.fit, ps);
    return d;
}

struct Window {
    MainWindow w;
    QString id;
    ProbeSection* section = nullptr;

    explicit Window(const QString& project) {
        w.setInteractive(false);
        w.resize(1500, 950);
        w.show();
        EXPECT_TRUE(test::openProject(w, project)) << w.lastMessage().toStdString();
        id = w.analysisPage()->analysisId();
        EXPECT_TRUE(waitForRun());
        w.analysisPage()->showSection(AnalysisPage::Probe);
        section = w.analysisPage()->probe();
        EXPECT_TRUE(QTest::qWaitForWindowExposed(&w));
        settle();
    }
    bool waitForRun() {
        return test::waitUntil(
            [&] { return !w.runner()->busy(id) && (w.runner()->result(id) || !w.runner()->error(id).isEmpty()); });
    }
    void settle() {
        for (int i = 0; i < 5; ++i) QCoreApplication::processEvents();
        section->effectPlot()->figurePlot()->replot();
        section->linesPlot()->figurePlot()->replot();
        QCoreApplication::processEvents();
    }
    const Analysis& analysis() const { return *w.document()->analysis(id); }
    QUndoStack* undo() { return w.document()->undoStack(); }
};

// Four significant digits as the workbench writes numbers (common practice; see test::fourDigits).
QString g4(double v) { return test::fourDigits(v); }

int coefficient(const FitResult& fit, std::vector<std::string> factors) {
    std::sort(factors.begin(), factors.end());
    do {
        std::string term;
        for (const auto& f : factors) term += (term.empty() ? "" : "×") + f;
        const int i = fit.index_of(term);
        if (i >= 0) return i;
    } while (std::next_permutation(factors.begin(), factors.end()));
    return -1;
}

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

// ---------------------------------------------------------------------------
// 1. Where two groups differ.

TEST(ProbePolish, GroupGapRegionsAreStatedAndShadedWhereCoreFindsThem) {
    const QString path = test::sampleProject(QStringLiteral("coffee-discount"));
    Window win(path);
    ProbeSection* s = win.section;
    const Direct core = direct(path);
    ASSERT_EQ(core.probe.crossovers.size(), 1u);
    const Crossover& c = core.probe.crossovers.front();
    const SignificanceRegions& r = c.gap_regions;

    // Closed form: the gap between the groups (moderator 1 minus 0) is b2 + b3 x with variance
    // V22 + 2 x V23 + x^2 V33; the region boundaries are the roots of gap^2 = q^2 var.
    const int b2 = coefficient(core.fit, {core.analysis.roles.moderator});
    const int b3 = coefficient(core.fit, {core.analysis.roles.focal, core.analysis.roles.moderator});
    ASSERT_GE(b2, 0);
    ASSERT_GE(b3, 0);
    const Eigen::VectorXd& b = core.fit.beta;
    const Eigen::MatrixXd& V = core.fit.covariance;
    const double q = core.fit.critical_value;
    for (double x : {0.0, 10.0, 25.0}) {
        EXPECT_NEAR(c.gap.effect(x), b[b2] + b[b3] * x, 1e-10);
        EXPECT_NEAR(c.gap.variance(x), V(b2, b2) + 2 * x * V(b2, b3) + x * x * V(b3, b3), 1e-12);
    }
    const double A = b[b3] * b[b3] - q * q * V(b3, b3);
    const double B = 2 * (b[b2] * b[b3] - q * q * V(b2, b3));
    const double C = b[b2] * b[b2] - q * q * V(b2, b2);
    const double disc = B * B - 4 * A * C;
    ASSERT_GT(disc, 0);
    std::vector<double> roots{(-B - std::sqrt(disc)) / (2 * A), (-B + std::sqrt(disc)) / (2 * A)};
    std::sort(roots.begin(), roots.end());
    ASSERT_EQ(r.boundaries.size(), 2u);
    for (std::size_t k = 0; k < 2; ++k) {
        EXPECT_NEAR(r.boundaries[k], roots[k], 1e-9 * (1 + std::abs(roots[k])));
        // At each boundary |gap| / SE equals the critical value.
        EXPECT_NEAR(std::abs(c.gap.effect(r.boundaries[k])) / std::sqrt(c.gap.variance(r.boundaries[k])), q, 1e-8);
    }

    // The statement: both boundaries lie inside the observed discount range here.
    const auto [flo, fhi] = core.probe.focal_range;
    ASSERT_GT(r.boundaries[0], flo);
    ASSERT_LT(r.boundaries[1], fhi);
    const QString expected = QStringLiteral(
                                 "The two groups' predicted weekly_spend differ (95% pointwise) for discount_pct "
                                 "below %1 and above %2; between these values they cannot be told apart.")
                                 .arg(g4(r.boundaries[0]), g4(r.boundaries[1]));
    EXPECT_TRUE(s->summaryText().contains(expected)) << s->summaryText().toStdString();

    // The strip on the Lines plot: from the start of the data to the first boundary, and from the second to the end.
    ASSERT_TRUE(s->differToggle()->isVisible());
    const auto& strips = s->linesPlot()->differStrips();
    ASSERT_EQ(strips.size(), 2u);
    EXPECT_DOUBLE_EQ(strips[0].first, flo);
    EXPECT_DOUBLE_EQ(strips[0].second, r.boundaries[0]);
    EXPECT_DOUBLE_EQ(strips[1].first, r.boundaries[1]);
    EXPECT_DOUBLE_EQ(strips[1].second, fhi);
    QCustomPlot* plot = s->linesPlot()->figurePlot();
    bool legend = false;
    for (int i = 0; i < plot->legend->itemCount(); ++i)
        if (auto* item = qobject_cast<QCPPlottableLegendItem*>(plot->legend->item(i)))
            legend |= item->plottable()->name() == QStringLiteral("groups differ");
    EXPECT_TRUE(legend);

    // What is drawn: the bottom edge of the plot is tinted inside a strip and not once the toggle is off.
    plot->replot();
    const QRect axis = plot->axisRect()->rect();
    const int px = static_cast<int>(std::lround(plot->xAxis->coordToPixel(0.5 * (flo + r.boundaries[0]))));
    const QPoint at(px, axis.bottom() - LinesPlot::kDifferStripHeight / 2);
    const QColor withStrip = plot->toPixmap().toImage().pixelColor(at);
    QTest::mouseClick(s->differToggle(), Qt::LeftButton);
    EXPECT_TRUE(s->linesPlot()->differStrips().empty());
    plot->replot();
    const QColor without = plot->toPixmap().toImage().pixelColor(at);
    EXPECT_NE(withStrip, without) << withStrip.name().toStdString();
    QTest::mouseClick(s->differToggle(), Qt::LeftButton);
    EXPECT_EQ(s->linesPlot()->differStrips().size(), 2u);
}

TEST(ProbePolish, ThreeGroupsStateEachPairAndDrawNoStrip) {
    const QString path = test::sampleProject(QStringLiteral("helpdesk-staffing"));
    Window win(path);
    ProbeSection* s = win.section;
    const Direct core = direct(path);
    ASSERT_EQ(core.probe.crossovers.size(), 3u);
    EXPECT_FALSE(s->differToggle()->isVisible());
    EXPECT_TRUE(s->linesPlot()->differStrips().empty());
    for (const Crossover& c : core.probe.crossovers)
        for (double bd : c.gap_regions.boundaries) {
            // Source: core's gap regions; closed form: |gap| / SE = q at a boundary.
            EXPECT_TRUE(s->summaryText().contains(g4(bd))) << g4(bd).toStdString();
            EXPECT_NEAR(std::abs(c.gap.effect(bd)) / std::sqrt(c.gap.variance(bd)), core.fit.critical_value, 1e-8);
        }
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("Predicted resolution_hours for shift = day and shift = night")))
        << s->summaryText().toStdString();
}

TEST(ProbePolish, ContinuousModeratorLinesDifferWhereTheModeratorsEffectIs) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    Window win(path);
    ProbeSection* s = win.section;
    const Direct core = direct(path);
    ASSERT_EQ(core.probe.crossovers.size(), 1u);
    const Crossover& c = core.probe.crossovers.front();
    // Closed form: lines at two moderator values differ by (z2 - z1)(b2 + b3 x), so they differ where
    // the moderator's own effect b2 + b3 x does.
    const int b2 = coefficient(core.fit, {core.analysis.roles.moderator});
    const int b3 = coefficient(core.fit, {core.analysis.roles.focal, core.analysis.roles.moderator});
    for (double x : {50.0, 150.0}) EXPECT_NEAR(c.gap.effect(x), core.fit.beta[b2] + core.fit.beta[b3] * x, 1e-10);
    EXPECT_EQ(s->differToggle()->text(), QStringLiteral("Where lines differ"));
    const GapStatement g = describeGap(c.gap_regions, QStringLiteral("X"), QStringLiteral("nitrogen_kg_ha"),
                                       core.probe.focal_range, QStringLiteral("95%"));
    EXPECT_EQ(s->linesPlot()->differStrips(), g.differ);
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("Predicted yield_t_ha at any two values of soil_moisture_pct")))
        << s->summaryText().toStdString();
    for (double bd : c.gap_regions.boundaries) EXPECT_TRUE(s->summaryText().contains(g4(bd)));
}

TEST(ProbePolish, GapStatementsCoverEveryCase) {
    // Hand-made regions (the wording is ours); the range is 0 to 30.
    const auto inf = std::numeric_limits<double>::infinity();
    auto say = [](std::vector<double> bounds, std::vector<Region> sig) {
        SignificanceRegions r;
        r.boundaries = std::move(bounds);
        r.significant = std::move(sig);
        return describeGap(r, QStringLiteral("S"), QStringLiteral("x"), {0.0, 30.0}, QStringLiteral("95%"));
    };
    EXPECT_EQ(say({}, {}).text,
              QStringLiteral("S cannot be told apart (95% pointwise) anywhere in the observed range of "
                             "x (0 to 30)."));
    EXPECT_EQ(say({}, {{-inf, inf}}).text,
              QStringLiteral("S differ (95% pointwise) over the whole observed range of x (0 to 30)."));
    // Numbers at four significant digits, trailing zeros kept (13.1 -> "13.10").
    const GapStatement two = say({13.1, 18.9}, {{-inf, 13.1}, {18.9, inf}});
    EXPECT_EQ(two.text, QStringLiteral("S differ (95% pointwise) for x below 13.10 and above 18.90; between these "
                                       "values they cannot be told apart."));
    EXPECT_EQ(two.differ, (std::vector<std::pair<double, double>>{{0.0, 13.1}, {18.9, 30.0}}));
    // One boundary inside, one beyond the data.
    const GapStatement beyond = say({-4, 12.5}, {{-inf, -4}, {12.5, inf}});
    EXPECT_EQ(beyond.text,
              QStringLiteral("S differ (95% pointwise) for x above 12.50; for x below 12.50 they cannot be "
                             "told apart. The boundary at x = −4 lies beyond the data (observed 0 to 30)."));
    EXPECT_EQ(beyond.beyond, std::vector<double>{-4});
    EXPECT_EQ(beyond.inside, std::vector<double>{12.5});
    // Significant between the boundaries (an unbounded Fieller set).
    EXPECT_EQ(say({5, 40}, {{5, 40}}).text,
              QStringLiteral("S differ (95% pointwise) for x above 5; for x below 5 they cannot be told apart. The "
                             "boundary at x = 40 lies beyond the data (observed 0 to 30)."));
    EXPECT_EQ(say({5, 10}, {{5, 10}}).text,
              QStringLiteral("S differ (95% pointwise) for x from 5 to 10; for x below 5 and above 10 they cannot be "
                             "told apart."));
    EXPECT_EQ(
        say({-9, 45}, {{-inf, -9}, {45, inf}}).text,
        QStringLiteral("S cannot be told apart (95% pointwise) anywhere in the observed range of x (0 to 30). The "
                       "boundaries at x = −9 and 45 lie beyond the data (observed 0 to 30)."));
}

// ---------------------------------------------------------------------------
// 2. The second moderator's held value.

TEST(ProbePolish, SecondModeratorHeldValueIsOneUndoableEditMatchingCore) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    Window win(path);
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
    const Direct base = direct(path, edit);
    const Table& table = *base.loaded.tables.at(base.analysis.dataset);
    const auto [mean, sd] =
        meanSd(table, "slope_pct", {"yield_t_ha", "nitrogen_kg_ha", "soil_moisture_pct", "slope_pct"});
    // By default the second moderator is held at its mean, and the readout says so.
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("slope_pct held at %1 (mean)").arg(g4(mean))))
        << s->readoutText().toStdString();

    // Closed form: the effect of x at moderator z and second moderator w is b_x + b_xz z + b_xw w + b_xzw z w.
    const std::string x = "nitrogen_kg_ha", z = "soil_moisture_pct", w = "slope_pct";
    const int bx = coefficient(base.fit, {x}), bxz = coefficient(base.fit, {x, z}), bxw = coefficient(base.fit, {x, w}),
              bxzw = coefficient(base.fit, {x, z, w});
    ASSERT_TRUE(bx >= 0 && bxz >= 0 && bxw >= 0 && bxzw >= 0);
    const Eigen::VectorXd& b = base.fit.beta;
    auto checkAt = [&](double heldAt) {
        SCOPED_TRACE(heldAt);
        const double m = s->currentModeratorValue();
        // Source: core probe() with ProbeSpec.second_value on the same data.
        const Direct core = direct(path, [&](Analysis& a) {
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
        EXPECT_TRUE(s->readoutText().contains(g4(expected.estimate))) << s->readoutText().toStdString();
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
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("slope_pct held at %1 (mean + 1 SD)").arg(g4(mean + sd))))
        << s->readoutText().toStdString();
    QLabel* linesTitle = labelContaining(s, QStringLiteral("Lines plot"));
    QLabel* effectTitle = labelContaining(s, QStringLiteral("Effect plot"));
    ASSERT_TRUE(linesTitle && effectTitle);
    for (QLabel* l : {linesTitle, effectTitle})
        EXPECT_TRUE(l->text().contains(QStringLiteral("with slope_pct held at %1 (mean + 1 SD)").arg(g4(mean + sd))))
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
    if (!qEnvironmentVariable("MODERATO_SCREENSHOT_DIR").isEmpty())
        win.w.grab().save(qEnvironmentVariable("MODERATO_SCREENSHOT_DIR") + QStringLiteral("/three-way-probe.png"));

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

TEST(ProbePolish, HeldValueLabelsNameTheChoice) {
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

// ---------------------------------------------------------------------------
// 3. A dark desktop palette.

namespace {

// A dark desktop palette of the kind a dark desktop theme hands to Qt.
QPalette darkDesktopPalette() {
    QPalette p;
    const QColor window(0x2B, 0x2D, 0x30), base(0x1E, 0x1F, 0x22), text(0xE8, 0xE8, 0xE8), button(0x3A, 0x3C, 0x40);
    p.setColor(QPalette::Window, window);
    p.setColor(QPalette::WindowText, text);
    p.setColor(QPalette::Base, base);
    p.setColor(QPalette::AlternateBase, QColor(0x26, 0x28, 0x2B));
    p.setColor(QPalette::Text, text);
    p.setColor(QPalette::Button, button);
    p.setColor(QPalette::ButtonText, text);
    p.setColor(QPalette::BrightText, Qt::white);
    p.setColor(QPalette::Light, QColor(0x55, 0x57, 0x5C));
    p.setColor(QPalette::Midlight, QColor(0x47, 0x49, 0x4D));
    p.setColor(QPalette::Mid, QColor(0x5F, 0x61, 0x66));
    p.setColor(QPalette::Dark, QColor(0x18, 0x19, 0x1B));
    p.setColor(QPalette::Shadow, Qt::black);
    p.setColor(QPalette::ToolTipBase, window);
    p.setColor(QPalette::ToolTipText, text);
    p.setColor(QPalette::PlaceholderText, QColor(0x9A, 0x9C, 0xA0));
    p.setColor(QPalette::Link, QColor(0x7C, 0xB7, 0xD6));
    for (auto role : {QPalette::WindowText, QPalette::Text, QPalette::ButtonText})
        p.setColor(QPalette::Disabled, role, QColor(0x80, 0x82, 0x86));
    return p;
}

// Sets a palette for one test and restores the previous one afterwards.
struct PaletteScope {
    QPalette before = QApplication::palette();
    explicit PaletteScope(const QPalette& p) {
        QApplication::setPalette(p);
        applyAppStyle(*qApp);
    }
    ~PaletteScope() { QApplication::setPalette(before); }
};

bool insidePlot(const QWidget* w) {
    for (const QObject* o = w; o; o = o->parent())
        if (qobject_cast<const QCustomPlot*>(o)) return true;
    return false;
}

// The colour a widget's text sits on: its own background, or (transparent) its parent's.
QColor backgroundBehind(const QWidget* w) {
    for (; w; w = w->parentWidget()) {
        const QColor c = w->palette().color(w->backgroundRole());
        if (c.alpha() == 255) return c;
    }
    return QApplication::palette().color(QPalette::Window);
}

// WCAG 2 AA asks 4.5:1 for body text (common practice).
constexpr double kMinimumContrast = 4.5;

// Every text the user reads outside the plots: labels (their own colour and any colour in
// rich text) and the cells of tables and lists, against the background they sit on.
void expectReadable(QWidget* root, const QString& where) {
    static const QRegularExpression css(QStringLiteral("color\\s*:\\s*([#\\w]+)"));
    int checked = 0;
    for (QLabel* l : root->findChildren<QLabel*>()) {
        if (!l->isVisible() || insidePlot(l) || l->text().trimmed().isEmpty()) continue;
        const QPalette p = l->palette();
        const QColor bg = backgroundBehind(l);
        const QColor fg = p.color(l->isEnabled() ? QPalette::Active : QPalette::Disabled, l->foregroundRole());
        EXPECT_GE(contrastRatio(fg, bg), kMinimumContrast)
            << where.toStdString() << ": label '" << l->text().left(60).toStdString() << "' " << fg.name().toStdString()
            << " on " << bg.name().toStdString();
        for (auto it = css.globalMatch(l->text()); it.hasNext();) {
            const QColor c = QColor::fromString(it.next().captured(1));
            if (!c.isValid()) continue;
            EXPECT_GE(contrastRatio(c, bg), kMinimumContrast)
                << where.toStdString() << ": rich text colour " << c.name().toStdString() << " in '"
                << l->text().left(60).toStdString() << "'";
        }
        ++checked;
    }
    for (QAbstractItemView* v : root->findChildren<QAbstractItemView*>()) {
        if (!v->isVisible() || !v->model()) continue;
        QAbstractItemModel* m = v->model();
        const QPalette p = v->palette();
        for (int r = 0; r < std::min(m->rowCount(), 40); ++r)
            for (int c = 0; c < m->columnCount(); ++c) {
                const QModelIndex i = m->index(r, c);
                if (m->data(i, Qt::DisplayRole).toString().isEmpty()) continue;
                const QVariant fgv = m->data(i, Qt::ForegroundRole), bgv = m->data(i, Qt::BackgroundRole);
                const QColor fg = fgv.isValid() ? fgv.value<QBrush>().color() : p.color(QPalette::Text);
                const QColor bg = bgv.isValid() ? bgv.value<QBrush>().color() : p.color(QPalette::Base);
                EXPECT_GE(contrastRatio(fg, bg), kMinimumContrast)
                    << where.toStdString() << ": " << v->objectName().toStdString() << " cell (" << r << ", " << c
                    << ") '" << m->data(i).toString().toStdString() << "' " << fg.name().toStdString() << " on "
                    << bg.name().toStdString();
                ++checked;
            }
    }
    for (ReadoutPanel* r : root->findChildren<ReadoutPanel*>()) {
        if (!r->isVisible()) continue;
        EXPECT_GE(contrastRatio(r->palette().color(QPalette::Text), r->palette().color(QPalette::Base)),
                  kMinimumContrast);
    }
    EXPECT_GT(checked, 0) << where.toStdString();
}

void expectWhitePlots(QWidget* root, const QString& where) {
    for (QCustomPlot* plot : root->findChildren<QCustomPlot*>()) {
        if (!plot->isVisible()) continue;
        const QImage img = plot->toPixmap().toImage();
        ASSERT_FALSE(img.isNull());
        EXPECT_EQ(img.pixelColor(1, img.height() - 2), QColor(Qt::white))
            << where.toStdString() << ": " << plot->objectName().toStdString() << " keeps a white background (LOOK.md)";
    }
}

void saveScreenshot(MainWindow& w, const QString& name) {
    const QString dir = qEnvironmentVariable("MODERATO_SCREENSHOT_DIR");
    if (dir.isEmpty()) return;
    QDir().mkpath(dir);
    w.grab().save(dir + QLatin1Char('/') + name + QStringLiteral(".png"));
}

void checkEverySection(const QString& tag) {
    const char* names[] = {"specify", "estimates", "probe", "checks"};
    for (const QString& name : test::sampleNames()) {
        SCOPED_TRACE(name.toStdString());
        MainWindow w;
        w.setInteractive(false);
        w.resize(1500, 950);
        w.show();
        ASSERT_TRUE(test::openProject(w, test::sampleProject(name)));
        const QString id = w.analysisPage()->analysisId();
        ASSERT_TRUE(test::waitUntil([&] { return w.runner()->result(id) != nullptr; }));
        for (int s = 0; s < 4; ++s) {
            w.analysisPage()->showSection(static_cast<AnalysisPage::Section>(s));
            for (int i = 0; i < 10; ++i) QCoreApplication::processEvents();
            const QString where = QStringLiteral("%1 %2 %3").arg(tag, name, QLatin1String(names[s]));
            expectReadable(&w, where);
            expectWhitePlots(&w, where);
            saveScreenshot(w, QStringLiteral("%1-%2-%3").arg(tag, name, QLatin1String(names[s])));
        }
        w.showDataset(QString::fromStdString(w.document()->project().datasets.front().id));
        for (int i = 0; i < 10; ++i) QCoreApplication::processEvents();
        expectReadable(&w, tag + QStringLiteral(" dataset ") + name);
        saveScreenshot(w, QStringLiteral("%1-%2-dataset").arg(tag, name));
    }
}

}  // namespace

TEST(ProbePolish, DarkDesktopPaletteKeepsEveryTextReadableAndPlotsWhite) {
    PaletteScope dark(darkDesktopPalette());
    ASSERT_TRUE(darkPalette());
    checkEverySection(QStringLiteral("dark"));
}

TEST(ProbePolish, LightDesktopPaletteKeepsEveryTextReadable) {
    QPalette light = QApplication::style()->standardPalette();
    PaletteScope scope(light);
    ASSERT_FALSE(darkPalette());
    checkEverySection(QStringLiteral("light"));
}

TEST(ProbePolish, SwitchingToDarkWhileOpenRecoloursQuietText) {
    const QString path = test::sampleProject(QStringLiteral("trial-conversion"));
    PaletteScope scope(QApplication::style()->standardPalette());
    Window win(path);
    // The default pinned rows include mean − 1 SD, which lies beyond the data: a shaded row.
    {
        PaletteScope dark(darkDesktopPalette());
        for (int i = 0; i < 10; ++i) QCoreApplication::processEvents();
        expectReadable(win.section, QStringLiteral("switched to dark"));
    }
    // The dataset page, on screen while the desktop turns dark.
    win.w.showDataset(QString::fromStdString(win.w.document()->project().datasets.front().id));
    for (int i = 0; i < 10; ++i) QCoreApplication::processEvents();
    expectReadable(win.w.datasetPage(), QStringLiteral("dataset page, light again"));
    PaletteScope dark(darkDesktopPalette());
    for (int i = 0; i < 10; ++i) QCoreApplication::processEvents();
    expectReadable(win.w.datasetPage(), QStringLiteral("dataset page switched to dark"));
}

TEST(ProbePolish, ReadableOnMovesAColourJustFarEnough) {
    // WCAG 2 contrast (common practice): black on white is 21:1, a colour on itself 1:1.
    EXPECT_NEAR(contrastRatio(Qt::black, Qt::white), 21.0, 1e-9);
    EXPECT_NEAR(contrastRatio(QColor(0x77, 0x77, 0x77), QColor(0x77, 0x77, 0x77)), 1.0, 1e-12);
    // #767676 on white is the usual example of just passing 4.5:1 (from memory: 4.54).
    EXPECT_NEAR(contrastRatio(QColor(0x76, 0x76, 0x76), Qt::white), 4.54, 0.01);
    const QColor dark(0x2B, 0x2D, 0x30);
    const QColor red(0xB3, 0x26, 0x1E);
    EXPECT_LT(contrastRatio(red, dark), kMinimumContrast);
    EXPECT_GE(contrastRatio(readableOn(red, dark), dark), kMinimumContrast);
    EXPECT_EQ(readableOn(red, Qt::white), red) << "already readable: unchanged";
}

// ---------------------------------------------------------------------------
// 4. The logistic sample: which scale is shown, and the interaction on the probability scale.

TEST(ProbePolish, LogisticProbeSaysWhichScaleAndShowsTheProbabilityInteraction) {
    const QString path = test::sampleProject(QStringLiteral("trial-conversion"));
    Window win(path);
    ProbeSection* s = win.section;
    ASSERT_EQ(win.analysis().probe.scale, ProbeScale::Outcome);
    const Direct core = direct(path);
    const std::string fx = core.analysis.roles.focal, mz = core.analysis.roles.moderator;

    // Probability scale: readout, axis titles and cautions say so.
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Effect of setup_sessions on P(converted = 1)")))
        << s->readoutText().toStdString();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Probability scale")));
    EXPECT_EQ(s->linesPlot()->figurePlot()->yAxis->label(), QStringLiteral("P(converted = 1)"));
    EXPECT_TRUE(s->effectPlot()->figurePlot()->yAxis->label().contains(QStringLiteral("P(converted = 1)")));
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("On the probability scale an effect depends")));

    // The interaction on the probability scale. Closed form (Ai & Norton 2003, both continuous):
    // d2P/dx dz = b12 L'(eta) + (b1 + b12 z)(b2 + b12 x) L''(eta), L' = P(1 - P), L'' = P(1 - P)(1 - 2P),
    // averaged over the rows the model uses.
    const int b1 = coefficient(core.fit, {fx}), b2 = coefficient(core.fit, {mz}), b12 = coefficient(core.fit, {fx, mz});
    ASSERT_TRUE(b1 >= 0 && b2 >= 0 && b12 >= 0);
    const Eigen::VectorXd& b = core.fit.beta;
    const Eigen::VectorXd eta = core.design.X * b;
    const Table& t = *core.loaded.tables.at(core.analysis.dataset);
    double sum = 0;
    for (std::size_t i = 0; i < core.design.n(); ++i) {
        const std::size_t row = core.design.rows[i];
        const double x = t.at(fx).numbers[row], z = t.at(mz).numbers[row];
        const double P = 1 / (1 + std::exp(-eta[static_cast<Eigen::Index>(i)]));
        sum += b[b12] * P * (1 - P) + (b[b1] + b[b12] * z) * (b[b2] + b[b12] * x) * P * (1 - P) * (1 - 2 * P);
    }
    const double closed = sum / static_cast<double>(core.design.n());
    ASSERT_TRUE(s->engine().probe().interaction_effect);
    const InteractionEffect& ie = *s->engine().probe().interaction_effect;
    EXPECT_LE(rel(ie.estimate, closed), 1e-6);
    // Source for the SE and interval: core probability_interaction on the same data.
    ScaleRequest req;
    req.focal = fx;
    req.moderator = mz;
    req.averaging = Averaging::Sample;
    const InteractionEffect fromCore = probability_interaction(core.design, core.fit, req);
    const QString summary = s->summaryText();
    for (double v : {fromCore.estimate, fromCore.std_error, fromCore.ci_lower, fromCore.ci_upper})
        EXPECT_TRUE(summary.contains(g4(v))) << g4(v).toStdString() << "\n" << summary.toStdString();
    EXPECT_TRUE(summary.contains(QStringLiteral("Interaction on the probability scale")));
    EXPECT_TRUE(
        summary.contains(QStringLiteral("The product coefficient on the log-odds scale (setup_sessions×employees = %1) "
                                        "is not this")
                             .arg(g4(b[b12]))))
        << summary.toStdString();
    // It sits in the side panel, above the region of significance.
    EXPECT_LT(summary.indexOf(QStringLiteral("Interaction on the probability scale")),
              summary.indexOf(QStringLiteral("Region of significance")));
    saveScreenshot(win.w, QStringLiteral("logistic-probability"));

    // The log-odds scale: everything says log-odds, and the product coefficient is only that.
    QComboBox* scale = s->scaleChoice();
    scale->setFocus();
    QTest::keyClick(scale, Qt::Key_Up);
    ASSERT_TRUE(
        test::waitUntil([&] { return win.analysis().probe.scale == ProbeScale::Model && !s->engine().probability(); }));
    win.settle();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Effect of setup_sessions on the log-odds of converted")))
        << s->readoutText().toStdString();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Log-odds scale")));
    EXPECT_EQ(s->linesPlot()->figurePlot()->yAxis->label(), QStringLiteral("log-odds of converted"));
    EXPECT_TRUE(s->effectPlot()->figurePlot()->yAxis->label().contains(QStringLiteral("log-odds of converted")));
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("On the log-odds scale a product coefficient is not the "
                                                 "interaction on the probability scale")));
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("The product coefficient (setup_sessions×employees = %1) is the "
                                                 "interaction on the log-odds scale only")
                                      .arg(g4(b[b12]))))
        << s->summaryText().toStdString();
    saveScreenshot(win.w, QStringLiteral("logistic-log-odds"));
}

TEST(ProbePolish, CategoricalSecondModeratorIsHeldAtALevel) {
    // Core's ProbeSpec.second_value for a categorical column is a level index (reference = 0).
    const QString path = test::sampleProject(QStringLiteral("trial-conversion"));
    Window win(path);
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
    const Direct base = direct(path, edit);
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
    const Direct core = direct(path, [&](Analysis& x) {
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
