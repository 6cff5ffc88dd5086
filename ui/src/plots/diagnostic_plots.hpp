// The three plots of the Checks section, each exportable as a figure:
//
// - Residuals: residuals against fitted values, with the mean residual in
//   bins of the fitted value and an interval for each bin's mean (core
//   binned_residuals): where an interval misses zero, the residuals there
//   average away from zero and the model misses a pattern.
// - Quantiles: the normal quantile plot of the residuals with the line y = x.
// - Influence: two panels over the rows in file order, Cook's distance above
//   and leverage below, each with the line of the rule that flags rows
//   (core's thresholds: Cook's distance above 4/n, leverage above 3p/n) and
//   a caption stating it; the largest rows above a line are labelled with
//   their line (or row) number.
//
// Flagged rows are drawn on top in their own marker. Above 20,000 points the
// rest are thinned for display to one per cell of a 120 × 80 grid; above
// 5,000 flagged rows those are thinned the same way among themselves, the
// labelled (extreme) ones always kept (the rule in diagnostic_plots.cpp).
#pragma once

#include <QString>
#include <QWidget>
#include <cmath>
#include <memory>
#include <optional>
#include <vector>

#include "moderato/estimation/diagnostics.hpp"
#include "plots/figure_source.hpp"

class QCustomPlot;
class QCPAxisRect;
class QCPErrorBars;
class QCPGraph;
class QCPItemText;
class QCPRange;
class QCPTextElement;

namespace moderato::ui {

// How the reader finds each row of the fit: its number (the file line, or
// the row of the dataset) and what the number is called. Empty: the rows
// are counted 1, 2, ... in the order they were used in the fit.
struct RowNumbers {
    std::vector<double> number;  // by observation
    QString word;                // "line" or "row": the label of a point is "line 271"
    QString axisTitle;           // "line of plots.csv"
};

// A plot's points, computed from the diagnostics alone: each panel's
// coordinates (the quantile plot sorts every row), the points kept by
// thinning, the coordinates by observation, and the residual plot's bins.
// Pure data, so the Checks section computes them in its worker.
struct DiagnosticPoints {
    struct Panel {
        std::vector<double> x, y;       // the panel's points, in the panel's order ...
        std::vector<std::size_t> obs;   // ... and the observation of each
        std::vector<std::size_t> keep;  // positions left after thinning (flagged rows always kept)
        std::vector<double> xs, ys;     // coordinates by observation (NaN if not drawn)
    };
    std::vector<Panel> panels;
    std::optional<BinnedResiduals> bins;  // the residual plot's bins
};

class DiagnosticPlot : public QWidget, public FigureSource {
    Q_OBJECT
public:
    enum Kind { Residuals, Quantiles, Influence };
    explicit DiagnosticPlot(Kind kind, QWidget* parent = nullptr);

    // nullptr clears the plot. `rows` numbers the rows on the influence plot.
    // `points`: points(kind(), *d, rows) when already computed (else computed here).
    // `paintNextTurn`: the plot is built now and painted in the next turn of
    // the event loop (a dense plot's two halves of work, each a turn).
    void setDiagnostics(std::shared_ptr<const Diagnostics> d, RowNumbers rows = {},
                        std::shared_ptr<const DiagnosticPoints> points = nullptr, bool paintNextTurn = false);
    // The points of a plot of this kind (safe to call in a worker).
    static DiagnosticPoints points(Kind kind, const Diagnostics& d, const RowNumbers& rows);
    // Rows (observation indices) to ring, e.g. the ones selected in the list.
    void setHighlighted(const std::vector<std::size_t>& observations);

    QString figureName() const override;
    FigurePlot figureKind() const override;
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;

