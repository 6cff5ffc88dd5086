#include "plots/plot_style.hpp"

#include <qcustomplot.h>

#include "style/estuary.hpp"

namespace moderato::ui {

void stylePlot(QCustomPlot* plot, const QFont& font) {
    // An explicit minimum: otherwise the layout takes the plot's own hint,
    // which grows with its legend row and keeps the window from shrinking.
    plot->setMinimumSize(240, 160);
    plot->setBackground(Qt::white);
    plot->setAntialiasedElements(QCP::aePlottables | QCP::aeItems | QCP::aeGrid);
    styleAxisRect(plot->axisRect(), font);
    plot->legend->setFont(font);
    plot->legend->setTextColor(estuary::ink);
    plot->legend->setBorderPen(QPen(estuary::grid));
    plot->legend->setBrush(QBrush(QColor(255, 255, 255, 230)));
}

void styleAxisRect(QCPAxisRect* rect, const QFont& font) {
    QPen axisPen(estuary::ink);
    axisPen.setWidthF(1.0);
    QPen gridPen(estuary::grid);
    gridPen.setWidthF(0.8);
    for (QCPAxis* axis : rect->axes()) {
        axis->setBasePen(axisPen);
        axis->setTickPen(axisPen);
        axis->setSubTickPen(axisPen);
        axis->setTickLabelColor(estuary::ink);
        axis->setLabelColor(estuary::ink);
        axis->setTickLabelFont(font);
        QFont labelFont = font;
        labelFont.setBold(false);
        axis->setLabelFont(labelFont);
        axis->grid()->setPen(gridPen);
        axis->grid()->setZeroLinePen(Qt::NoPen);
        axis->grid()->setSubGridVisible(false);
    }
}

void setAxisTitle(QCPAxis* axis, const QString& title) { axis->setLabel(title); }

}  // namespace moderato::ui
