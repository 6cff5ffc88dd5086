#include "model/analysis_runner.hpp"

#include <QCoreApplication>
#include <QFutureWatcher>
#include <QPointer>
#include <QtConcurrent/QtConcurrentRun>
#include <atomic>
#include <cmath>
#include <vector>

#include "common/inline_work.hpp"
#include "model/project_document.hpp"
#include "moderato/support/error.hpp"

namespace moderato::ui {

namespace {

struct Outcome {
    std::shared_ptr<const AnalysisRun> run;
    QString error;
};

// Fits (or only re-probes a cached fit) and turns every failure into a
// message. `stop` set: the long parts (the smooth curve) stop early and the
// outcome is empty (it is dropped anyway).
Outcome compute(const Analysis& a, std::shared_ptr<const Table> table, std::shared_ptr<const AnalysisRun> cached,
                std::shared_ptr<const ServerFit> server, std::shared_ptr<std::atomic<bool>> stop = {}) {
    Outcome out;
    const RunProgress progress = [stop](int, int) { return !stop || !stop->load(); };
    try {
        if (cached) {
            auto run = std::make_shared<AnalysisRun>(*cached);
            probe_analysis(*run, a, progress);
            out.run = run;
        } else {
            out.run = std::make_shared<const AnalysisRun>(run_analysis(table, a, progress, server.get()));
        }
    } catch (const Cancelled&) {
        return {};
    } catch (const InputError& e) {
        out.error = QString::fromStdString(e.what());
    } catch (const std::exception& e) {
        out.error =
            QCoreApplication::translate("AnalysisRunner", "Internal error: %1").arg(QString::fromUtf8(e.what()));
    }
    return out;
}

}  // namespace

AnalysisRunner::AnalysisRunner(ProjectDocument* doc, QObject* parent)
    : QObject(parent), doc_(doc), threshold_(kInlineWorkCells) {
    connect(doc_, &ProjectDocument::analysisChanged, this, &AnalysisRunner::refresh);
    connect(doc_, &ProjectDocument::projectReset, this, [this] {
        // Workers of the old project run on (they own what they read), but
        // their results are dropped: they belong to an earlier epoch.
        ++epoch_;
        std::vector<QString> wasBusy;
        for (const auto& [id, e] : entries_) {
            if (e.awaited != 0) wasBusy.push_back(id);
            if (e.stop) e.stop->store(true);
        }
        entries_.clear();
        for (const QString& id : wasBusy) Q_EMIT busyChanged(id, false);
        for (const auto& a : doc_->project().analyses) refresh(QString::fromStdString(a.id));
    });
}

std::shared_ptr<const AnalysisRun> AnalysisRunner::result(const QString& id) const {
    const auto it = entries_.find(id);
    return it == entries_.end() ? nullptr : it->second.run;
}

QString AnalysisRunner::error(const QString& id) const {
    const auto it = entries_.find(id);
    return it == entries_.end() ? QString() : it->second.error;
}

bool AnalysisRunner::busy(const QString& id) const {
    const auto it = entries_.find(id);
    return it != entries_.end() && it->second.awaited != 0;
}

bool AnalysisRunner::stopped(const QString& id) const {
    const auto it = entries_.find(id);
    return it != entries_.end() && it->second.stopped;
}

void AnalysisRunner::cancel(const QString& id) {
    auto it = entries_.find(id);
    if (it == entries_.end() || it->second.awaited == 0) return;
    Entry& e = it->second;
    e.stopped = true;
    e.awaited = 0;
    if (e.stop) e.stop->store(true);  // the smooth curve's refits stop early
    ++e.generation;                   // the worker's result no longer matches any request
    Q_EMIT busyChanged(id, false);
    Q_EMIT resultChanged(id);  // the sections learn that the run on show stays
}

void AnalysisRunner::refresh(const QString& id) {
    const Analysis* found = doc_->analysis(id);
    if (!found) {
        entries_.erase(id);
        Q_EMIT resultChanged(id);
        return;
    }
    const Analysis a = *found;
    auto table = doc_->table(a.dataset);
    Entry& e = entries_[id];
    if (e.awaited != 0) {
        // The newest worker already computes exactly this (e.g. the page asks
        // again right after the project was opened): wait for it. Otherwise its
        // result is outdated, even when this request equals the result on show.
        if (e.pendingTable == table && same_probe(e.pending, a)) {
            e.pending = a;
            return;
        }
    } else if (e.valid && e.table == table && same_probe(e.settings, a)) {
        e.settings = a;  // only view settings changed (or back to those on show after a cancel)
        if (e.stopped) {
            e.stopped = false;
            Q_EMIT resultChanged(id);
        }
        return;
    }
    std::shared_ptr<const AnalysisRun> cached;
    if (e.valid && e.table == table && same_model(e.settings, a) && e.run) cached = e.run;
    const int generation = ++e.generation;
    const double cells = table ? static_cast<double>(table->rows()) * static_cast<double>(table->cols()) : 0.0;
    // The smooth curve refits the data some hundreds of times (its
    // cross-validation and bootstrap): never on the UI thread, whatever the size.
    const bool slow = smooth_work_pending(cached.get(), a) && std::isfinite(threshold_);
    // A fit in the database waits for the server: never on the UI thread either.
    std::shared_ptr<const ServerFit> server = doc_->serverFit(a.dataset);
    const bool remote = server && !cached && std::isfinite(threshold_);
    if (cells < threshold_ && !slow && !remote) {
        const Outcome o = compute(a, table, cached, server);
        const bool wasBusy = e.awaited != 0;
        if (e.stop) e.stop->store(true);
        e.awaited = 0;  // a worker still running computes outdated settings
        if (wasBusy) Q_EMIT busyChanged(id, false);
        finish(id, generation, a, table, o.run, o.error);
        return;
    }
    // Big data: fit, or re-probe the cached fit (the probe scans the rows
    // too, e.g. averaging over the sample on the probability scale), in a worker.
    startWorker(id, generation, a, std::move(table), std::move(cached), std::move(server));
}

void AnalysisRunner::startWorker(const QString& id, int generation, const Analysis& a,
                                 std::shared_ptr<const Table> table, std::shared_ptr<const AnalysisRun> cached,
                                 std::shared_ptr<const ServerFit> server) {
    Entry& e = entries_[id];
    const bool wasBusy = e.awaited != 0;
    if (e.stop) e.stop->store(true);  // the worker before computes outdated settings
    auto stop = std::make_shared<std::atomic<bool>>(false);
    e.stop = stop;
    e.pending = a;
    e.pendingTable = table;
    e.stopped = false;
    e.awaited = generation;
    if (!wasBusy) Q_EMIT busyChanged(id, true);
    auto* watcher = new QFutureWatcher<Outcome>(this);
    connect(watcher, &QFutureWatcher<Outcome>::finished, this,
            [this, watcher, id, generation, a, table, epoch = epoch_] {
                const Outcome o = watcher->result();
                watcher->deleteLater();
                if (epoch != epoch_) return;  // computed for a project that is no longer open
                auto it = entries_.find(id);
                // Dropped: cancelled, or a newer request was made since.
                if (it == entries_.end() || it->second.awaited != generation) return;
                it->second.awaited = 0;
                Q_EMIT busyChanged(id, false);
                finish(id, generation, a, table, o.run, o.error);
            });
    watcher->setFuture(
        QtConcurrent::run([a, table, cached, server, stop] { return compute(a, table, cached, server, stop); }));
}

void AnalysisRunner::finish(const QString& id, int generation, const Analysis& a, std::shared_ptr<const Table> table,
                            std::shared_ptr<const AnalysisRun> run, const QString& error) {
    auto it = entries_.find(id);
    if (it == entries_.end() || it->second.generation != generation) return;  // a newer request is on its way
    Entry& e = it->second;
    e.stopped = false;
    e.settings = a;
    e.table = std::move(table);
    e.run = std::move(run);
    e.error = error;
    e.valid = true;
    Q_EMIT resultChanged(id);
}

}  // namespace moderato::ui
