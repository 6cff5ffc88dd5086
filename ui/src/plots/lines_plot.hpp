// The Lines plot: the predicted outcome against the focal predictor over
// its observed range, one line (with its confidence band) per group or per
// pinned moderator value, the observed data as translucent points (binned
// into a grid of counts above 20,000 rows, so drawing stays fast), and the
// crossover point of the lines (a hollow diamond with its interval as a
// bracket) when the lines cross inside the data, and a thin strip along the
// bottom of the plot where two groups (or any two lines) differ.
//
// One more line follows the moderator slider. It lives on the buffered
// "moving" layer, so a drag frame redraws that layer only.
#pragma once

#include <QString>
#include <QStringList>
#include <QWidget>
#include <limits>
#include <memory>
#include <utility>
#include <vector>

#include "moderato/probing/probe_curves.hpp"
#include "plots/figure_source.hpp"
#include "plots/observed_points.hpp"

class QCustomPlot;
class QCPLayer;
class QCPGraph;
class QCPItemLine;
class QCPItemText;
class QCPItemPosition;
class QCPItemRect;
class QBrush;
class QPen;

namespace moderato::ui {

struct LinesPlotData {
    QString focalTitle, outcomeTitle;
    struct Line {
        QString name;
        std::vector<CurvePoint> points;
        int series = 0;  // Estuary series index (colour, line style, marker)
    };
    std::vector<Line> lines;
    QString highlightName;  // legend entry of the slider's line
    // Observed data (drawn when showPoints), made ready to draw where the
    // rows are (ProbeEngine); their group index is the series index.
    bool showPoints = false;
    std::shared_ptr<const LinesPoints> points;
    bool pointsByGroup = false;  // colour points by group
    // Spread the points of a discrete focal predictor sideways (seeded, so
    // every draw is the same; see discreteFocal()).
    bool jitter = false;
    struct Crossing {
        double x = 0, y = 0;          // where the lines meet
        double lower = 0, upper = 0;  // its interval along the focal predictor
        bool bounded = false;         // false: the interval is unbounded (drawn as a note)
        QString label;                // which two lines meet ("day/night"); empty when only one pair
    };
    std::vector<Crossing> crossings;  // only those inside the focal range
    QString crossingName;             // legend entry
    // Where two groups (or any two lines) differ, along the focal predictor:
    // one row per pair, stacked up from the bottom edge, tinted where the pair
    // differs. With several rows each is named by its pair at its left end.
    struct DifferRow {
        QString label;  // the pair ("day/night"); empty when there is one pair
        std::vector<std::pair<double, double>> spans;
    };
    std::vector<DifferRow> differ;
    QString differName;  // legend entry ("groups differ"); empty: no strip
    // A multilevel fit: some groups' own fitted lines (the fixed part at the
    // group's moderator value plus its conditional modes), drawn faintly
    // under the lines; `groupLinesName` is their legend entry.
    std::vector<std::vector<CurvePoint>> groupLines;
    QString groupLinesName;
    std::pair<double, double> xRange{0, 1};
    // Estimates the y axis must also take in (e.g. the slider's line at the ends of its range).
    std::vector<CurvePoint> yExtent;
    // The values the outcome can take ({0, ∞} for one observed only at 0 or
    // above, {0, 1} for a probability): the y axis's margin stays inside
    // them; only what is drawn (a line, a band) may take the axis beyond.
    std::pair<double, double> yBounds{-std::numeric_limits<double>::infinity(),
                                      std::numeric_limits<double>::infinity()};
};

class LinesPlot : public QWidget, public FigureSource {
    Q_OBJECT
public:
    explicit LinesPlot(QWidget* parent = nullptr);

    // Rebuilds every layer and replots.
    void setData(const LinesPlotData& data);
    void clear();
    // The slider's line (series < 0: ink; else that series' colour, drawn
    // bolder); with `replot`, redraws the moving layer only. `mark`: where
    // the slider stands ("wind = 8.0"), the line's legend entry in an export
    // that marks the slider's value.
    void setHighlight(const std::vector<CurvePoint>& points, int series, bool replot = true, const QString& mark = {});
    QCPLayer* movingLayer() const;

