// Two categorical predictors: the Cells plot (predicted mean per cell with
// its interval, one line per level of the moderator across the focal
// levels) beside the cell table (cells, simple effects, interaction
// contrasts, the joint test).
#pragma once

#include <QWidget>

#include "moderato/analysis_run.hpp"
#include "plots/figure_source.hpp"

class QCustomPlot;

namespace moderato::ui {

class CellsView : public QWidget, public FigureSource {
    Q_OBJECT
public:
    explicit CellsView(QWidget* parent = nullptr);
    // Draws run.cells (nothing when the run has none).
    void setRun(const Analysis& analysis, const AnalysisRun& run);
    void clear();

    QString figureName() const override { return tr("Cells plot"); }
    QString figureKey() const override { return QStringLiteral("cells"); }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;

private:
    QCustomPlot* plot_;
};

}  // namespace moderato::ui
