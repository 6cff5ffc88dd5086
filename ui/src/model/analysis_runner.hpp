// Keeps each analysis's computed run up to date with its settings. Tiny
// data (below kInlineWorkCells, common/inline_work.hpp) are fitted on the UI
// thread (a fit takes a few milliseconds); anything bigger is fitted (and
// re-probed) in a worker thread and the newest request wins: a result that
// arrives for settings the user has since changed is dropped (generation
// counters). A request equal to the one a worker is computing starts no
// second worker. A change that touches only the probe reuses the cached
// design and fit. A smooth curve to compute (the straight-line check, many
// refits) always goes to a worker, however small the data. cancel() stops
// waiting for a worker: its result is dropped (its smooth curve stops early)
// and the run on show stays that of the earlier settings.
#pragma once

#include <QObject>
#include <QString>
#include <atomic>
#include <map>
#include <memory>

#include "moderato/project/analysis_run.hpp"

namespace moderato::ui {

class ProjectDocument;

class AnalysisRunner : public QObject {
    Q_OBJECT
public:
    explicit AnalysisRunner(ProjectDocument* doc, QObject* parent = nullptr);

    // The latest run of an analysis (nullptr when none or failed).
    std::shared_ptr<const AnalysisRun> result(const QString& id) const;
    // Why the latest run failed (empty when it did not).
    QString error(const QString& id) const;
    bool busy(const QString& id) const;
    // Whether the newest request was cancelled: the result on show (if any)
    // is that of earlier settings. The next change (or refresh) computes again.
    bool stopped(const QString& id) const;

    // Rows times design columns above which fitting moves off the UI thread.
    void setBackgroundThreshold(double cells) { threshold_ = cells; }

    // Recomputes now (or starts the worker) if the settings changed since the
    // last run. Nothing ever waits for a worker: its result arrives through
    // resultChanged(). With an infinite threshold every fit is computed here,
    // before refresh() returns (the headless renderer relies on that).
    void refresh(const QString& id);
    // Drops the worker's coming result (the worker itself runs to its end:
    // a fit cannot be interrupted, but it owns what it reads; a smooth curve
    // stops at its next refit); busy() turns false at once.
    void cancel(const QString& id);

Q_SIGNALS:
    void resultChanged(const QString& id);  // result() or error() changed
    void busyChanged(const QString& id, bool busy);

private:
    struct Entry {
        Analysis settings;                   // what the current result was computed from
        std::shared_ptr<const Table> table;  // ... and on which table
        std::shared_ptr<const AnalysisRun> run;
        QString error;
        bool valid = false;    // settings/table describe a finished computation
        int generation = 0;    // newest request
        int awaited = 0;       // generation of the worker whose result is awaited (0: none)
        bool stopped = false;  // cancel() dropped the newest request
        Analysis pending;      // what the newest worker computes
        std::shared_ptr<const Table> pendingTable;
        // Set when the newest worker's result is no longer wanted: its long
        // parts (the smooth curve) then stop early.
        std::shared_ptr<std::atomic<bool>> stop;
    };
    void finish(const QString& id, int generation, const Analysis& a, std::shared_ptr<const Table> table,
                std::shared_ptr<const AnalysisRun> run, const QString& error);
    // Runs compute() in a worker for `generation`.
    void startWorker(const QString& id, int generation, const Analysis& a, std::shared_ptr<const Table> table,
                     std::shared_ptr<const AnalysisRun> cached, std::shared_ptr<const ServerFit> server);

    ProjectDocument* doc_;
    std::map<QString, Entry> entries_;
    double threshold_;
    int epoch_ = 0;  // counts projects opened: a worker's result is kept only in its own epoch
};

}  // namespace moderato::ui
