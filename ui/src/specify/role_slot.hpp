// One role slot of the Specify section: the role's name, the column(s) in
// it as chips, a picker menu and a clear button. Accepts columns dropped from
// the column list or from another slot; its chips can be dragged to another
// slot (a move). The slot only reports what the user asked for; the section
// turns that into an undoable edit.
#pragma once

#include <QFrame>
#include <QString>
#include <optional>
#include <string>
#include <vector>

#include "specify/role_edit.hpp"

class QLabel;
class QMenu;
class QToolButton;
class QAction;

namespace moderato::ui {

class FlowLayout;

class RoleSlot : public QFrame {
    Q_OBJECT
public:
    RoleSlot(Role role, QWidget* parent = nullptr);
    Role role() const { return role_; }

    struct Choice {
        std::string column;
        ColumnNature nature = ColumnNature::Numeric;
        std::optional<Role> inRole;  // the role it fills now, if any
    };
    // The columns now in the slot and the columns the picker offers.
    void setContents(const std::vector<std::string>& columns, const std::vector<Choice>& choices);
    std::vector<std::string> columns() const { return columns_; }

    QToolButton* picker() const { return picker_; }
    QToolButton* clearButton() const { return clear_; }
    // The picker's entry for a column (nullptr when it offers none).
    QAction* pickAction(const std::string& column) const;
    // The remove button on a column's chip (Controls), or nullptr.
    QToolButton* removeButton(const std::string& column) const;

Q_SIGNALS:
    // The user put `column` here: picked (fromRole -1) or dropped (fromRole: the slot it left, or -1).
    void columnChosen(const QString& column, int fromRole);
    // The user emptied the slot (column empty) or removed one column from it.
    void columnCleared(const QString& column);

protected:
    void dragEnterEvent(QDragEnterEvent* event) override;
    void dragMoveEvent(QDragMoveEvent* event) override;
    void dragLeaveEvent(QDragLeaveEvent* event) override;
    void dropEvent(QDropEvent* event) override;

private:
    void setHighlighted(bool on);
    QWidget* makeChip(const std::string& column);

    Role role_;
    std::vector<std::string> columns_;
    QLabel* title_;
    QWidget* chipArea_;
    FlowLayout* chips_;
    QLabel* placeholder_;
    QToolButton* picker_;
    QToolButton* clear_;
    QMenu* menu_;
    std::vector<QWidget*> chipWidgets_;
};

}  // namespace moderato::ui
