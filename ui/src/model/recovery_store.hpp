// Keeps a recovery copy of the open project's unsaved edits, so that a crash,
// a killed session or a power cut loses nothing. After each undo step (at
// most once per interval) the copy is written atomically into the user's state
// folder, never beside the project; saving, undoing back to the saved state,
// opening another project and a clean exit remove it. One copy per document
// (the file name holds the process id, its start time and a number), and the
// copy records its process, so the copy of a workbench that still runs is never
// offered (findOrphans).
#pragma once

#include <QObject>
#include <QString>
#include <QStringList>
#include <QTimer>
#include <vector>

#include "moderato/project/recovery_copy.hpp"

namespace moderato::ui {

class ProjectDocument;

class RecoveryStore : public QObject {
    Q_OBJECT
public:
    static constexpr int kDefaultIntervalMs = 2000;

    RecoveryStore(ProjectDocument* doc, const QString& folder, QObject* parent = nullptr);
    ~RecoveryStore() override;  // a clean exit: the copy is removed

    // $XDG_STATE_HOME/moderato/recovery (XDG Base Directory: ~/.local/state when unset).
    static QString defaultFolder();

    QString folder() const { return folder_; }
    QString copyPath() const { return file_; }  // this document's copy (may not exist)
    void setInterval(int ms) { timer_.setInterval(ms); }
    // Writes the copy now when there are unsaved edits, else removes it.
    void writeNow();
    void discard();  // removes the copy
    // The SHA-256 of the project file these edits started from (restored
    // edits keep the one their first session recorded).
    void setProjectHash(const std::string& sha256) { projectSha_ = sha256; }

    struct Found {
        QString file;
        RecoveryCopy copy;
    };
    struct Scan {
        std::vector<Found> orphans;  // newest first
        QStringList problems;        // unreadable copies, each moved aside
    };
    // The copies in `folder` whose process has ended. An unreadable copy is
    // renamed to <name>.unreadable (kept for the curious, never offered again)
    // and reported; nothing here throws.
    static Scan findOrphans(const QString& folder);

Q_SIGNALS:
    void written(const QString& file);
    void failed(const QString& message);  // the copy could not be written

private:
    void schedule();
    void projectChanged();

    ProjectDocument* doc_;
    QString folder_, file_;
    QTimer timer_;
    std::string projectSha_;
};

}  // namespace moderato::ui
