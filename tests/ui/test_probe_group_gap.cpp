// Where two groups differ, in the Probe section: the Johnson–Neyman
// technique applied to the gap between two groups' lines (or lines at two
// moderator values), stated in the summary and drawn as a strip on the Lines
// plot. Numbers are checked against core called directly (core probe() on the
// same data) and against the closed form of the gap and its variance.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QTest>
#include <QToolButton>
#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "common/direct_fit.hpp"
#include "plots/lines_plot.hpp"
#include "probe/gap_text.hpp"
#include "probe_window.hpp"
#include "sections/probe_section.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

TEST(ProbeGroupGap, GroupGapRegionsAreStatedAndShadedWhereCoreFindsThem) {
    const QString path = test::sampleProject(QStringLiteral("coffee-discount"));
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_EQ(core.probe.crossovers.size(), 1u);
    const Crossover& c = core.probe.crossovers.front();
    const SignificanceRegions& r = c.gap_regions;

    // Closed form: the gap between the groups (moderator 1 minus 0) is b2 + b3 x with variance
    // V22 + 2 x V23 + x^2 V33; the region boundaries are the roots of gap^2 = q^2 var.
    const int b2 = test::coefficient_index(core.fit, {core.analysis.roles.moderator});
    const int b3 = test::coefficient_index(core.fit, {core.analysis.roles.focal, core.analysis.roles.moderator});
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
                                 .arg(test::fourDigits(r.boundaries[0]), test::fourDigits(r.boundaries[1]));
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

TEST(ProbeGroupGap, ThreeGroupsStateAndDrawEachPairOnItsOwnNamedRow) {
    const QString path = test::sampleProject(QStringLiteral("helpdesk-staffing"));
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_EQ(core.probe.crossovers.size(), 3u);
    EXPECT_TRUE(s->differToggle()->isVisible());
    for (const Crossover& c : core.probe.crossovers)
        for (double bd : c.gap_regions.boundaries) {
            // Source: core's gap regions; closed form: |gap| / SE = q at a boundary.
            EXPECT_TRUE(s->summaryText().contains(test::fourDigits(bd))) << test::fourDigits(bd).toStdString();
            EXPECT_NEAR(std::abs(c.gap.effect(bd)) / std::sqrt(c.gap.variance(bd)), core.fit.critical_value, 1e-8);
        }
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("Predicted resolution_hours for shift = day and shift = night")))
        << s->summaryText().toStdString();
    // Three pairs tested at once, unadjusted: said so (common practice: name the multiplicity).
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("Each of the 3 pairs is tested on its own")));

    // One row per pair, in core's order, each named; its strips are that pair's gap regions in the data.
    const QStringList expectedNames{QStringLiteral("day/evening"), QStringLiteral("day/night"),
                                    QStringLiteral("evening/night")};
    LinesPlot* lp = s->linesPlot();
    EXPECT_EQ(lp->differRowLabels(), expectedNames);
    std::vector<std::pair<double, double>> expected;
    std::vector<int> rows;
    for (std::size_t k = 0; k < 3; ++k)
        for (const auto& span : describeGap(core.probe.crossovers[k].gap_regions, QStringLiteral("X"),
                                            QStringLiteral("x"), core.probe.focal_range, QStringLiteral("95%"))
                                    .differ) {
            expected.push_back(span);
            rows.push_back(static_cast<int>(k));
        }
    ASSERT_FALSE(expected.empty());
    EXPECT_EQ(lp->differStrips(), expected);
    EXPECT_EQ(lp->differStripRows(), rows);

    // Drawn where it says: inside a strip of row k the pixel is tinted; above the rows it is not the tint.
    QCustomPlot* plot = lp->figurePlot();
    plot->replot();
    const QImage image = plot->toPixmap().toImage();
    const QRect axis = plot->axisRect()->rect();
    const QImage off = [&] {
        QTest::mouseClick(s->differToggle(), Qt::LeftButton);
        EXPECT_TRUE(lp->differStrips().empty());
        plot->replot();
        return plot->toPixmap().toImage();
    }();
    int tinted = 0;
    for (std::size_t i = 0; i < expected.size(); ++i) {
        // The middle of the strip, right of where the row's name could be.
        const double mid = 0.5 * (expected[i].first + expected[i].second);
        const int px = static_cast<int>(std::lround(plot->xAxis->coordToPixel(mid)));
        const int py = axis.bottom() - 2 - rows[i] * lp->differRowPitch() - 3;
        if (px < axis.left() + 90) continue;
        tinted += image.pixelColor(px, py) != off.pixelColor(px, py);
    }
    EXPECT_GT(tinted, 0);
    QTest::mouseClick(s->differToggle(), Qt::LeftButton);
    EXPECT_EQ(lp->differStrips(), expected);
}

TEST(ProbeGroupGap, ContinuousModeratorLinesDifferWhereTheModeratorsEffectIs) {
    const QString path = test::sampleProject(QStringLiteral("orchard-nitrogen"));
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    ASSERT_EQ(core.probe.crossovers.size(), 1u);
    const Crossover& c = core.probe.crossovers.front();
    // Closed form: lines at two moderator values differ by (z2 - z1)(b2 + b3 x), so they differ where
    // the moderator's own effect b2 + b3 x does.
    const int b2 = test::coefficient_index(core.fit, {core.analysis.roles.moderator});
    const int b3 = test::coefficient_index(core.fit, {core.analysis.roles.focal, core.analysis.roles.moderator});
    for (double x : {50.0, 150.0}) EXPECT_NEAR(c.gap.effect(x), core.fit.beta[b2] + core.fit.beta[b3] * x, 1e-10);
    EXPECT_EQ(s->differToggle()->text(), QStringLiteral("Where lines differ"));
    const GapStatement g = describeGap(c.gap_regions, QStringLiteral("X"), QStringLiteral("nitrogen_kg_ha"),
                                       core.probe.focal_range, QStringLiteral("95%"));
    EXPECT_EQ(s->linesPlot()->differStrips(), g.differ);
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("Predicted yield_t_ha at any two values of soil_moisture_pct")))
        << s->summaryText().toStdString();
    for (double bd : c.gap_regions.boundaries) EXPECT_TRUE(s->summaryText().contains(test::fourDigits(bd)));
}

TEST(ProbeGroupGap, GapStatementsCoverEveryCase) {
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
