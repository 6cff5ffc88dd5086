#include "plots/plot_style.hpp"

#include <qcustomplot.h>
#include <cmath>

#include "common/number_text.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

// QCustomPlot's own ticks (their places), with our labels.
class NumberTicker : public QCPAxisTicker {
protected:
    QVector<QString> createLabelVector(const QVector<double>& ticks, const QLocale&, QChar, int) override {
        // The step between neighbouring ticks sets the decimals of every label.
        double step = 0;
        for (qsizetype i = 1; i < ticks.size(); ++i) {
            const double d = ticks[i] - ticks[i - 1];
            if (d > 0 && (step == 0 || d < step)) step = d;
        }
        QVector<QString> labels;
        labels.reserve(ticks.size());
        for (const double t : ticks) labels << tickText(t, step > 0 ? step : std::fabs(t));
        return labels;
    }
};

}  // namespace

QSharedPointer<QCPAxisTicker> numberTicker() { return QSharedPointer<QCPAxisTicker>(new NumberTicker); }

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
        axis->setTicker(numberTicker());
    }
}

void setAxisTitle(QCPAxis* axis, const QString& title) { axis->setLabel(title); }

}  // namespace moderato::ui
