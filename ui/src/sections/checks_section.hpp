#pragma once

#include <cstddef>
#include <vector>

#include "sections/analysis_section.hpp"

class QLabel;

namespace moderato::ui {

class ChecksSection : public AnalysisSection {
    Q_OBJECT
public:
    explicit ChecksSection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;

Q_SIGNALS:
    // The user asked to see these table rows (0-based) of a dataset in the grid.
    void rowsSelected(const QString& datasetId, const std::vector<std::size_t>& rows);

private:
    QLabel* label_;
};

}  // namespace moderato::ui
