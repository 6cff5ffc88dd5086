// The Checks section: residuals against fitted values with binned means,
// the normal quantile plot, and the influence of each row (Cook's distance
// and leverage in the order of the data, with the rules that flag rows),
// each exportable, beside the list of rows that common rules of thumb flag,
// with their file lines. Selected rows can be shown in the dataset grid.
// Core computes every number (moderato/estimation/diagnostics.hpp); this
// section draws them and says in words what they show.
#pragma once

#include <cstddef>
#include <memory>
#include <vector>

#include "moderato/estimation/diagnostics.hpp"
#include "sections/analysis_section.hpp"

class QLabel;
class QPushButton;
class QTableView;

namespace moderato::ui {

class DiagnosticPlot;
class FlaggedRowsModel;
struct RowNumbers;

class ChecksSection : public AnalysisSection {
    Q_OBJECT
public:
    explicit ChecksSection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;
    QList<FigureSource*> figures() override;

    // The diagnostics on show (computed on first need; nullptr without a run).
    std::shared_ptr<const Diagnostics> diagnostics();
    DiagnosticPlot* residualPlot() const { return residuals_; }
    DiagnosticPlot* quantilePlot() const { return quantiles_; }
    DiagnosticPlot* influencePlot() const { return influence_; }
    QTableView* flaggedView() const { return list_; }
    QPushButton* showInDatasetButton() const { return show_; }
    QLabel* rulesLabel() const { return rules_; }
    // Computes the diagnostics now (they are otherwise computed when the
    // section is first shown); for exporting its figures unseen.
    void ensureComputed();

Q_SIGNALS:
    // The user asked to see these table rows (0-based) of a dataset in the grid.
    void rowsSelected(const QString& datasetId, const std::vector<std::size_t>& rows);

protected:
    void showEvent(QShowEvent* event) override;

private:
    void selectionChanged();
    void emitSelectedRows();
    void selectObservation(std::size_t observation);
    // How the reader finds each row of the run (file lines or dataset rows).
    RowNumbers rowNumbers(const AnalysisRun& run) const;
    // What the plots show, and the rules that flag rows, in words.
    QString noteText(const Diagnostics& d) const;
    QString rulesText(const Diagnostics& d) const;

    QString id_;
    std::shared_ptr<const AnalysisRun> run_;
    std::shared_ptr<const Diagnostics> diag_;
    bool dirty_ = false;
    QString error_;
    QLabel* note_;
    DiagnosticPlot* residuals_;
    DiagnosticPlot* quantiles_;
    DiagnosticPlot* influence_;
    QLabel* rules_;
    QTableView* list_;
    FlaggedRowsModel* model_;
    QPushButton* show_;
};

}  // namespace moderato::ui
