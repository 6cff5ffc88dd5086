// The Estimates section: the coefficient table (estimate, SE, t or z, p,
// interval, VIF; aliased rows marked), fit statistics, the comparison of the
// model with and without its product terms, and the warnings and notes of
// the fit. A multilevel fit shows each term's df in place of the VIF, no
// R², and its random part (RandomPartView). With centring at the mean a toggle shows the centred fit. The
// table copies as tab-separated text with every digit.
#pragma once

#include <memory>

#include "sections/analysis_section.hpp"

class QLabel;
class QRadioButton;
class QTableView;
class QToolButton;

namespace moderato::ui {

class CoefficientModel;
class RandomPartView;

class EstimatesSection : public AnalysisSection {
    Q_OBJECT
public:
    explicit EstimatesSection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;

    QTableView* table() const { return table_; }
    CoefficientModel* coefficients() const { return model_; }
    QToolButton* copyButton() const { return copy_; }
    QRadioButton* asIsButton() const { return asIs_; }
    QRadioButton* centredButton() const { return centred_; }
    QWidget* centringToggle() const { return toggle_; }
    QLabel* headerLabel() const { return header_; }
    QLabel* fitLabel() const { return fit_; }
    QLabel* comparisonLabel() const { return comparison_; }
    RandomPartView* randomPart() const { return randomPart_; }
    QLabel* warningsLabel() const { return warnings_; }
    QLabel* errorBanner() const { return errorBanner_; }
    // Whether the table shows the centred fit.
    bool showingCentred() const;
    // The table as tab-separated text with its header (what "Copy table" copies).
    QString tableText() const;

private:
    // Fills every part from the run: the header, the centres, the fit
    // statistics, the comparison without the product terms, the warnings and notes.
    void refresh();
    void showHeader(const Analysis& a, const FitResult& main);
    void showCentres(const AnalysisRun& run);
    void showFitStatistics(const FitResult& main);
    void showComparison(const FitResult& main);
    void showWarningsAndNotes(const FitResult& main, const FitResult& shown);
    void fitTableHeight();

    QString id_;
    std::shared_ptr<const AnalysisRun> run_;
    QString error_;

    QLabel* header_;
    QToolButton* copy_;
    QWidget* toggle_;
    QRadioButton* asIs_;
    QRadioButton* centred_;
    QLabel* toggleText_;
    QTableView* table_;
    CoefficientModel* model_;
    QLabel* fit_;
    RandomPartView* randomPart_;
    QLabel* comparisonTitle_;
    QLabel* comparison_;
    QLabel* warnings_;
    QLabel* notes_;
    QLabel* errorBanner_;
};

}  // namespace moderato::ui