    int lineCount() const { return static_cast<int>(data_.lines.size()); }
    int crossoverMarkerCount() const { return crossoverMarkers_; }
    // The pair named beside each crossover marker (empty entries: one pair only).
    QStringList crossoverLabels() const {
        QStringList out;
        for (const auto& c : data_.crossings) out << c.label;
        return out;
    }
    // The strips drawn where the groups differ (focal predictor from, to),
    // row after row, and the row each is in (0: along the bottom edge).
    const std::vector<std::pair<double, double>>& differStrips() const { return differStrips_; }
    const std::vector<int>& differStripRows() const { return differStripRows_; }
    // The pair named on each row drawn (empty when there is one pair).
    QStringList differRowLabels() const { return differRowLabels_; }
    // A strip's height in pixels; rows of several pairs are differRowPitch()
    // apart, at least kDifferRowPitch and enough for the row's name.
    static constexpr int kDifferStripHeight = 7;
    static constexpr int kDifferRowPitch = 14;
    int differRowPitch() const { return differRowPitch_; }
    // How the data points are drawn: 0 none, 1 points, 2 binned counts.
    int pointsMode() const { return pointsMode_; }
    // Whether the points drawn are jittered (asked for, and the focal predictor is discrete).
    bool pointsJittered() const { return jittered_; }
    const LinesPlotData& data() const { return data_; }
    const std::vector<CurvePoint>& highlight() const { return highlight_; }

    QString figureName() const override { return tr("Lines plot"); }
    FigurePlot figureKind() const override { return FigurePlot::Lines; }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;
    void setExportLook(bool exporting, bool markSlider) override;
    // Whether the slider's line is drawn, and its legend entry (empty: none).
    bool sliderLineShown() const;
    QString sliderLineLegendName() const;

protected:
    void resizeEvent(QResizeEvent* event) override;

private:
    // Draws everything again, in this order: points, bands and lines, the
    // crossings, where the lines differ, and the slider's line on its layer.
    void rebuild();
    // The y axis: what is drawn and the points, with a margin inside yBounds.
    void fitValueRange();
    void drawLines();
    void drawGroupLines();
    void drawCrossings();
    void drawDifferStrips();
    void drawDifferRow(const LinesPlotData::DifferRow& row, int index, QCPItemPosition* base, const QBrush& brush,
                       const QPen& edge);
    void drawHighlightLayer();
    // Shows or hides the slider's line and names it in the legend, as the
    // export look asks (setExportLook).
    void applySliderMark();
    // Keeps the names of crossing pairs inside the plot area (after every layout).
    void placeCrossingNames();
    void placeDifferRows();
    void drawPoints();
    void drawPointMaps(const LinesPoints& p);
    QColor pointColour(int group) const;

    QCustomPlot* plot_;
    LinesPlotData data_;
    bool hasData_ = false;
    bool greyscale_ = false;
    int crossoverMarkers_ = 0;
    std::vector<std::pair<double, double>> differStrips_;
    std::vector<int> differStripRows_;
    QStringList differRowLabels_;
    int differRowPitch_ = kDifferRowPitch;
    std::vector<QCPItemRect*> differRects_;                  // beside differStrips_
    std::vector<std::pair<QCPItemText*, int>> differNames_;  // a row's name and its row
    int pointsMode_ = 0;
    bool jittered_ = false;
    std::vector<CurvePoint> highlight_;
    int highlightSeries_ = -1;
    QString highlightMark_;
    bool exporting_ = false, markSlider_ = false;
    QCPGraph* highlightLine_ = nullptr;
    QCPGraph* highlightBand_ = nullptr;
    struct CrossingName {
        QCPItemText* name;
        QCPItemLine* leader;
        bool above;  // the side it is placed on when it fits
    };
    std::vector<CrossingName> crossingNames_;
};

}  // namespace moderato::ui
