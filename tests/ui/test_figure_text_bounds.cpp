// No clipped text in exported figures: every text a figure draws (axis
// titles, tick labels, legend, the "beyond the data" notes, boundary and
// crossover labels, the caption) lies inside the figure and inside the clip
// it is drawn with, for every size preset × every plot × every sample
// project. Each combination is drawn once, on a device that records text and
// paints nothing (figure_texts.hpp). A short influence or surface figure is
// drawn compactly (fewer words over the panels); the live plot comes back
// whole after the export.
#include <gtest/gtest.h>

#include <qcustomplot.h>

#include <QStringList>
#include <limits>

#include "common/figure_caption.hpp"
#include "export/figure_exporter.hpp"
#include "figure_texts.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project_loader.hpp"
#include "plots/diagnostic_plots.hpp"
#include "plots/effect_plot.hpp"
#include "sections/checks_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// Half a unit (1/192 in) of slack for rounding in the text metrics.
constexpr double kSlack = 0.5;

bool inside(const QRectF& inner, const QRectF& outer) {
    return inner.left() >= outer.left() - kSlack && inner.top() >= outer.top() - kSlack &&
           inner.right() <= outer.right() + kSlack && inner.bottom() <= outer.bottom() + kSlack;
}

QString rectText(const QRectF& r) {
    return QStringLiteral("(%1, %2)–(%3, %4)")
        .arg(r.left(), 0, 'f', 1)
        .arg(r.top(), 0, 'f', 1)
        .arg(r.right(), 0, 'f', 1)
        .arg(r.bottom(), 0, 'f', 1);
}

// What is cut off in one drawing of `source` (empty: nothing).
QStringList clippedTexts(FigureSource* source, const FigureSettings& s, const QString& caption) {
    QStringList out;
    const QSize size = FigureExporter::layoutSize(s);
    const QRectF figure(0, 0, size.width(), size.height());
    for (const test::DrawnText& t : test::figureTexts(source, s, caption)) {
        if (!inside(t.rect, figure))
            out << QStringLiteral("“%1” at %2 leaves the figure %3").arg(t.text, rectText(t.rect), rectText(figure));
        else if (!t.clip.isEmpty() && !inside(t.rect, t.clip))
            out << QStringLiteral("“%1” at %2 is cut by its clip %3").arg(t.text, rectText(t.rect), rectText(t.clip));
    }
    return out;
}

// A sample project's first analysis on a workbench page, fitted on this thread.
struct FirstAnalysis {
    ProjectDocument doc;
    AnalysisRunner runner{&doc};
    AnalysisPage page{&doc, &runner};
    QString id;
    explicit FirstAnalysis(const QString& name) {
        runner.setBackgroundThreshold(std::numeric_limits<double>::infinity());
        page.setBackgroundThreshold(std::numeric_limits<double>::infinity());
        doc.adopt(load_project(test::sampleProject(name).toStdString()));
        page.resize(1360, 860);
        id = QString::fromStdString(doc.project().analyses.front().id);
        page.showAnalysis(id);
    }
    bool run() const { return runner.result(id) != nullptr; }
};

FigureSettings presetSettings(const FigurePreset& p) {
    FigureSettings s;  // the default font (DejaVu Sans 9 pt), caption on
    s.preset = p.key;
    s.width_in = p.widthIn;
    s.height_in = p.heightIn;
    s.dpi = 72;  // nothing is rasterised; the resolution does not change the layout
    return s;
}

}  // namespace

