#include "common/background_job.hpp"

#include <QPromise>
#include <QtConcurrent/QtConcurrentRun>
#include <algorithm>

namespace moderato::ui {

namespace {
constexpr int kScale = 1000;  // progress in thousandths
}

BackgroundJob::BackgroundJob(QObject* parent) : QObject(parent) {
    connect(&watcher_, &QFutureWatcher<void>::progressValueChanged, this, &BackgroundJob::progressChanged);
    connect(&watcher_, &QFutureWatcher<void>::finished, this, [this] { Q_EMIT finished(isCancelled()); });
}

BackgroundJob::~BackgroundJob() {
    if (!isRunning()) return;
    watcher_.cancel();
    watcher_.waitForFinished();
}

void BackgroundJob::start(Work work) {
    if (started_) return;
    started_ = true;
    watcher_.setFuture(QtConcurrent::run([work = std::move(work)](QPromise<void>& promise) {
        promise.setProgressRange(0, kScale);
        const Progress progress = [&promise](std::size_t done, std::size_t total) {
            if (total > 0) {
                const double share = static_cast<double>(done) / static_cast<double>(total);
                promise.setProgressValue(static_cast<int>(std::clamp(share, 0.0, 1.0) * kScale));
            }
            return !promise.isCanceled();
        };
        work(progress);
        // Reported only while not cancelled (QPromise drops it otherwise).
        promise.setProgressValue(kScale);
    }));
}

bool BackgroundJob::isRunning() const { return started_ && !watcher_.isFinished(); }

bool BackgroundJob::isCancelled() const { return cancelRequested_ || watcher_.isCanceled(); }

void BackgroundJob::cancel() {
    if (!isRunning()) return;
    // Remembered here too: the worker may have returned already, with its
    // finished() still on the way; the result is dropped all the same.
    cancelRequested_ = true;
    watcher_.cancel();
}

}  // namespace moderato::ui
