// The page of one analysis: a section switcher (Specify · Estimates · Probe ·
// Checks · Memo) over the sections, a status line (fitting…, errors) and the
// analysis's latest run handed to every section. While a fit runs in a
// worker, a busy indicator and Cancel sit beside the status line.
#pragma once

#include <QWidget>

#include "sections/analysis_section.hpp"

class QButtonGroup;
class QLabel;
class QProgressBar;
class QPushButton;
class QStackedWidget;

namespace moderato::ui {

class AnalysisRunner;
class ProjectDocument;
class SpecifySection;
class EstimatesSection;
class ProbeSection;
class ChecksSection;
class MemoSection;

class AnalysisPage : public QWidget {
    Q_OBJECT
public:
    enum Section { Specify = 0, Estimates = 1, Probe = 2, Checks = 3, Memo = 4 };

    AnalysisPage(ProjectDocument* doc, AnalysisRunner* runner, QWidget* parent = nullptr);
    void showAnalysis(const QString& id);
    QString analysisId() const { return id_; }
    void showSection(Section s);
    Section currentSection() const;
    AnalysisSection* section(Section s) const;
    SpecifySection* specify() const { return specify_; }
    EstimatesSection* estimates() const { return estimates_; }
    ProbeSection* probe() const { return probe_; }
    ChecksSection* checks() const { return checks_; }
    MemoSection* memo() const { return memo_; }
    // Rows × columns from which the sections prepare their views in a worker
    // (ProbeSection, ChecksSection); infinite: everything on this thread.
    void setBackgroundThreshold(double cells);
    // The busy indicator and its Cancel button (shown while a fit runs in a worker).
    QPushButton* cancelButton() const { return cancel_; }
    QProgressBar* busyIndicator() const { return busy_; }
    // The figures of the section on screen.
    QList<FigureSource*> currentFigures() const;

Q_SIGNALS:
    void sectionChanged(int section);

private:
    void refreshFromRunner(const QString& id);
    void showBusy();

    ProjectDocument* doc_;
    AnalysisRunner* runner_;
    QString id_;
    QLabel* title_;
    QLabel* status_;
    QProgressBar* busy_;
    QPushButton* cancel_;
    QButtonGroup* switcher_;
    QStackedWidget* stack_;
    SpecifySection* specify_;
    EstimatesSection* estimates_;
    ProbeSection* probe_;
    ChecksSection* checks_;
    MemoSection* memo_;
};

}  // namespace moderato::ui
