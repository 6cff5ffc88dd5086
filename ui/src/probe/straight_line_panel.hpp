// The straight-line check in the Probe section's side panel: two switches
// (the binned estimates with their number of bins, and the smooth curve
// with its bandwidth)
// and what the check found: the test of the straight line with its
// sentence, the bins, the smooth curve's bandwidth and how it was chosen,
// where the data are thin (with the rule in words) and the cautions. The
// switches only ask (signals); the section makes each change one undo step.
#pragma once

#include <QString>
#include <QStringList>
#include <QWidget>

#include "moderato/project/analysis_run.hpp"

class QCheckBox;
class QDoubleSpinBox;
class QLabel;
class QSpinBox;

namespace moderato::ui {

class StraightLinePanel : public QWidget {
    Q_OBJECT
public:
    explicit StraightLinePanel(QWidget* parent = nullptr);

    // Shows the analysis's switches and its run's check (run: nullptr while
    // none). `probabilityShown`: the Effect plot shows the probability scale,
    // where the check (log-odds) is not drawn.
    void setAnalysis(const Analysis& analysis, const AnalysisRun* run, bool probabilityShown);

    QCheckBox* binnedToggle() const { return binned_; }
    QSpinBox* binsBox() const { return bins_; }
    QCheckBox* smoothToggle() const { return smooth_; }
    // The smooth curve's bandwidth; 0 shows "by cross-validation".
    QDoubleSpinBox* bandwidthBox() const { return bandwidth_; }
    // What the panel says, as plain text (one line a row).
    QString text() const { return plain_.join(QLatin1Char('\n')); }

Q_SIGNALS:
    void binnedToggled(bool on);
    void binsChanged(int bins);
    void smoothToggled(bool on);
    // NaN: choose it by cross-validation.
    void bandwidthChanged(double bandwidth);

protected:
    void changeEvent(QEvent* event) override;

private:
    void fill(const Analysis& a, const AnalysisRun& run, bool probabilityShown);
    void addBinned(const BinnedEffects& b, const QString& se);
    void addSmooth(const SmoothEffects& s);
    void addThin(const AnalysisRun& run);
    void addCautions(const Analysis& a, const AnalysisRun& run, bool probabilityShown);
    void section(const QString& title);
    void line(const QString& text);
    void publish();

    QCheckBox* binned_;
    QSpinBox* bins_;
    QCheckBox* smooth_;
    QDoubleSpinBox* bandwidth_;
    QLabel* intro_;
    QLabel* body_;
    QStringList html_, plain_;
};

}  // namespace moderato::ui
