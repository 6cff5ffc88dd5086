// The Checks section: residuals against fitted values with binned means,
// the normal quantile plot, and the influence of each row (Cook's distance
// and leverage in the order of the data, with the rules that flag rows),
// each exportable, beside the list of rows that common rules of thumb flag,
// with their file lines. A multilevel fit shows its conditional residuals,
// and in place of the influence plot (least-squares measures that do not
// carry over to it) a note that says so. Selected rows can be shown in the dataset grid.
// Core computes every number (moderato/estimation/diagnostics.hpp); this
// section draws them and says in words what they show. For more than
// kInlineWorkCells (common/inline_work.hpp) rows × coefficients the
// diagnostics are computed in a worker when the section is shown, with a
// busy indicator and Cancel; a result for a run no longer on show is dropped.
#pragma once

#include <cstddef>
#include <memory>
#include <vector>

#include "moderato/estimation/diagnostics.hpp"
#include "sections/analysis_section.hpp"

class QLabel;
class QProgressBar;
class QPushButton;
class QTableView;

namespace moderato::ui {

class BackgroundJob;
class DiagnosticPlot;
struct DiagnosticPoints;
class FlaggedRowsModel;
struct RowNumbers;

class ChecksSection : public AnalysisSection {
    Q_OBJECT
public:
    explicit ChecksSection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;
    QList<FigureSource*> figures() override;

    // The diagnostics on show (computed now, on this thread, when they are
    // due and not yet there; nullptr without a run). Drops a worker's pass.
    std::shared_ptr<const Diagnostics> diagnostics();
    // What is on show, without computing anything.
    std::shared_ptr<const Diagnostics> shownDiagnostics() const { return diag_; }
    // Whether a worker computes the diagnostics now, and its Cancel button
    // (which, once a pass is cancelled, offers to compute them again).
    bool isComputing() const { return job_ != nullptr || plotsDue_; }  // plotsDue_: drawn after the worker
    QPushButton* cancelButton() const { return cancel_; }
    // Rows × coefficients from which the diagnostics are computed in a worker.
    void setBackgroundThreshold(double cells) { threshold_ = cells; }
    DiagnosticPlot* residualPlot() const { return residuals_; }
    DiagnosticPlot* quantilePlot() const { return quantiles_; }
    DiagnosticPlot* influencePlot() const { return influence_; }
    QTableView* flaggedView() const { return list_; }
    QPushButton* showInDatasetButton() const { return show_; }
    QLabel* rulesLabel() const { return rules_; }
    // The note shown in place of the influence plot for a multilevel fit.
    QLabel* influenceNote() const { return influenceNote_; }
    // Computes the diagnostics now (they are otherwise computed when the
    // section is first shown); for exporting its figures unseen.
    void ensureComputed();
    // Stops a worker's pass: nothing changes on show but the note.
    void cancel();

Q_SIGNALS:
    // A diagnostics pass ended and its result (or problem) is on show.
    void computed();
    // The user asked to see these table rows (0-based) of a dataset in the grid.
    void rowsSelected(const QString& datasetId, const std::vector<std::size_t>& rows);

protected:
    void showEvent(QShowEvent* event) override;

private:
    // Computes on this thread when small, else starts a worker.
    void computeWhenDue();
    void startWorker();
    void dropWorker();
    // Shows diag_ (or `problem` without it) in the plots, the list and the
    // notes; `points` (residuals, quantiles, influence) when computed in the worker.
    // `staged`: a worker's result; the plots are drawn one a turn of the event
    // loop and computed() is emitted after the last. `rows`: rowNumbers(),
    // when the worker computed them.
    void showDiagnostics(const QString& problem,
                         const std::vector<std::shared_ptr<const DiagnosticPoints>>& points = {}, bool staged = false,
                         std::shared_ptr<const RowNumbers> rows = nullptr);
    void drawPlotLater(std::size_t k, int shown, std::shared_ptr<const RowNumbers> rows,
                       std::vector<std::shared_ptr<const DiagnosticPoints>> points);
    void selectionChanged();
    void emitSelectedRows();
    void selectObservation(std::size_t observation);
    // How the reader finds each row of the run (file lines or dataset rows).
    static RowNumbers rowNumbers(const AnalysisRun& run);
    // What the plots show, and the rules that flag rows, in words.
    QString noteText(const Diagnostics& d) const;
    QString rulesText(const Diagnostics& d) const;
    // A multilevel fit's plots and rules in words.
    QString multilevelNoteText(const Diagnostics& d) const;
    QString multilevelRulesText(const Diagnostics& d) const;
    // What plot k (residuals, quantiles, influence) shows: the diagnostics,
    // or none for the influence plot of a multilevel fit.
    std::shared_ptr<const Diagnostics> plotted(std::size_t k) const;
    bool multilevel() const { return run_ && run_->fit.multilevel.has_value(); }

    QString id_;
    std::shared_ptr<const AnalysisRun> run_;
    std::shared_ptr<const Diagnostics> diag_;
    bool dirty_ = false;
    BackgroundJob* job_ = nullptr;  // the worker's pass in progress
    int generation_ = 0;            // counts passes: only the newest one's result is shown
    int shown_ = 0;                 // counts showDiagnostics calls: a plot due from an older one is dropped
    bool plotsDue_ = false;         // plots of the worker's result still to be drawn
    static constexpr int kListSizingRows = 100;
    double threshold_;
    QString error_;
    QLabel* note_;
    QProgressBar* busy_;
    QPushButton* cancel_;
    DiagnosticPlot* residuals_;
    DiagnosticPlot* quantiles_;
    DiagnosticPlot* influence_;
    QLabel* influenceNote_;
    QLabel* rules_;
    QTableView* list_;
    FlaggedRowsModel* model_;
    QPushButton* show_;
};

}  // namespace moderato::ui
