// The moderator slider in exported figures: an export shows no slider
// handle, value box or slider's line unless the user ticks "Mark the
// slider's value" in Export Figure; then the mark says what it is
// ("soil_moisture_pct = 20"). The live plots keep their handle either way,
// and the choice is stored with the analysis's figure settings.
#include <gtest/gtest.h>

#include <qcustomplot.h>

#include <QCheckBox>
#include <QTemporaryDir>
#include <QTest>

#include "export/figure_export_dialog.hpp"
#include "figure_texts.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "qt_file_bytes.hpp"
#include "sample_window.hpp"
#include "style/estuary.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

FigureSettings memoSettings(bool mark) {
    FigureSettings s;  // the Memo preset, 6.5 × 4 in
    s.caption = false;
    s.mark_slider = mark;
    return s;
}

// The white texts of an export: the value box (white on ink) is the only one.
QStringList whiteTexts(const QList<test::DrawnText>& texts) {
    QStringList out;
    for (const auto& t : texts)
        if (t.colour == QColor(Qt::white)) out << t.text;
    return out;
}

bool hasText(const QList<test::DrawnText>& texts, const QString& text) {
    for (const auto& t : texts)
        if (t.text == text) return true;
    return false;
}

}  // namespace

TEST(FigureSliderMark, ExportsShowNoSliderUnlessAskedAndThenNameTheValue) {
    // orchard-nitrogen: a continuous moderator (soil_moisture_pct), slider at its mean.
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    auto* effect = win.w.findChild<EffectPlot*>();
    auto* lines = win.w.findChild<LinesPlot*>();
    ASSERT_TRUE(effect && lines);
    ASSERT_TRUE(effect->sliderMarkShown());
    const QString value = effect->handleText();  // the live box: the value alone
    ASSERT_FALSE(value.isEmpty());
    const QString named = QStringLiteral("soil_moisture_pct = %1").arg(value);
    EXPECT_TRUE(lines->sliderLineShown());
    EXPECT_EQ(lines->sliderLineLegendName(), QStringLiteral("at the slider's value"));

    // Default: no value box, no slider's line or its legend entry.
    const auto plain = test::figureTexts(effect, memoSettings(false));
    EXPECT_TRUE(whiteTexts(plain).isEmpty()) << whiteTexts(plain).join(QLatin1Char('|')).toStdString();
    const auto plainLines = test::figureTexts(lines, memoSettings(false));
    EXPECT_FALSE(hasText(plainLines, QStringLiteral("at the slider's value")));
    EXPECT_FALSE(hasText(plainLines, named));

    // Asked for: the box names the moderator and its value; the Lines plot's
    // legend names the slider's line the same way.
    const auto marked = test::figureTexts(effect, memoSettings(true));
    EXPECT_EQ(whiteTexts(marked), QStringList{named});
    const auto markedLines = test::figureTexts(lines, memoSettings(true));
    EXPECT_TRUE(hasText(markedLines, named));

    // The live plots are as before.
    EXPECT_TRUE(effect->sliderMarkShown());
    EXPECT_EQ(effect->handleText(), value);
    EXPECT_TRUE(lines->sliderLineShown());
    EXPECT_EQ(lines->sliderLineLegendName(), QStringLiteral("at the slider's value"));
}

