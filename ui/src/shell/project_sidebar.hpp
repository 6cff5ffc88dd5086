// The Project sidebar: the project's datasets, analyses and figures. Picking
// an item opens it; the context menu adds, renames, duplicates and removes
// analyses and figures (each an undoable edit).
#pragma once

#include <QTreeWidget>

namespace moderato::ui {

class ProjectDocument;

class ProjectSidebar : public QTreeWidget {
    Q_OBJECT
public:
    explicit ProjectSidebar(ProjectDocument* doc, QWidget* parent = nullptr);
    void rebuild();
    // Highlights the item of this dataset / analysis / figure.
    void select(const QString& kind, const QString& id);

    // Undoable edits, also used by the menus.
    QString newAnalysis(const QString& datasetId);
    void renameAnalysis(const QString& id, const QString& name);
    QString duplicateAnalysis(const QString& id);
    void removeAnalysis(const QString& id);
    void removeFigure(const QString& id);

Q_SIGNALS:
    void datasetActivated(const QString& id);
    void analysisActivated(const QString& id);
    void figureActivated(const QString& figureId);

private:
    void contextMenu(const QPoint& pos);

    ProjectDocument* doc_;
    QTreeWidgetItem* datasets_ = nullptr;
    QTreeWidgetItem* analyses_ = nullptr;
    QTreeWidgetItem* figures_ = nullptr;
    bool rebuilding_ = false;
};

}  // namespace moderato::ui
