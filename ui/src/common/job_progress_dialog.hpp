// The progress dialog of a BackgroundJob. It never blocks: it is opened with
// open() (window-modal, so the window cannot be edited under a load, while
// the event loop keeps running) once the job has run for a moment, follows
// the job's progress, cancels the job with Cancel, Escape or the close
// button, and deletes itself when the job ends.
#pragma once

#include <QDialog>
#include <QPointer>

class QLabel;
class QProgressBar;
class QPushButton;

namespace moderato::ui {

class BackgroundJob;

class JobProgressDialog : public QDialog {
    Q_OBJECT
public:
    // Quick jobs end before the dialog would appear (no flicker).
    static constexpr int kDefaultDelayMs = 400;

    // `text`: what is happening ("Opening plots.moderato…"). The dialog opens
    // after `delayMs` if the job still runs then (0: at once).
    JobProgressDialog(BackgroundJob* job, const QString& text, QWidget* parent, int delayMs = kDefaultDelayMs);

    QProgressBar* progressBar() const { return bar_; }
    QPushButton* cancelButton() const { return cancel_; }

public Q_SLOTS:
    // Cancel, Escape or closing the window: asks the job to stop. The dialog
    // stays (saying so) until the job has returned.
    void reject() override;

private:
    QPointer<BackgroundJob> job_;
    QLabel* label_;
    QProgressBar* bar_;
    QPushButton* cancel_;
};

}  // namespace moderato::ui
