// The Surface plot: predicted outcome over a grid of two continuous
// predictors (focal across, moderator up) as a colour map with a labelled
// colour scale on a sequential Estuary ramp; the edge of the observed data
// (convex hull of the used rows) is outlined and everything beyond it is
// washed over with the "beyond the data" fill (a path along the hull, so the
// wash follows the data's outline smoothly). Logistic fits on the
// probability scale show probabilities and say so.
#pragma once

#include <QWidget>
#include <memory>
#include <optional>

#include "common/scale_words.hpp"
#include "moderato/probing/surface_view.hpp"
#include "moderato/project/analysis_run.hpp"
#include "plots/figure_source.hpp"
#include "plots/observed_points.hpp"

class QCustomPlot;
class QCPColorMap;
class QCPColorScale;
class QCPTextElement;
class QCPColorGradient;
class QCPAbstractItem;

namespace moderato::ui {

class SurfacePlot : public QWidget, public FigureSource {
    Q_OBJECT
public:
    explicit SurfacePlot(QWidget* parent = nullptr);
    // Draws run.surface (nothing when the run has none). `region` and
    // `points`: the run's data region and observed rows when already
    // computed (ProbeExtras); else they are computed here.
    void setRun(const Analysis& analysis, const AnalysisRun& run, const DataRegion* region = nullptr,
                std::shared_ptr<const SurfacePoints> points = nullptr);
    void clear();

    QString figureName() const override { return tr("Surface plot"); }
    FigurePlot figureKind() const override { return FigurePlot::Surface; }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;
    // A short figure (under kCompactFigureHeightIn) says less over the map: the
    // colour scale names what is predicted, and the legend's names are brief.
    void setExportSize(double widthIn, double heightIn) override;
    void setExportLook(bool exporting, bool markSlider) override;

    // What is drawn (for tests and the readout).
    QCPColorMap* colorMap() const { return map_; }
    QCPColorScale* colorScale() const { return scale_; }
    bool showsProbability() const { return probability_; }
    // Grid cells whose centre lies beyond the data.
    int beyondCellCount() const { return beyondCells_; }
    // The hull of the observed (focal, moderator) pairs, as outlined.
    const DataRegion& region() const { return region_; }
    // The wash beyond the data's hull (nullptr: no hull, nothing washed).
    QCPAbstractItem* beyondMask() const { return mask_; }
    QString subtitle() const;

    // The colour ramps (Estuary: near-white, series 1, ink; or greys).
    static QCPColorGradient ramp(bool greyscale);

protected:
    void showEvent(QShowEvent* event) override;

private:
    // Where the cells beyond the data gather, by quadrant of the grid (sums
    // of their coordinates and counts), for the label "beyond the data".
    struct BeyondQuadrants {
        double x[4] = {0, 0, 0, 0}, z[4] = {0, 0, 0, 0};
        int n[4] = {0, 0, 0, 0};
    };
    // Draws the map, the observed rows, the edge of the data and the
    // "beyond the data" key and label, in that order.
    void redraw();
    BeyondQuadrants drawMap(const SurfaceGrid& g);
    void drawObservedRows();
    void drawEdge();
    void markBeyond(const BeyondQuadrants& q, int cells);
    // Replots now when on show, else when next shown.
    void replotWhenShown();

    QCustomPlot* plot_;
    QCPTextElement* title_ = nullptr;
    QCPColorScale* scale_ = nullptr;
    QCPColorMap* map_ = nullptr;
    QCPAbstractItem* mask_ = nullptr;
    std::optional<SurfaceGrid> grid_;
    Eigen::MatrixXd values_;
    DataRegion region_;
    std::shared_ptr<const SurfacePoints> points_;  // drawn when the analysis shows data points
    QString outcome_;
    ScaleWords words_;  // the family's scale words for the outcome
    Family family_ = Family::Linear;
    bool probability_ = false, greyscale_ = false;
    int beyondCells_ = 0;
    bool replotDue_ = false;
    double exportHeightIn_ = 0;
    bool compact_ = false;  // exporting a short figure
};

}  // namespace moderato::ui
