// Placeholder until the Cells plot and cell table are built (issue #4, in progress).
#include "plots/cells_view.hpp"

#include <QVBoxLayout>
#include <qcustomplot.h>

namespace moderato::ui {

CellsView::CellsView(QWidget* parent) : QWidget(parent), plot_(new QCustomPlot(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->addWidget(plot_);
}

void CellsView::setRun(const Analysis&, const AnalysisRun&) {}
void CellsView::clear() {}
void CellsView::setGreyscale(bool) {}

}  // namespace moderato::ui
