// The Probe section: the Lines plot and the Effect plot joined by the
// moderator slider, the readout, the pinned-values (pick-a-point) table, the
// region of significance, the crossover point and the cautions. A
// continuous × continuous analysis can swap the Lines plot for the Surface
// plot; two categorical predictors show the Cells plot and cell table.
//
// Dragging the handle on the Effect plot (or the slider) recomputes the
// effect at the new value from the cached effect function and redraws only
// the plots' buffered "moving" layers and the readout, on every frame. The
// value is kept in the analysis (one undo step per drag) when the drag ends.
#pragma once

#include <QString>
#include <functional>
#include <memory>

#include "probe/probe_engine.hpp"
#include "sections/analysis_section.hpp"

class QCheckBox;
class QComboBox;
class QHBoxLayout;
class QLabel;
class QScrollArea;
class QSlider;
class QSplitter;
class QStackedWidget;
class QToolButton;

namespace moderato::ui {

class BackgroundJob;
class CellsView;
class EffectPlot;
class HeldValueControl;
class LinesPlot;
class ModeratorSlider;
class PinnedTable;
class ReadoutPanel;
class StraightLinePanel;
class SurfacePlot;
struct LinesPlotData;
struct SummaryText;

class ProbeSection : public AnalysisSection {
    Q_OBJECT
public:
    explicit ProbeSection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;
    QList<FigureSource*> figures() override;
    // The figures a memo and a headless render show for `run`: the Lines and
    // Effect plots (and the Surface plot of a continuous × continuous
    // analysis), or the Cells plot.
    QList<FigureSource*> reportFigures(const AnalysisRun& run) const;

    // Parts, for tests and the figure exporter.
    LinesPlot* linesPlot() const { return lines_; }
    EffectPlot* effectPlot() const { return effect_; }
    SurfacePlot* surfacePlot() const { return surface_; }
    CellsView* cellsView() const { return cells_; }
    ModeratorSlider* moderatorSlider() const { return slider_; }
    QSlider* slider() const;
    ReadoutPanel* readout() const { return readout_; }
    PinnedTable* pinnedTable() const { return pinned_; }
    QComboBox* bandChoice() const { return band_; }
    QCheckBox* pointsToggle() const { return points_; }
    QComboBox* scaleChoice() const { return scale_; }
    QComboBox* averagingChoice() const { return averaging_; }
    // How the p-values of the pairwise differences between groups are adjusted
    // (shown for a categorical moderator with three or more groups).
    QComboBox* adjustmentChoice() const { return adjust_; }
    QToolButton* surfaceToggle() const { return surfaceToggle_; }
    // Shades the Lines plot where the two groups (or any two lines) differ.
    QCheckBox* differToggle() const { return differ_; }
    // Widens the Effect plot's moderator axis to the Johnson–Neyman boundaries
    // beyond the data (continuous moderator); off, they are written as notes.
    QCheckBox* extendToggle() const { return extend_; }
    // The straight-line check: its switches and what it found (continuous
    // moderator, single-level models).
    StraightLinePanel* straightLinePanel() const { return straight_; }
    // The value the second moderator is held at (three-way models).
    HeldValueControl* heldValueControl() const { return held_; }
    const ProbeEngine& engine() const { return engine_; }
    // Big runs (rows × design columns from this threshold, kInlineWorkCells
    // by default) have their engine built and prepared (ProbeExtras) in a
    // worker before the plots are redrawn; the plots of the previous run
    // stay until then, and a preparation for a run no longer on show is dropped.
    void setBackgroundThreshold(double cells) { threshold_ = cells; }
    bool isPreparing() const { return prepare_ != nullptr; }

