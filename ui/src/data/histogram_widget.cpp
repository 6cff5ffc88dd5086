#include "data/histogram_widget.hpp"

#include <QPainter>
#include <algorithm>

#include "common/number_text.hpp"
#include "data/table_model.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

HistogramWidget::HistogramWidget(QWidget* parent) : QWidget(parent) {
    setObjectName(QStringLiteral("column-histogram"));
    setSizePolicy(QSizePolicy::Expanding, QSizePolicy::Fixed);
    setFixedHeight(130);
}

void HistogramWidget::setHistogram(const std::vector<double>& edges, const std::vector<std::size_t>& counts) {
    edges_ = edges;
    counts_ = counts;
    levels_.clear();
    update();
}

void HistogramWidget::setLevels(const QStringList& levels, const std::vector<std::size_t>& counts) {
    edges_.clear();
    counts_ = counts;
    levels_ = levels;
    update();
}

void HistogramWidget::clear() {
    edges_.clear();
    counts_.clear();
    levels_.clear();
    update();
}

void HistogramWidget::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing, false);
    p.fillRect(rect(), Qt::white);  // plots sit on white (LOOK.md)
    if (counts_.empty()) return;
    QFont small = font();
    small.setPointSizeF(std::max(6.5, small.pointSizeF() * 0.85));
    p.setFont(small);
    const QFontMetrics fm(small);
    const std::size_t peak = *std::max_element(counts_.begin(), counts_.end());
    const QString peakText = countText(static_cast<long long>(peak));
    const int left = fm.horizontalAdvance(peakText) + 8, right = 8, top = fm.height() / 2 + 4;
    const int bottom = fm.height() + 8;
    const QRectF plot(left, top, width() - left - right, height() - top - bottom);
    if (plot.width() < 10 || plot.height() < 10) return;

    // Grid at the peak and half of it, thin.
    p.setPen(QPen(estuary::grid, 1));
    for (const double f : {0.5, 1.0}) {
        const double y = plot.bottom() - f * plot.height();
        p.drawLine(QPointF(plot.left(), y), QPointF(plot.right(), y));
    }
    const auto n = static_cast<double>(counts_.size());
    const double w = plot.width() / n;
    const bool levels = !levels_.isEmpty();
    const double gap = levels ? std::min(6.0, w * 0.25) : (w > 4 ? 1.0 : 0.0);
    p.setPen(Qt::NoPen);
    p.setBrush(estuary::series(0));
    for (std::size_t k = 0; k < counts_.size(); ++k) {
        const double h = peak ? plot.height() * static_cast<double>(counts_[k]) / static_cast<double>(peak) : 0.0;
        const double x = plot.left() + static_cast<double>(k) * w;
        p.drawRect(QRectF(x + gap / 2, plot.bottom() - h, std::max(1.0, w - gap), h));
    }
    // Axis and labels in ink.
    p.setPen(QPen(estuary::ink, 1));
    p.drawLine(plot.bottomLeft(), plot.bottomRight());
    p.drawText(QRectF(0, plot.top() - fm.height() / 2.0, left - 4, fm.height()), Qt::AlignRight | Qt::AlignVCenter,
               peakText);
    p.drawText(QRectF(0, plot.bottom() - fm.height() / 2.0, left - 4, fm.height()), Qt::AlignRight | Qt::AlignVCenter,
               QStringLiteral("0"));
    const QRectF labels(plot.left(), plot.bottom() + 3, plot.width(), fm.height());
    if (levels) {
        for (int k = 0; k < levels_.size(); ++k) {
            const QRectF cell(plot.left() + k * w, labels.top(), w, labels.height());
            p.drawText(cell, Qt::AlignHCenter | Qt::AlignTop, fm.elidedText(levels_[k], Qt::ElideRight, int(w) - 2));
        }
    } else if (edges_.size() >= 2) {
        p.drawText(labels, Qt::AlignLeft | Qt::AlignTop, dataText(edges_.front()));
        p.drawText(labels, Qt::AlignRight | Qt::AlignTop, dataText(edges_.back()));
    }
}

}  // namespace moderato::ui
