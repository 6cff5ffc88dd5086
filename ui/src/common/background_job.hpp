// Long work off the UI thread. A BackgroundJob runs one function in a
// worker (QtConcurrent with a QPromise), and everything it has to say comes
// back through signals on the UI thread: progress while it runs, then
// finished(). Nothing waits for it; the caller goes on in a slot connected
// to finished().
//
// The work gets a progress callback (done, total) to call now and then; the
// callback returns false once the job is cancelled, and the work then stops
// (core's readers throw Cancelled). A cancelled job reports cancelled even
// when its work happened to complete before it saw the request: its result
// must not be used, so Cancel never leaves anything half-done.
#pragma once

#include <QFutureWatcher>
#include <QObject>
#include <cstddef>
#include <functional>

namespace moderato::ui {

class BackgroundJob : public QObject {
    Q_OBJECT
public:
    // (done, total) so far; returns false when the work should stop.
    using Progress = std::function<bool(std::size_t done, std::size_t total)>;
    // The work. It runs in a worker thread: it may touch only what it owns
    // or shares safely (capture results in a shared_ptr, never `this`).
    using Work = std::function<void(const Progress& progress)>;

    explicit BackgroundJob(QObject* parent = nullptr);
    // Cancels the work and blocks until the worker returns (no events are
    // processed meanwhile); the work polls its callback often, so this is short.
    ~BackgroundJob() override;

    // Starts the work; a job runs once.
    void start(Work work);
    bool isRunning() const;
    bool isCancelled() const;

public Q_SLOTS:
    // Asks the work to stop; finished(true) follows once the worker returns.
    void cancel();

Q_SIGNALS:
    // Share of the work done, in thousandths (at most about 25 a second; 1000
    // when the work completed).
    void progressChanged(int permille);
    // The worker returned. `cancelled`: cancel() was called first (the
    // work's result must then be dropped).
    void finished(bool cancelled);

private:
    QFutureWatcher<void> watcher_;
    bool started_ = false;
    bool cancelRequested_ = false;
};

}  // namespace moderato::ui
