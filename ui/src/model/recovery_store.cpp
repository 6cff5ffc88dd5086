#include "model/recovery_store.hpp"

#include <unistd.h>

#include <QDateTime>
#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <algorithm>

#include "model/project_document.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "moderato/support/sha256.hpp"

namespace moderato::ui {

namespace {

// "<pid>-<start>-<n>.json": the process, when it started, and which of its documents.
QString copyName() {
    static const QString start = QDateTime::currentDateTimeUtc().toString(QStringLiteral("yyyyMMdd'T'HHmmss"));
    static int count = 0;
    return QStringLiteral("%1-%2-%3.json").arg(::getpid()).arg(start).arg(++count);
}

RecoveryCopy makeCopy(const ProjectDocument& doc, const std::string& projectSha) {
    RecoveryCopy copy;
    copy.pid = ::getpid();
    copy.process_start = process_start_time(copy.pid);
    copy.written = QDateTime::currentDateTimeUtc().toString(Qt::ISODate).toStdString();
    copy.project_path = doc.filePath().toStdString();
    copy.project_sha256 = projectSha;
    copy.project = doc.project();
    for (const auto& d : copy.project.datasets) copy.data_paths[d.id] = doc.dataPath(d.id).toStdString();
    return copy;
}

}  // namespace

RecoveryStore::RecoveryStore(ProjectDocument* doc, const QString& folder, QObject* parent)
    : QObject(parent), doc_(doc), folder_(folder), file_(QDir(folder).filePath(copyName())) {
    timer_.setSingleShot(true);
    timer_.setInterval(kDefaultIntervalMs);
    connect(&timer_, &QTimer::timeout, this, &RecoveryStore::writeNow);
    // Each undo step (an edit, an undo, a redo) schedules a write; the timer
    // is not restarted while it runs, so a burst of edits is one write.
    connect(doc_->undoStack(), &QUndoStack::indexChanged, this, &RecoveryStore::schedule);
    connect(doc_->undoStack(), &QUndoStack::cleanChanged, this, &RecoveryStore::schedule);
    connect(doc_, &ProjectDocument::projectReset, this, &RecoveryStore::projectChanged);
    connect(doc_, &ProjectDocument::filePathChanged, this, &RecoveryStore::projectChanged);
}

RecoveryStore::~RecoveryStore() { discard(); }

QString RecoveryStore::defaultFolder() {
    QString state = qEnvironmentVariable("XDG_STATE_HOME");
    // The XDG Base Directory specification ignores a relative path here.
    if (state.isEmpty() || QDir::isRelativePath(state)) state = QDir::homePath() + QStringLiteral("/.local/state");
    return state + QStringLiteral("/moderato/recovery");
}

void RecoveryStore::schedule() {
    if (!doc_->isModified()) {
        timer_.stop();
        discard();
    } else if (!timer_.isActive()) {
        timer_.start();
    }
}

void RecoveryStore::projectChanged() {
    // Another project (or the same one saved elsewhere): what is kept now starts from it.
    const QString path = doc_->filePath();
    projectSha_.clear();
    if (!path.isEmpty() && QFileInfo::exists(path)) {
        try {
            projectSha_ = sha256_file(path.toStdString());
        } catch (const InputError&) {
        }
    }
    schedule();
}

void RecoveryStore::writeNow() {
    timer_.stop();
    if (!doc_->isModified()) return discard();
    try {
        if (!QDir().mkpath(folder_)) throw InputError(folder_.toStdString() + ": the folder cannot be created");
        // The copy holds the user's project: theirs alone to read.
        QFile::setPermissions(folder_, QFileDevice::ReadOwner | QFileDevice::WriteOwner | QFileDevice::ExeOwner);
        write_file_atomically(file_.toStdString(), recovery_to_json(makeCopy(*doc_, projectSha_)));
    } catch (const InputError& e) {
        Q_EMIT failed(QString::fromStdString(e.what()));
        return;
    }
    Q_EMIT written(file_);
}

void RecoveryStore::discard() {
    timer_.stop();
    QFile::remove(file_);
}

RecoveryStore::Scan RecoveryStore::findOrphans(const QString& folder) {
    Scan scan;
    const QDir dir(folder);
    for (const QFileInfo& info : dir.entryInfoList({QStringLiteral("*.json")}, QDir::Files)) {
        const QString file = info.absoluteFilePath();
        try {
            RecoveryCopy copy = recovery_from_json(read_file_bytes(file.toStdString()), file.toStdString());
            if (copy.pid == ::getpid() || process_alive(copy.pid, copy.process_start)) continue;
            scan.orphans.push_back({file, std::move(copy)});
        } catch (const std::exception& e) {  // InputError, or a file that vanished meanwhile
            const QString aside = file + QStringLiteral(".unreadable");
            QFile::remove(aside);
            const bool moved = QFile::rename(file, aside);
            scan.problems << (moved
                                  ? QObject::tr("%1\nIt was moved aside to %2.").arg(QString::fromUtf8(e.what()), aside)
                                  : QString::fromUtf8(e.what()));
        }
    }
    std::sort(scan.orphans.begin(), scan.orphans.end(),
              [](const Found& a, const Found& b) { return a.copy.written > b.copy.written; });
    return scan;
}

}  // namespace moderato::ui
