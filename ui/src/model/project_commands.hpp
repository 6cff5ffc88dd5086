// Undo commands: each holds the project before and after one edit and hands
// the state to the document. Snapshots are small (settings, not data).
#pragma once

#include <QUndoCommand>

#include "moderato/project/project.hpp"

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

}  // namespace moderato::ui