TEST(FigureTextBounds, EveryTextOfEveryPlotOfEverySampleFitsAtEveryPreset) {
    int drawings = 0;
    QStringList problems;
    for (const QString& name : test::sampleNames()) {
        ProjectDocument doc;
        doc.adopt(load_project(test::sampleProject(name).toStdString()));
        AnalysisRunner runner(&doc);
        runner.setBackgroundThreshold(std::numeric_limits<double>::infinity());  // fits on this thread
        AnalysisPage page(&doc, &runner);
        page.setBackgroundThreshold(std::numeric_limits<double>::infinity());
        page.resize(1360, 860);
        for (const Analysis& a : doc.project().analyses) {
            const QString id = QString::fromStdString(a.id);
            page.showAnalysis(id);
            const auto run = runner.result(id);
            ASSERT_TRUE(run) << name.toStdString() << ": " << runner.error(id).toStdString();
            QList<FigureSource*> figures = page.probe()->reportFigures(*run);
            page.checks()->ensureComputed();
            figures << page.checks()->figures();
            const QString caption = figureCaption(a, *run);
            for (FigureSource* f : figures)
                for (const FigurePreset& p : figurePresets()) {
                    ++drawings;
                    for (const QString& why : clippedTexts(f, presetSettings(p), caption))
                        problems
                            << QStringLiteral("%1 / %2 / %3 / %4: %5").arg(name, id, f->figureName(), p.label, why);
                }
        }
    }
    // Six samples, each with the Lines, Effect and three check plots at least.
    EXPECT_GE(drawings, 6 * 5 * 4);
    EXPECT_TRUE(problems.isEmpty()) << problems.size() << " clipped:\n"
                                    << problems.mid(0, 40).join(QLatin1Char('\n')).toStdString();
}

// The "beyond the data" note on the Effect plot's right-hand strip was cut
// to "the dat" at the Single column size: the case that started this check.
TEST(FigureTextBounds, TheEffectPlotsRightHandBeyondNoteIsWhole) {
    FirstAnalysis sample(QStringLiteral("orchard-nitrogen"));
    ASSERT_TRUE(sample.run());
    auto* effect = sample.page.findChild<EffectPlot*>();
    ASSERT_TRUE(effect);
    const EffectPlotData& d = effect->data();
    ASSERT_FALSE(d.groups);
    ASSERT_LT(d.observed.second, d.axis.second) << "no strip beyond the data on the right";
    FigureSettings s = presetSettings(*findFigurePreset(SizePreset::SingleColumn));
    const auto texts = test::figureTexts(effect, s);
    int notes = 0;
    for (const auto& t : texts)
        if (t.text == QStringLiteral("the data")) {
            ++notes;
            EXPECT_TRUE(t.clip.isEmpty() || inside(t.rect, t.clip))
                << (rectText(t.rect) + QStringLiteral(" in ") + rectText(t.clip)).toStdString();
        }
    EXPECT_GE(notes, 1);
}

// The influence figure at the Single column size leaves out its title and
// states each flag rule briefly; the live plot afterwards has both again.
TEST(FigureTextBounds, ACompactInfluenceFigureRestoresTheLivePlot) {
    FirstAnalysis sample(QStringLiteral("helpdesk-staffing"));
    ASSERT_TRUE(sample.run());
    sample.page.checks()->ensureComputed();
    DiagnosticPlot* influence = sample.page.checks()->influencePlot();
    ASSERT_TRUE(influence);
    const QString live = influence->panelCaption(0);
    ASSERT_TRUE(live.startsWith(QStringLiteral("Cook's distance: flagged above"))) << live.toStdString();
    const int rows = influence->figurePlot()->plotLayout()->rowCount();
    const int labelled = static_cast<int>(influence->labelledObservations(0).size());

    QStringList small, memo;
    for (const auto& t : test::figureTexts(influence, presetSettings(*findFigurePreset(SizePreset::SingleColumn))))
        small << t.text;
    for (const auto& t : test::figureTexts(influence, presetSettings(*findFigurePreset(SizePreset::Memo))))
        memo << t.text;
    EXPECT_FALSE(small.contains(QStringLiteral("Influence of each row"))) << small.join(u'|').toStdString();
    EXPECT_TRUE(small.contains(QStringLiteral("Cook's distance > 4 / 1,200 = 0.003333")))
        << small.join(u'|').toStdString();
    EXPECT_TRUE(memo.contains(QStringLiteral("Influence of each row"))) << memo.join(u'|').toStdString();

    EXPECT_EQ(influence->panelCaption(0), live);
    EXPECT_EQ(influence->figurePlot()->plotLayout()->rowCount(), rows);
    EXPECT_EQ(static_cast<int>(influence->labelledObservations(0).size()), labelled);
}
