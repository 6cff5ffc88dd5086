// The Surface plot's "beyond the data" wash follows the convex hull of the
// observed (focal, moderator) pairs: just inside each edge of the hull the
// map shows unwashed, just outside it is washed, whatever the grid's cells.
// (The hull itself, Andrew's monotone chain, is checked against hand-worked
// point sets in tests/core/test_surface_view.cpp.)
#include <gtest/gtest.h>

#include <qcustomplot.h>

#include <QToolButton>
#include <cmath>

#include "plots/surface_plot.hpp"
#include "sample_window.hpp"

using namespace moderato;
using namespace moderato::ui;

TEST(SurfaceMask, TheWashFollowsTheHullOfTheData) {
    // orchard-nitrogen: two continuous predictors, so the Probe section offers the Surface plot.
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    auto* toggle = win.w.findChild<QToolButton*>(QStringLiteral("surface-toggle"));
    ASSERT_TRUE(toggle && toggle->isVisible());
    QTest::mouseClick(toggle, Qt::LeftButton);
    auto* surface = win.w.findChild<SurfacePlot*>();
    ASSERT_TRUE(surface && surface->isVisible());
    QCoreApplication::processEvents();
    const DataRegion& hull = surface->region();
    ASSERT_GE(hull.x.size(), 3u);
    QCPAbstractItem* mask = surface->beyondMask();
    ASSERT_TRUE(mask);
    QCustomPlot* plot = surface->figurePlot();
    plot->replot();
    // The same drawing with and without the wash.
    const QImage washed = plot->toPixmap().toImage();
    mask->setVisible(false);
    const QImage plain = plot->toPixmap().toImage();
    mask->setVisible(true);
    plot->replot();
    ASSERT_EQ(washed.size(), plain.size());

    const auto pixel = [&](double x, double z) {
        return QPointF(plot->xAxis->coordToPixel(x), plot->yAxis->coordToPixel(z));
    };
    const std::size_t n = hull.x.size();
    QPointF centre;
    for (std::size_t i = 0; i < n; ++i) centre += pixel(hull.x[i], hull.z[i]) / static_cast<double>(n);
    const QRect area = plot->axisRect()->rect().adjusted(2, 2, -2, -2);
    const auto same = [&](QPointF p) { return washed.pixel(p.toPoint()) == plain.pixel(p.toPoint()); };
    EXPECT_TRUE(same(centre)) << "the middle of the data is washed";
    int inside = 0, outside = 0, outsideWashed = 0;
    for (std::size_t i = 0; i < n; ++i) {
        const QPointF a = pixel(hull.x[i], hull.z[i]), b = pixel(hull.x[(i + 1) % n], hull.z[(i + 1) % n]);
        const QPointF edge = b - a;
        const double length = std::hypot(edge.x(), edge.y());
        if (length < 30) continue;  // too short an edge to probe beside
        // 6 px either side of the edge's middle, across it (inwards: towards the centre).
        QPointF normal(-edge.y() / length, edge.x() / length);
        const QPointF middle = (a + b) / 2.0;
        if (QPointF::dotProduct(normal, centre - middle) < 0) normal = -normal;
        const QPointF in = middle + 6 * normal, out = middle - 6 * normal;
        SCOPED_TRACE(QStringLiteral("edge %1 at (%2, %3)").arg(i).arg(middle.x()).arg(middle.y()).toStdString());
        ++inside;
        EXPECT_TRUE(same(in)) << "washed just inside the hull";
        if (area.contains(out.toPoint())) {
            ++outside;
            if (!same(out)) ++outsideWashed;
        }
    }
    EXPECT_GE(inside, 3);
    ASSERT_GE(outside, 2) << "the hull fills the plot area: nothing to probe outside it";
    // Every probe outside is washed (one may sit under the "beyond the data" label).
    EXPECT_GE(outsideWashed, outside - 1);
}
