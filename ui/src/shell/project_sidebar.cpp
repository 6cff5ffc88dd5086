#include "shell/project_sidebar.hpp"

#include <QFileInfo>
#include <QHeaderView>
#include <QInputDialog>
#include <QMenu>

#include "model/project_document.hpp"

namespace moderato::ui {

namespace {
constexpr int kKindRole = Qt::UserRole + 1;
constexpr int kIdRole = Qt::UserRole + 2;
}  // namespace

ProjectSidebar::ProjectSidebar(ProjectDocument* doc, QWidget* parent) : QTreeWidget(parent), doc_(doc) {
    setObjectName(QStringLiteral("project-sidebar"));
    setHeaderLabel(tr("Project"));
    setContextMenuPolicy(Qt::CustomContextMenu);
    setEditTriggers(QAbstractItemView::NoEditTriggers);
    connect(this, &QWidget::customContextMenuRequested, this, &ProjectSidebar::contextMenu);
    connect(this, &QTreeWidget::currentItemChanged, this, [this](QTreeWidgetItem* item) {
        if (rebuilding_ || !item) return;
        const QString kind = item->data(0, kKindRole).toString(), id = item->data(0, kIdRole).toString();
        if (kind == QLatin1String("dataset")) Q_EMIT datasetActivated(id);
        if (kind == QLatin1String("analysis")) Q_EMIT analysisActivated(id);
        if (kind == QLatin1String("figure")) Q_EMIT figureActivated(id);
    });
    connect(doc_, &ProjectDocument::structureChanged, this, &ProjectSidebar::rebuild);
    connect(doc_, &ProjectDocument::projectReset, this, &ProjectSidebar::rebuild);
    rebuild();
}

void ProjectSidebar::rebuild() {
    rebuilding_ = true;
    QString kind, id;
    if (auto* c = currentItem()) kind = c->data(0, kKindRole).toString(), id = c->data(0, kIdRole).toString();
    clear();
    const Project& p = doc_->project();
    datasets_ = new QTreeWidgetItem(this, {tr("datasets")});
    analyses_ = new QTreeWidgetItem(this, {tr("analyses")});
    figures_ = new QTreeWidgetItem(this, {tr("figures")});
    for (auto* group : {datasets_, analyses_, figures_}) {
        group->setFlags(Qt::ItemIsEnabled);
        QFont f = group->font(0);
        f.setBold(true);
        group->setFont(0, f);
    }
    const auto add = [](QTreeWidgetItem* parent, const QString& text, const char* k, const std::string& key,
                        const QString& tip) {
        auto* item = new QTreeWidgetItem(parent, {text});
        item->setData(0, kKindRole, QString::fromLatin1(k));
        item->setData(0, kIdRole, QString::fromStdString(key));
        item->setToolTip(0, tip);
        return item;
    };
    for (const auto& d : p.datasets) add(datasets_, doc_->dataName(d.id), "dataset", d.id, doc_->dataPath(d.id));
    for (const auto& a : p.analyses)
        add(analyses_, QString::fromStdString(a.name), "analysis", a.id,
            tr("Outcome %1; focal %2; moderator %3")
                .arg(QString::fromStdString(a.roles.outcome), QString::fromStdString(a.roles.focal),
                     QString::fromStdString(a.roles.moderator)));
    for (const auto& f : p.figures) add(figures_, QString::fromStdString(f.name), "figure", f.id, QString());
    expandAll();
    rebuilding_ = false;
    if (!kind.isEmpty()) select(kind, id);
}

void ProjectSidebar::select(const QString& kind, const QString& id) {
    for (auto* group : {datasets_, analyses_, figures_})
        for (int i = 0; group && i < group->childCount(); ++i) {
            auto* item = group->child(i);
            if (item->data(0, kKindRole).toString() == kind && item->data(0, kIdRole).toString() == id) {
                const bool was = rebuilding_;
                rebuilding_ = true;
                setCurrentItem(item);
                rebuilding_ = was;
                return;
            }
        }
}

QString ProjectSidebar::newAnalysis(const QString& datasetId) {
    auto table = doc_->table(datasetId.toStdString());
    if (!table) return {};
    Project p = doc_->project();
    Analysis a = guess_analysis(*table, datasetId.toStdString(), p.unique_id("analysis"));
    p.analyses.push_back(a);
    doc_->setProject(p, tr("New analysis"));
    return QString::fromStdString(a.id);
}

void ProjectSidebar::renameAnalysis(const QString& id, const QString& name) {
    Project p = doc_->project();
    Analysis* a = p.analysis(id.toStdString());
    if (!a || name.trimmed().isEmpty() || a->name == name.trimmed().toStdString()) return;
    a->name = name.trimmed().toStdString();
    doc_->setProject(p, tr("Rename analysis"));
}

QString ProjectSidebar::duplicateAnalysis(const QString& id) {
    Project p = doc_->project();
    const Analysis* a = p.analysis(id.toStdString());
    if (!a) return {};
    Analysis copy = *a;
    copy.id = p.unique_id(a->id);
    copy.name = a->name + " (copy)";
    p.analyses.push_back(copy);
    doc_->setProject(p, tr("Duplicate analysis"));
    return QString::fromStdString(copy.id);
}

void ProjectSidebar::removeAnalysis(const QString& id) {
    Project p = doc_->project();
    const std::string key = id.toStdString();
    if (std::erase_if(p.analyses, [&](const Analysis& a) { return a.id == key; }) == 0) return;  // no empty undo step
    std::erase_if(p.figures, [&](const FigureEntry& f) { return f.analysis == key; });
    doc_->setProject(p, tr("Remove analysis"));
}

void ProjectSidebar::removeFigure(const QString& id) {
    Project p = doc_->project();
    const std::string key = id.toStdString();
    if (std::erase_if(p.figures, [&](const FigureEntry& f) { return f.id == key; }) == 0) return;
    doc_->setProject(p, tr("Remove figure"));
}

void ProjectSidebar::contextMenu(const QPoint& pos) {
    QTreeWidgetItem* item = itemAt(pos);
    if (!item) return;
    const QString kind = item->data(0, kKindRole).toString(), id = item->data(0, kIdRole).toString();
    QMenu menu(this);
    if (kind == QLatin1String("dataset")) {
        menu.addAction(tr("New analysis of this dataset"), this, [this, id] {
            const QString a = newAnalysis(id);
            if (!a.isEmpty()) Q_EMIT analysisActivated(a);
        });
    } else if (kind == QLatin1String("analysis")) {
        menu.addAction(tr("Rename…"), this, [this, id] {
            const Analysis* a = doc_->analysis(id);
            if (!a) return;
            bool ok = false;
            const QString name = QInputDialog::getText(this, tr("Rename analysis"), tr("Name:"), QLineEdit::Normal,
                                                       QString::fromStdString(a->name), &ok);
            if (ok) renameAnalysis(id, name);
        });
        menu.addAction(tr("Duplicate"), this, [this, id] {
            const QString copy = duplicateAnalysis(id);
            if (!copy.isEmpty()) Q_EMIT analysisActivated(copy);  // the copy is what one works on next
        });
        menu.addAction(tr("Remove"), this, [this, id] { removeAnalysis(id); });
    } else if (kind == QLatin1String("figure")) {
        menu.addAction(tr("Remove"), this, [this, id] { removeFigure(id); });
    } else {
        return;
    }
    menu.exec(viewport()->mapToGlobal(pos));
}

}  // namespace moderato::ui
