// Help › User Guide: the user guide shipped inside the program (the
// docs/user-guide.md of this version, with its screenshots), shown in a
// window of its own beside the workbench.
#pragma once

#include <QDialog>

class QTextBrowser;

namespace moderato::ui {

class UserGuide : public QDialog {
    Q_OBJECT
public:
    explicit UserGuide(QWidget* parent = nullptr);
    QTextBrowser* browser() const { return browser_; }

private:
    QTextBrowser* browser_;
};

}  // namespace moderato::ui
