// Placeholder until the section is built (issue #4, in progress).
#include "sections/probe_section.hpp"

#include <QLabel>
#include <QVBoxLayout>

namespace moderato::ui {

ProbeSection::ProbeSection(ProjectDocument* doc, QWidget* parent) : AnalysisSection(doc, parent), label_(new QLabel(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->addWidget(label_);
}

void ProbeSection::showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun>, const QString& error) {
    label_->setText(error.isEmpty() ? id : error);
}

}  // namespace moderato::ui