    // The moderator value under the slider (Groups: the group index).
    double currentModeratorValue() const { return current_; }
    // The effect shown in the readout.
    EffectPoint currentEffect() const;
    QString readoutText() const;
    // Region of significance, crossover, cautions and notes as plain text.
    QString summaryText() const { return summaryPlain_; }
    // As the user would: moves the slider to m and keeps the value (one undo step).
    void setCurrentModeratorValue(double m);
    // Pins the current value (one undo step).
    void pinCurrentValue();

Q_SIGNALS:
    void preparingChanged(bool preparing);

protected:
    // The subtitles' quieter text colour follows the palette (light or dark desktop).
    void changeEvent(QEvent* event) override;

private:
    // The constructor's steps: the choices above the plots, the plots, the
    // side panel, then the connections for moving the moderator and for
    // the settings.
    QHBoxLayout* createControls();
    QWidget* createPlots(QWidget* left);
    QWidget* createSidePanel(QWidget* split);
    void connectMoves();
    void connectSettings();
    void connectStraightLine();
    void rebuild();
    // The engine of a big run, in a worker; rebuild() follows.
    void startPrepare();
    void dropPrepare();
    void showMessage(const QString& text);
    // The Effect and Lines plots of the current probe: the effect curve (or
    // group effects), the lines with their points, the crossings, and where
    // the lines differ.
    void buildPlots();
    void syncJitterToggle(const ProbeSettings& ps);
    void syncScaleChoice(const ProbeSettings& ps);
    void buildEffectPlot(bool simultaneous, const QString& level);
    LinesPlotData linesPlotData();
    // A multilevel fit: up to 20 groups' own lines, spread over the moderator.
    void addGroupLines(LinesPlotData& l);
    void addCrossings(LinesPlotData& l, const QString& level);
    // The pairs of groups in core's order, as two level names and as one plot label.
    std::vector<std::pair<QString, QString>> pairLevels() const;
    QStringList pairNames() const;
    std::size_t pairFirst(std::size_t k) const;
    void fillTable();
    static QString defaultTag(const ProbeResult& p, double value);
    static int pinIndex(const std::vector<double>& pins, double value);
    // The summary under the tables, section by section (as HTML and as plain text).
    void fillSummary();
    void summarizeInteraction(SummaryText& out);
    // The joint test of the interaction and, between groups, every pairwise difference.
    void summarizeComparisons(SummaryText& out);
    void summarizeRegions(SummaryText& out);
    void summarizeCrossovers(SummaryText& out);
    void summarizeGaps(SummaryText& out);
    void fillReadoutContext();
    void fillHeldValue();
    // "slope_pct held at 32.5 (mean + 1 SD)"; empty without a second moderator.
    QString heldText() const;
    // What the Lines plot's y axis shows: "weekly_spend", "P(converted = 1)", "log-odds of converted".
    QString outcomeWhat() const;
    // " (x×z = 0.0123)": the product coefficient of the focal predictor and the moderator, when there is one.
    QString productCoefficientText() const;
    void moveTo(double m, bool live);
    void commitCurrent(double m, bool mergeWithPrevious);
    void applyPreset(const QString& key);
    void removePinned(const std::vector<int>& indices);
    void onDocumentChanged(const QString& id);
    void editSettings(const std::function<void(ProbeSettings&)>& edit, const QString& description);
    QString moderatorLabel(double m) const;
    QString effectTitle() const;
    bool simultaneousShown() const;

    QString id_;
    std::shared_ptr<const AnalysisRun> run_;
    QString error_;
    ProbeEngine engine_;
    std::shared_ptr<ProbeEngine> prepared_;  // built in a worker for run_, taken by rebuild()
    BackgroundJob* prepare_ = nullptr;       // the preparation in progress
    int prepareGeneration_ = 0;              // only the newest preparation is used
    double threshold_;
    Analysis shown_;  // the settings the view was built from
    double current_ = 0;
    EffectPoint point_;
    std::vector<std::vector<CurvePoint>> groupLines_;
    int gesture_ = 0;
    bool lastWasKeyboard_ = false;
    bool rebuilding_ = false;
    QString summaryPlain_;

    QStackedWidget* pages_;
    QLabel* message_;
    QComboBox* band_;
    QCheckBox* points_;
    QCheckBox* jitter_ = nullptr;  // shown for a discrete focal predictor
    QLabel* scaleLabel_;
    QComboBox* scale_;
    QComboBox* averaging_;
    QComboBox* adjust_;
    QToolButton* surfaceToggle_;
    QCheckBox* differ_;
    QCheckBox* extend_;
    QLabel* linesTitle_;
    QLabel* effectTitle_;
    QStackedWidget* linesStack_;
    LinesPlot* lines_;
    SurfacePlot* surface_;
    EffectPlot* effect_;
    CellsView* cells_;
    ModeratorSlider* slider_;
    HeldValueControl* held_;
    ReadoutPanel* readout_;
    PinnedTable* pinned_;
    StraightLinePanel* straight_;
    QLabel* summary_;
};

}  // namespace moderato::ui
