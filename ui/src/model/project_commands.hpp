// Undo commands: each holds the project before and after one edit and hands
// the state to the document. Snapshots are small (settings, not data).
#pragma once

#include <QUndoCommand>

#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"

namespace moderato::ui {

class ProjectDocument;

class ProjectStateCommand : public QUndoCommand {
public:
    ProjectStateCommand(ProjectDocument* doc, Project before, Project after, const QString& text, int mergeId = -1,
                        QString mergeKey = {});
    void undo() override;
    void redo() override;
    int id() const override { return mergeId_; }
    bool mergeWith(const QUndoCommand* other) override;

private:
    ProjectDocument* doc_;
    Project before_, after_;
    int mergeId_;
    QString mergeKey_;
};

// Points datasets at other data files (a moved file the user located). The
// data paths are not part of the project states the other steps hold (they
// record where the files are, and survive undo of settings), so moving a
// file is a step of its own, with the old and new absolute paths.
class DataLocationCommand : public QUndoCommand {
public:
    DataLocationCommand(ProjectDocument* doc, DataLocations before, DataLocations after, const QString& text);
    void undo() override;
    void redo() override;

private:
    ProjectDocument* doc_;
    DataLocations before_, after_;
};

}  // namespace moderato::ui
