// Two categorical predictors: the Cells plot (predicted value per cell with
// its interval as whiskers; the focal factor's levels across, one joined
// series per level of the moderator, so parallel lines mean no interaction)
// beside the cell table (cells, simple effects, interaction contrasts, the
// joint test), copyable as tab-separated text.
#pragma once

#include <QWidget>
#include <optional>

#include "moderato/project/analysis_run.hpp"
#include "plots/figure_source.hpp"

class QCustomPlot;
class QCPGraph;
class QCPErrorBars;
class QCPTextElement;
class QLabel;
class QStandardItemModel;
class QTableView;
class QPushButton;
class QSplitter;

namespace moderato::ui {

class CellsView : public QWidget, public FigureSource {
    Q_OBJECT
public:
    explicit CellsView(QWidget* parent = nullptr);
    // Draws run.cells (nothing when the run has none).
    void setRun(const Analysis& analysis, const AnalysisRun& run);
    void clear();

    QString figureName() const override { return tr("Cells plot"); }
    FigurePlot figureKind() const override { return FigurePlot::Cells; }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override;

    // What is drawn (for tests): one series per moderator (column) level.
    int seriesCount() const { return static_cast<int>(series_.size()); }
    QCPGraph* seriesGraph(int k) const { return series_.at(static_cast<std::size_t>(k)); }
    QCPErrorBars* seriesBars(int k) const { return bars_.at(static_cast<std::size_t>(k)); }
    QCPGraph* observedGraph(int k) const { return observed_.at(static_cast<std::size_t>(k)); }
    // Whether the plot shows probabilities (logistic, probability scale).
    bool showsProbability() const { return probability_; }
    QTableView* table() const { return table_; }
    QStandardItemModel* tableModel() const { return model_; }
    // The cell table as tab-separated text (what "Copy table" puts on the clipboard).
    QString tableText() const;

protected:
    void resizeEvent(QResizeEvent* event) override;

private:
    void redraw();
    void fillTable();

    QCustomPlot* plot_;
    QCPTextElement* title_ = nullptr;
    QSplitter* splitter_ = nullptr;
    QTableView* table_;
    QStandardItemModel* model_;
    QLabel* note_;
    QPushButton* copy_;
    std::optional<CellTable> cells_;
    QString outcome_, held_, seText_;
    bool probability_ = false, logistic_ = false, greyscale_ = false;
    std::vector<QCPGraph*> series_, observed_;
    std::vector<QCPErrorBars*> bars_;
};

}  // namespace moderato::ui