    Kind kind() const { return kind_; }
    // What is drawn (for tests). Panel 0 is the only panel of the residual
    // and quantile plots, and the Cook's distance panel of the influence
    // plot; panel 1 is its leverage panel.
    int panelCount() const { return static_cast<int>(panels_.size()); }
    QCPAxisRect* panelRect(int panel = 0) const;
    // The plotted observation of each point.
    const std::vector<std::size_t>& drawnObservations(int panel = 0) const;
    const std::vector<std::size_t>& drawnFlagged(int panel = 0) const;
    QCPGraph* pointsGraph(int panel = 0) const;
    QCPGraph* flaggedGraph(int panel = 0) const;
    // The value of the panel's flag rule line (NaN: none), and the rows
    // labelled beside their points (observation indices, largest first).
    double ruleValue(int panel = 0) const;
    // The caption over a panel of the influence plot (its flag rule in words).
    QString panelCaption(int panel = 0) const;
    const std::vector<std::size_t>& labelledObservations(int panel = 0) const;
    // Residual plot: the bin means (key: mean fitted value) and their intervals.
    QCPGraph* binMeansGraph() const { return binMeans_; }
    QCPErrorBars* binIntervals() const { return binBars_; }

    // At most this many rows are labelled on each influence panel.
    static constexpr std::size_t kMaxLabels = 5;

    // An exported figure states each flag rule in few words (the panels of a
    // small figure are narrow). A short influence figure (under
    // kCompactFigureHeightIn) leaves out its title and the legend's "rows" entry,
    // so its two panels keep room for their points and labels.
    void setExportLook(bool exporting, bool markSlider) override;
    void setExportSize(double widthIn, double heightIn) override;

Q_SIGNALS:
    // A flagged point was clicked.
    void observationClicked(std::size_t observation);

protected:
    // The legend wraps to the plot's width.
    void resizeEvent(QResizeEvent* event) override;

private:
    // One axis rect with its points: the flagged ones on top, a ring for
    // the highlighted ones.
    struct Panel {
        QCPAxisRect* rect = nullptr;
        QCPTextElement* caption = nullptr;             // over the panel (influence plot)
        const DiagnosticPoints::Panel* pts = nullptr;  // its points (in points_)
        std::vector<std::size_t> drawn, drawnFlagged, labelled;
        QCPGraph* points = nullptr;
        QCPGraph* flagged = nullptr;
        QCPGraph* highlight = nullptr;
        double rule = NAN;
        QString ruleWords, ruleShort;  // the caption in the workbench, and in an export
        // The row labels, and whether each was put under its point (another label close by).
        std::vector<std::pair<QCPItemText*, bool>> labels;
        bool dense = false;
        double xlo = INFINITY, xhi = -INFINITY, ylo = INFINITY, yhi = -INFINITY;  // of the drawn points
    };

    void setUpLayout();
    void setPanelCount(int count);
    // Numbers the rows 1, 2, ... in the fit's order when `rows` does not number them.
    static RowNumbers fitOrder(RowNumbers rows, std::size_t n);
    void redraw();
    void clearPanels();
    // The points of a panel (thinned; flagged rows kept apart for drawFlagged),
    // then the flagged points and the highlight ring on top.
    void drawPoints(Panel& panel, const std::vector<char>& flagged);
    void drawFlagged(Panel& panel);
    void drawHighlight(Panel& panel);
    // What each kind adds: reference lines, bins, rules, labels, axis titles, ranges.
    void decorateResiduals();
    void decorateQuantiles();
    void decorateInfluence();
    void drawRuleLine(Panel& panel, double value, const QCPRange& xr, const QString& words, const QString& brief);
    void labelRows(Panel& panel, const Eigen::VectorXd& value, double above);
    // After every layout (an export's too): each row label on the side of
    // its point where it fits inside the panel.
    void placeRowLabels();
    void setCompactLayout(bool compact);
    QString rowLabel(std::size_t observation) const;
    QFont smallFont() const;

    Kind kind_;
    QCustomPlot* plot_;
    QCPTextElement* title_ = nullptr;
    std::shared_ptr<const Diagnostics> d_;
    std::shared_ptr<const DiagnosticPoints> points_;
    RowNumbers rows_;
    std::vector<Panel> panels_;
    std::vector<std::size_t> highlighted_;
    QCPGraph* binMeans_ = nullptr;
    QCPErrorBars* binBars_ = nullptr;
    bool greyscale_ = false;
    bool paintNextTurn_ = false;  // redraw() leaves the painting to the next turn
    bool exporting_ = false;
    bool compact_ = false;  // exporting a short influence figure
    double exportHeightIn_ = 0;
};

}  // namespace moderato::ui
