#include "common/job_progress_dialog.hpp"

#include <QHBoxLayout>
#include <QLabel>
#include <QProgressBar>
#include <QPushButton>
#include <QTimer>
#include <QVBoxLayout>

#include "common/background_job.hpp"

namespace moderato::ui {

JobProgressDialog::JobProgressDialog(BackgroundJob* job, const QString& text, QWidget* parent, int delayMs)
    : QDialog(parent),
      job_(job),
      label_(new QLabel(text, this)),
      bar_(new QProgressBar(this)),
      cancel_(new QPushButton(tr("Cancel"), this)) {
    setObjectName(QStringLiteral("job-progress"));
    setWindowTitle(text);
    setWindowModality(Qt::WindowModal);
    bar_->setObjectName(QStringLiteral("job-progress-bar"));
    bar_->setRange(0, 1000);
    bar_->setValue(0);
    bar_->setTextVisible(false);
    cancel_->setObjectName(QStringLiteral("job-cancel"));
    auto* layout = new QVBoxLayout(this);
    layout->addWidget(label_);
    layout->addWidget(bar_);
    auto* buttons = new QHBoxLayout;
    buttons->addStretch(1);
    buttons->addWidget(cancel_);
    layout->addLayout(buttons);
    setMinimumWidth(360);

    connect(cancel_, &QPushButton::clicked, this, &JobProgressDialog::reject);
    connect(job_, &BackgroundJob::progressChanged, bar_, &QProgressBar::setValue);
    connect(job_, &BackgroundJob::finished, this, [this] {
        hide();
        deleteLater();
    });
    if (delayMs <= 0) {
        open();
    } else {
        QTimer::singleShot(delayMs, this, [this] {
            if (job_ && job_->isRunning()) open();
        });
    }
}

void JobProgressDialog::reject() {
    if (!job_ || !job_->isRunning()) return;
    job_->cancel();
    label_->setText(tr("Cancelling…"));
    cancel_->setEnabled(false);
}

}  // namespace moderato::ui
