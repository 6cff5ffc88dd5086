// The project's Undo and Redo keys work whatever widget has the focus: a
// value box or text field with nothing of its own to undo (or redo) lets the
// keys through to the window's Edit › Undo / Redo instead of swallowing
// them. A field with typing of its own to undo keeps its keys.
#pragma once

#include <QObject>

class QWidget;

namespace moderato::ui {

class UndoKeys : public QObject {
    Q_OBJECT
public:
    // Watches the key events of `window`'s widgets (installed on the application).
    explicit UndoKeys(QWidget* window);

protected:
    bool eventFilter(QObject* watched, QEvent* event) override;

private:
    QWidget* window_;
};

}  // namespace moderato::ui
