// One section of an analysis page (Specify, Estimates, Probe, Checks). It
// shows the analysis's settings and its latest run, and edits the settings
// only through the ProjectDocument (so every edit can be undone).
#pragma once

#include <QList>
#include <QString>
#include <QWidget>
#include <memory>

#include "moderato/project/analysis_run.hpp"
#include "plots/figure_source.hpp"

namespace moderato::ui {

class ProjectDocument;

class AnalysisSection : public QWidget {
    Q_OBJECT
public:
    AnalysisSection(ProjectDocument* doc, QWidget* parent = nullptr) : QWidget(parent), doc_(doc) {}
    // Shows analysis `id` with its latest run (nullptr while none) or the
    // reason it failed (`error`, empty when it did not).
    virtual void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) = 0;
    // Plots this section can export (empty when none).
    virtual QList<FigureSource*> figures() { return {}; }

protected:
    ProjectDocument* doc_;
};

}  // namespace moderato::ui
