#include "shell/undo_keys.hpp"

#include <QAbstractSpinBox>
#include <QApplication>
#include <QKeyEvent>
#include <QLineEdit>

namespace moderato::ui {

namespace {

// Whether `w` holds typing of its own that the keys should undo (redo): a
// text field, or the field of a value box, with something to undo. A value
// box whose value was stepped or kept has nothing of its own (setting its
// text clears the field's history): the keys undo the project.
bool ownsKeys(QWidget* w, bool undo) {
    QLineEdit* edit = qobject_cast<QLineEdit*>(w);
    if (!edit && qobject_cast<QAbstractSpinBox*>(w)) edit = w->findChild<QLineEdit*>();
    if (!edit) return true;  // anything else keeps its usual keys
    return undo ? edit->isUndoAvailable() : edit->isRedoAvailable();
}

}  // namespace

UndoKeys::UndoKeys(QWidget* window) : QObject(window), window_(window) { qApp->installEventFilter(this); }

bool UndoKeys::eventFilter(QObject* watched, QEvent* event) {
    if (event->type() != QEvent::ShortcutOverride) return false;
    auto* widget = qobject_cast<QWidget*>(watched);
    if (!widget || widget->window() != window_) return false;
    auto* key = static_cast<QKeyEvent*>(event);
    const bool undo = key->matches(QKeySequence::Undo);
    const bool redo = key->matches(QKeySequence::Redo) ||
                      key->keyCombination() == QKeyCombination(Qt::CTRL | Qt::SHIFT, Qt::Key_Z) ||
                      key->keyCombination() == QKeyCombination(Qt::CTRL, Qt::Key_Y);
    if (!undo && !redo) return false;
    if (ownsKeys(widget, undo)) return false;  // its own typing first
    event->ignore();                           // not claimed by the field: the window's Undo / Redo shortcut runs
    return true;
}

}  // namespace moderato::ui
