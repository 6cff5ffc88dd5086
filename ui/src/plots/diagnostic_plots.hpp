// The three plots of the Checks section, each exportable as a figure:
// residuals against fitted values (with the mean residual in bins of the
// fitted value), the normal quantile plot of the residuals with the line
// y = x, and leverage against standardised residuals with Cook's distance
// contours at 0.5 and 1. Flagged rows are drawn on top in their own marker
// and never thinned away; above 20,000 points the rest are thinned to one
// per screen-sized bin.
#pragma once

#include <QWidget>
#include <memory>
#include <vector>

#include "moderato/estimation/diagnostics.hpp"
#include "plots/figure_source.hpp"

class QCustomPlot;
class QCPGraph;
class QCPTextElement;

namespace moderato::ui {

class DiagnosticPlot : public QWidget, public FigureSource {
    Q_OBJECT
public:
    enum Kind { Residuals, Quantiles, Influence };
    explicit DiagnosticPlot(Kind kind, QWidget* parent = nullptr);

    // nullptr clears the plot.
    void setDiagnostics(std::shared_ptr<const Diagnostics> d);
    // Rows (observation indices) to ring, e.g. the ones selected in the list.
    void setHighlighted(const std::vector<std::size_t>& observations);

    QString figureName() const override;
    FigurePlot figureKind() const override;
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;

    Kind kind() const { return kind_; }
    // What is drawn (for tests): the plotted observation of each point.
    const std::vector<std::size_t>& drawnObservations() const { return drawn_; }
    const std::vector<std::size_t>& drawnFlagged() const { return drawnFlagged_; }
    QCPGraph* pointsGraph() const { return points_; }
    QCPGraph* flaggedGraph() const { return flaggedGraph_; }

Q_SIGNALS:
    // A flagged point was clicked.
    void observationClicked(std::size_t observation);

private:
    void redraw();
    void drawHighlight();
    // x and y of every observation for this plot.
    void coordinates(std::vector<double>& x, std::vector<double>& y, std::vector<std::size_t>& obs) const;

    Kind kind_;
    QCustomPlot* plot_;
    QCPTextElement* title_ = nullptr;
    std::shared_ptr<const Diagnostics> d_;
    std::vector<std::size_t> drawn_, drawnFlagged_, highlighted_;
    std::vector<double> cx_, cy_;    // the plot's points, in the plot's order ...
    std::vector<std::size_t> cobs_;  // ... and the observation of each
    std::vector<double> xs_, ys_;    // coordinates by observation (NaN if not drawn)
    QCPGraph* points_ = nullptr;
    QCPGraph* flaggedGraph_ = nullptr;
    QCPGraph* highlight_ = nullptr;
    bool greyscale_ = false;
};

}  // namespace moderato::ui
