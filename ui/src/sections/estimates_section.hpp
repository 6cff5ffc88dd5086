#pragma once

#include "sections/analysis_section.hpp"

class QLabel;

namespace moderato::ui {

class EstimatesSection : public AnalysisSection {
    Q_OBJECT
public:
    explicit EstimatesSection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;

private:
    QLabel* label_;
};

}  // namespace moderato::ui
