// The Surface plot: predicted outcome over a grid of two continuous
// predictors (focal and moderator), as a colour map with contour-like
// labelled colour scale, the observed data range outlined.
#pragma once

#include <QWidget>

#include "moderato/analysis_run.hpp"
#include "plots/figure_source.hpp"

class QCustomPlot;

namespace moderato::ui {

class SurfacePlot : public QWidget, public FigureSource {
    Q_OBJECT
public:
    explicit SurfacePlot(QWidget* parent = nullptr);
    // Draws run.surface (nothing when the run has none).
    void setRun(const Analysis& analysis, const AnalysisRun& run);
    void clear();

    QString figureName() const override { return tr("Surface plot"); }
    QString figureKey() const override { return QStringLiteral("surface"); }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;

private:
    QCustomPlot* plot_;
};

}  // namespace moderato::ui
