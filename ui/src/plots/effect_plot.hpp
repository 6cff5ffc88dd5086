// The Effect plot: the conditional effect of the focal predictor against the
// moderator, with its band (pointwise or simultaneous), the zero line, the
// boundaries of the region of significance (those beyond the axis written
// as notes at its edges), the region itself as a tinted strip (not
// significant: grey hatched), a rug of observed moderator values and
// "beyond the data" shading outside the observed range, and the straight-line
// check when it is on (plots/effect_overlays.hpp). For a
// categorical or 0/1 moderator: the effect in each group with its interval.
//
// A draggable handle marks the moderator slider's value. The handle and what
// moves with it live on a buffered layer of their own ("moving"), so a drag
// frame redraws that layer only, never the band, the rug or the axes.
#pragma once

#include <QString>
#include <QStringList>
#include <QWidget>
#include <utility>
#include <vector>

#include "moderato/probing/probe.hpp"
#include "moderato/probing/probe_curves.hpp"
#include "plots/effect_overlays.hpp"
#include "plots/figure_source.hpp"

class QCustomPlot;
class QCPLayer;
class QCPGraph;
class QCPItemLine;
class QCPItemText;
class QCPItemTracer;
class QCPItemRect;
class QCPLayoutGrid;
class QCPMarginGroup;
class QMouseEvent;

namespace moderato::ui {

struct EffectPlotData {
    bool groups = false;
    QString moderatorTitle;  // x axis
    QString effectTitle;     // y axis
    // Continuous moderator.
    std::vector<CurvePoint> curve;    // effect and the band shown, over the axis range
    QString bandName;                 // legend entry of the band ("95% pointwise band", ...)
    std::vector<Region> significant;  // regions of significance for that band
    std::vector<double> boundaries;   // their boundaries
    std::pair<double, double> observed{0, 1};
    std::pair<double, double> axis{0, 1};
    std::vector<double> rug;  // observed moderator values (decimated)
    // A multilevel fit with a random slope for the focal predictor: where the
    // groups' own slopes lie (lower/upper: effect ± z × their SD), drawn as
    // two dotted lines; `groupSpreadName` is their legend entry.
    std::vector<CurvePoint> groupSpread;
    QString groupSpreadName;
    // The straight-line check (binned estimates, smooth curve, thin data).
    EffectOverlays overlays;
    // Groups.
    std::vector<QString> groupNames;   // axis ticks
    std::vector<QString> legendNames;  // legend entries ("shift = day"); empty: the group names
    std::vector<EffectPoint> groupEffects;
};

class EffectPlot : public QWidget, public FigureSource {
    Q_OBJECT
public:
    explicit EffectPlot(QWidget* parent = nullptr);

    // Rebuilds every layer and replots.
    void setData(const EffectPlotData& data);
    void clear();
    // Moves the handle to moderator value m (Groups: the group index) with
    // the effect and interval there; with `replot`, redraws the moving layer only.
    void setCurrent(double m, const EffectPoint& at, bool replot = true);
    double current() const { return current_; }

    // Pixel x (figurePlot() coordinates) <-> moderator value.
    double valueAtPixel(double px) const;
    double pixelOfValue(double m) const;
    // Middle of the axis rect, for synthesized mouse events.
    int plotAreaMiddleY() const;
    // The boundary lines drawn (moderator values), left to right.
    const std::vector<double>& drawnBoundaries() const { return drawnBoundaries_; }
    // The notes written at the plot's edges for boundaries beyond the axis.
    const QStringList& boundaryNotes() const { return boundaryNotes_; }
    bool dragging() const { return dragging_; }
    QCPLayer* movingLayer() const;
    const EffectPlotData& data() const { return data_; }

    QString figureName() const override { return tr("Effect plot"); }
    FigurePlot figureKind() const override { return FigurePlot::Effect; }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;
    void setExportLook(bool exporting, bool markSlider) override;
    // The text of the slider's value box ("8.0"; exported: "wind = 8.0").
    QString handleText() const;
    // Whether the slider's mark (handle or group frame, value box) is drawn.
    bool sliderMarkShown() const;

Q_SIGNALS:
    void dragStarted();
    void valueDragged(double m);  // every frame of a drag (Groups: the group index)
    void dragFinished(double m);

protected:
    void resizeEvent(QResizeEvent* event) override;

private:
    void rebuild();
    // The continuous moderator: axes, shaded regions, band and curve,
    // boundaries, rug.
    void buildContinuous();
    std::pair<bool, bool> drawRegions();
    void shadeBeyond(double a, double b);
    void drawCurve(bool anySignificant, bool anyNotSignificant);
    void drawBoundaries();
    void drawGroupSpread();
    void drawBoundaryNotes();
    void drawRug();
    void buildGroups();
    void buildMoving();
    // Keeps the value box inside the plot area near either edge (after every
    // layout, so an exported figure places it for its own size).
    void alignHandleLabel();
    // After every layout: the value box, the "beyond the data" notes and the
    // boundary labels turn inwards where they would cross the plot area's
    // edge (and be cut off there, or sit on the axis).
    void placeLabels();
    double snap(double m) const;
    void onPress(QMouseEvent* e);
    void onMove(QMouseEvent* e);
    void onRelease(QMouseEvent* e);

    QCustomPlot* plot_;
    EffectPlotData data_;
    bool greyscale_ = false;
    bool hasData_ = false;
    double current_ = 0;
    EffectPoint currentPoint_;
    bool dragging_ = false;
    bool exporting_ = false, markSlider_ = false;
    std::vector<double> drawnBoundaries_;
    QStringList boundaryNotes_;              // as written on one line
    QCPLayoutGrid* noteRow_ = nullptr;       // the row holding them, over the plot area
    QCPMarginGroup* noteMargins_ = nullptr;  // keeps that row as wide as the plot area
    struct BeyondNote {
        QCPItemText* item;
        double from, to;  // the strip, moderator values
    };
    struct BoundaryLabel {
        QCPItemText* item;
        double value;
        Qt::Alignment side;  // as placed for its neighbours
    };
    std::vector<BeyondNote> beyondNotes_;
    // The pixel rows (top, bottom) the curve and its band cover between two pixel columns.
    std::pair<double, double> curvePixels(double fromPx, double toPx) const;
    std::vector<BoundaryLabel> boundaryLabels_;
    // moving layer
    QCPItemLine* handle_ = nullptr;
    QCPItemLine* whisker_ = nullptr;
    QCPItemTracer* knob_ = nullptr;
    QCPItemText* handleLabel_ = nullptr;
    QCPItemRect* groupHighlight_ = nullptr;
};

}  // namespace moderato::ui
