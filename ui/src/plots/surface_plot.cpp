// Placeholder until the Surface plot is built (issue #4, in progress).
#include "plots/surface_plot.hpp"

#include <QVBoxLayout>
#include <qcustomplot.h>

namespace moderato::ui {

SurfacePlot::SurfacePlot(QWidget* parent) : QWidget(parent), plot_(new QCustomPlot(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
}

void SurfacePlot::setRun(const Analysis&, const AnalysisRun&) {}
void SurfacePlot::clear() {}
void SurfacePlot::setGreyscale(bool) {}

}  // namespace moderato::ui
