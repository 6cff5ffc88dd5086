#include "specify/role_slot.hpp"

#include <QApplication>
#include <QDrag>
#include <QDragEnterEvent>
#include <QDropEvent>
#include <QHBoxLayout>
#include <QLabel>
#include <QMenu>
#include <QMimeData>
#include <QMouseEvent>
#include <QStyle>
#include <QToolButton>

#include "specify/column_mime.hpp"
#include "specify/flow_layout.hpp"
#include "specify/section_widgets.hpp"
#include "style/estuary.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

QString roleKey(Role r) {
    switch (r) {
        case Role::Outcome:
            return QStringLiteral("outcome");
        case Role::Focal:
            return QStringLiteral("focal");
        case Role::Moderator:
            return QStringLiteral("moderator");
        case Role::SecondModerator:
            return QStringLiteral("second-moderator");
        case Role::Controls:
            return QStringLiteral("controls");
        case Role::Weights:
            return QStringLiteral("weights");
        case Role::Clusters:
            return QStringLiteral("clusters");
        case Role::Groups:
            return QStringLiteral("groups");
        case Role::Exposure:
            return QStringLiteral("exposure");
    }
    return {};
}

QString roleHint(Role r) {
    switch (r) {
        case Role::Outcome:
            return RoleSlot::tr(
                "The column the model explains (numeric; 0/1 for a logistic or probit model, counts for a Poisson or "
                "negative binomial one).");
        case Role::Focal:
            return RoleSlot::tr("The predictor whose effect may depend on the moderator.");
        case Role::Moderator:
            return RoleSlot::tr("The column the focal predictor's effect may depend on.");
        case Role::SecondModerator:
            return RoleSlot::tr("Optional: a third column in the product (a three-way interaction).");
        case Role::Controls:
            return RoleSlot::tr("Optional: columns held constant, entered as main effects only.");
        case Role::Weights:
            return RoleSlot::tr("Optional: positive case weights (weighted least squares).");
        case Role::Clusters:
            return RoleSlot::tr("Optional: groups of rows for cluster-robust standard errors.");
        case Role::Groups:
            return RoleSlot::tr(
                "Optional: the groups rows are nested in (teams, sites); each group gets its own intercept, and "
                "chosen slopes may differ between groups (a multilevel model).");
        case Role::Exposure:
            return RoleSlot::tr(
                "Optional, count models: how much each row had the chance to count (hours open, area, people at "
                "risk). The model is then for the rate per unit of it: log(exposure) enters with coefficient 1.");
    }
    return {};
}

// A column in a slot: its name, draggable to another slot.
class Chip : public QFrame {
public:
    Chip(const std::string& column, Role role, QWidget* parent) : QFrame(parent), column_(column), role_(role) {
        setObjectName(QStringLiteral("column-chip"));
        setCursor(Qt::OpenHandCursor);
        setToolTip(RoleSlot::tr("%1 — drag it onto another slot to move it").arg(QString::fromStdString(column)));
        auto* layout = new QHBoxLayout(this);
        layout->setContentsMargins(6, 1, 2, 1);
        layout->setSpacing(2);
        auto* label = new QLabel(QString::fromStdString(column), this);
        layout->addWidget(label);
    }

protected:
    void mousePressEvent(QMouseEvent* e) override {
        if (e->button() == Qt::LeftButton) pressAt_ = e->position().toPoint();
        QFrame::mousePressEvent(e);
    }
    void mouseMoveEvent(QMouseEvent* e) override {
        if (!(e->buttons() & Qt::LeftButton) ||
            (e->position().toPoint() - pressAt_).manhattanLength() < QApplication::startDragDistance()) {
            QFrame::mouseMoveEvent(e);
            return;
        }
        auto* drag = new QDrag(this);
        drag->setMimeData(columnMimeData(column_, role_));
        drag->setPixmap(grab());
        drag->exec(Qt::MoveAction);
    }

private:
    std::string column_;
    Role role_;
    QPoint pressAt_;
};

}  // namespace

