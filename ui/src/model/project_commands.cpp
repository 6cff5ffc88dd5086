#include "model/project_commands.hpp"

#include "model/project_document.hpp"

namespace moderato::ui {

ProjectStateCommand::ProjectStateCommand(ProjectDocument* doc, Project before, Project after, const QString& text,
                                         int mergeId, QString mergeKey)
    : doc_(doc),
      before_(std::move(before)),
      after_(std::move(after)),
      mergeId_(mergeId),
      mergeKey_(std::move(mergeKey)) {
    setText(text);
}

void ProjectStateCommand::undo() { doc_->applyState(before_); }
void ProjectStateCommand::redo() { doc_->applyState(after_); }

bool ProjectStateCommand::mergeWith(const QUndoCommand* other) {
    const auto* o = dynamic_cast<const ProjectStateCommand*>(other);
    if (!o || o->mergeId_ != mergeId_ || o->mergeKey_ != mergeKey_ || mergeKey_.isEmpty()) return false;
    after_ = o->after_;
    setText(o->text());  // the step is named for where it ended ("… to 'night'", not the first key's level)
    return true;
}

DataLocationCommand::DataLocationCommand(ProjectDocument* doc, DataLocations before, DataLocations after,
                                         const QString& text)
    : doc_(doc), before_(std::move(before)), after_(std::move(after)) {
    setText(text);
}

void DataLocationCommand::undo() { doc_->setDataLocations(before_); }
void DataLocationCommand::redo() { doc_->setDataLocations(after_); }

}  // namespace moderato::ui