TEST(FigureSliderMark, TheDialogOffersTheMarkAndStoresIt) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    auto* effect = win.w.findChild<EffectPlot*>();
    ASSERT_TRUE(effect);
    const QString named = QStringLiteral("soil_moisture_pct = %1").arg(effect->handleText());
    ASSERT_FALSE(win.analysis().figure.mark_slider);  // the sample keeps the default
    QTemporaryDir dir;
    FigureExportDialog dialog(effect, win.w.document(), win.id, QString());
    dialog.show();
    auto* mark = dialog.findChild<QCheckBox*>(QStringLiteral("figure-mark-slider"));
    ASSERT_TRUE(mark);
    EXPECT_FALSE(mark->isChecked());
    const QString off = dir.filePath(QStringLiteral("off.svg"));
    ASSERT_TRUE(dialog.exportTo(off)) << dialog.statusText().toStdString();
    EXPECT_FALSE(test::readAll(off).contains(named.toUtf8()));
    QTest::mouseClick(mark, Qt::LeftButton, {}, QPoint(4, mark->height() / 2));
    ASSERT_TRUE(mark->isChecked());
    EXPECT_TRUE(dialog.settings().mark_slider);
    const QString on = dir.filePath(QStringLiteral("on.svg"));
    ASSERT_TRUE(dialog.exportTo(on)) << dialog.statusText().toStdString();
    EXPECT_TRUE(test::readAll(on).contains(named.toUtf8()));
    EXPECT_TRUE(win.analysis().figure.mark_slider);
    // A new dialog starts with the stored choice.
    FigureExportDialog again(effect, win.w.document(), win.id, QString());
    EXPECT_TRUE(again.findChild<QCheckBox*>(QStringLiteral("figure-mark-slider"))->isChecked());
}

namespace {

// The legend entry of the slider's line on the Lines plot, or nullptr.
QCPPlottableLegendItem* sliderEntry(QCustomPlot* plot) {
    for (int i = 0; i < plot->legend->itemCount(); ++i)
        if (auto* item = qobject_cast<QCPPlottableLegendItem*>(plot->legend->item(i)))
            if (item->plottable()->name() == QStringLiteral("at the slider's value")) return item;
    return nullptr;
}

}  // namespace

// The legend follows the analysis shown: switching from a categorical
// moderator (the slider picks a group's own line, no entry of its own) to a
// continuous one (an ink line "at the slider's value") and back leaves no
// entry or pen of the other behind (seen stale in use: common practice is
// that a legend describes what is drawn).
TEST(FigureSliderMark, TheLegendFollowsTheAnalysisShown) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("turbine-repairs")));
    win.showSection(AnalysisPage::Probe);
    auto* lines = win.w.findChild<LinesPlot*>();
    ASSERT_TRUE(lines);
    ProbeSection* probe = win.w.analysisPage()->probe();
    const auto showAndSettle = [&](const char* id, const char* moderator) {
        win.w.showAnalysis(QString::fromLatin1(id));
        win.id = QString::fromLatin1(id);
        EXPECT_TRUE(win.waitForRun());
        EXPECT_TRUE(test::waitUntil(
            [&] { return probe->engine().valid() && probe->engine().moderator() == std::string(moderator); }));
        QTest::qWait(50);
    };
    showAndSettle("experience-site", "site");
    QCustomPlot* plot = lines->figurePlot();
    EXPECT_EQ(sliderEntry(plot), nullptr);
    EXPECT_TRUE(lines->sliderLineLegendName().isEmpty());

    showAndSettle("experience-wind", "wind_ms");
    QCPPlottableLegendItem* entry = sliderEntry(plot);
    ASSERT_NE(entry, nullptr);
    EXPECT_EQ(lines->sliderLineLegendName(), QStringLiteral("at the slider's value"));
    const auto* graph = qobject_cast<QCPGraph*>(entry->plottable());
    ASSERT_TRUE(graph);
    EXPECT_EQ(graph->pen().color(), estuary::ink);  // the ink line, not a group's colour

    showAndSettle("experience-site", "site");
    EXPECT_EQ(sliderEntry(plot), nullptr);
    EXPECT_TRUE(lines->sliderLineLegendName().isEmpty());
    // Every line in the legend is one of the site groups' lines.
    for (int i = 0; i < plot->legend->itemCount(); ++i)
        if (auto* item = qobject_cast<QCPPlottableLegendItem*>(plot->legend->item(i)))
            if (qobject_cast<QCPGraph*>(item->plottable()) && item->plottable()->name().startsWith(u's')) {
                EXPECT_TRUE(item->plottable()->name().startsWith(QStringLiteral("site = ")))
                    << item->plottable()->name().toStdString();
            }
}