RoleSlot::RoleSlot(Role role, QWidget* parent)
    : QFrame(parent),
      role_(role),
      title_(new QLabel(roleName(role), this)),
      chipArea_(new QWidget(this)),
      chips_(new FlowLayout(chipArea_, 4)),
      placeholder_(new QLabel(chipArea_)),
      picker_(new QToolButton(this)),
      clear_(new QToolButton(this)),
      menu_(new QMenu(this)) {
    setObjectName(QStringLiteral("slot-") + roleKey(role));
    setProperty("roleSlot", true);
    setAcceptDrops(true);
    setToolTip(roleHint(role));
    setStyleSheet(
        QStringLiteral("QFrame[roleSlot=true] { border: 1px solid palette(mid); border-radius: 5px; }"
                       "QFrame[roleSlot=true][highlighted=true] { border: 2px solid %1; }"
                       "QFrame#column-chip { border: 1px solid %2; border-radius: 9px; background: %3; }"
                       "QFrame#column-chip QLabel { border: none; background: transparent; }")
            .arg(estuary::series(0).name(), cssRgba(estuary::series(0), 0.55), cssRgba(estuary::series(0), 0.12)));

    auto* layout = new QHBoxLayout(this);
    layout->setContentsMargins(8, 4, 4, 4);
    layout->setSpacing(6);
    QFont bold = title_->font();
    bold.setBold(true);
    title_->setFont(bold);
    title_->setMinimumWidth(QFontMetrics(bold).horizontalAdvance(roleName(Role::SecondModerator)) + 8);
    layout->addWidget(title_);

    placeholder_->setText(roleTakesSeveral(role) ? tr("drop columns here, or add them with the menu")
                                                 : tr("drop a column here, or pick one"));
    keepMutedText(placeholder_);  // quiet but readable (a disabled label is too faint on most palettes)
    QFont italic = placeholder_->font();
    italic.setItalic(true);
    placeholder_->setFont(italic);
    chips_->addWidget(placeholder_);
    QSizePolicy sp(QSizePolicy::Expanding, QSizePolicy::Preferred);
    sp.setHeightForWidth(true);
    chipArea_->setSizePolicy(sp);
    layout->addWidget(chipArea_, 1);

    picker_->setText(roleTakesSeveral(role) ? tr("Add") : tr("Pick"));
    picker_->setObjectName(QStringLiteral("pick-") + roleKey(role));
    picker_->setToolTip(roleTakesSeveral(role) ? tr("Add a column to %1").arg(roleName(role))
                                               : tr("Choose the %1 column").arg(roleName(role)));
    picker_->setPopupMode(QToolButton::InstantPopup);
    picker_->setMenu(menu_);
    picker_->setAutoRaise(true);
    layout->addWidget(picker_);

    clear_->setText(QStringLiteral("\u00d7"));
    clear_->setObjectName(QStringLiteral("clear-") + roleKey(role));
    clear_->setToolTip(roleTakesSeveral(role) ? tr("Remove every column from %1").arg(roleName(role))
                                              : tr("Clear %1").arg(roleName(role)));
    clear_->setAutoRaise(true);
    layout->addWidget(clear_);
    connect(clear_, &QToolButton::clicked, this, [this] { Q_EMIT columnCleared(QString()); });
    connect(menu_, &QMenu::triggered, this, [this](QAction* a) { Q_EMIT columnChosen(a->data().toString(), -1); });
}

void RoleSlot::setContents(const std::vector<std::string>& columns, const std::vector<Choice>& choices) {
    columns_ = columns;
    for (QWidget* w : chipWidgets_) {
        chips_->removeWidget(w);
        w->deleteLater();
    }
    chipWidgets_.clear();
    for (const auto& c : columns) {
        QWidget* chip = makeChip(c);
        chips_->addWidget(chip);
        chipWidgets_.push_back(chip);
    }
    placeholder_->setVisible(columns.empty());
    clear_->setEnabled(!columns.empty());
    chipArea_->updateGeometry();

    menu_->clear();
    for (const Choice& ch : choices) {
        QString text = QStringLiteral("%1  \u2014 %2").arg(QString::fromStdString(ch.column), natureName(ch.nature));
        const bool here = ch.inRole && *ch.inRole == role_;
        if (ch.inRole && !here) text += tr("  (in %1)").arg(roleName(*ch.inRole));
        QAction* a = menu_->addAction(text);
        a->setData(QString::fromStdString(ch.column));
        if (here) {
            a->setCheckable(true);
            a->setChecked(true);
        }
    }
    picker_->setEnabled(!choices.empty());
}

QWidget* RoleSlot::makeChip(const std::string& column) {
    auto* chip = new Chip(column, role_, chipArea_);
    if (roleTakesSeveral(role_)) {
        auto* remove = new QToolButton(chip);
        remove->setText(QStringLiteral("\u00d7"));
        remove->setAutoRaise(true);
        remove->setObjectName(QStringLiteral("remove-") + QString::fromStdString(column));
        remove->setToolTip(tr("Remove %1 from %2").arg(QString::fromStdString(column), roleName(role_)));
        chip->layout()->addWidget(remove);
        const QString name = QString::fromStdString(column);
        connect(remove, &QToolButton::clicked, this, [this, name] { Q_EMIT columnCleared(name); });
    }
    return chip;
}

QAction* RoleSlot::pickAction(const std::string& column) const {
    const QString name = QString::fromStdString(column);
    for (QAction* a : menu_->actions())
        if (a->data().toString() == name) return a;
    return nullptr;
}

QToolButton* RoleSlot::removeButton(const std::string& column) const {
    return findChild<QToolButton*>(QStringLiteral("remove-") + QString::fromStdString(column));
}

void RoleSlot::setHighlighted(bool on) {
    setProperty("highlighted", on);
    style()->unpolish(this);
    style()->polish(this);
}

void RoleSlot::dragEnterEvent(QDragEnterEvent* event) {
    if (columnFromMime(event->mimeData())) {
        event->acceptProposedAction();
        setHighlighted(true);
    } else {
        event->ignore();
    }
}

void RoleSlot::dragMoveEvent(QDragMoveEvent* event) {
    if (columnFromMime(event->mimeData())) event->acceptProposedAction();
    else event->ignore();
}

void RoleSlot::dragLeaveEvent(QDragLeaveEvent* event) {
    setHighlighted(false);
    QFrame::dragLeaveEvent(event);
}

void RoleSlot::dropEvent(QDropEvent* event) {
    setHighlighted(false);
    const auto drag = columnFromMime(event->mimeData());
    if (!drag) {
        event->ignore();
        return;
    }
    event->acceptProposedAction();
    Q_EMIT columnChosen(QString::fromStdString(drag->column), drag->from ? static_cast<int>(*drag->from) : -1);
}

}  // namespace moderato::ui
