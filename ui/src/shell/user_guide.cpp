#include "shell/user_guide.hpp"

#include <QFile>
#include <QTextBrowser>
#include <QVBoxLayout>

namespace moderato::ui {

UserGuide::UserGuide(QWidget* parent) : QDialog(parent), browser_(new QTextBrowser(this)) {
    setObjectName(QStringLiteral("user-guide"));
    setWindowTitle(tr("Moderato user guide"));
    setModal(false);
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    browser_->setOpenExternalLinks(true);
    browser_->setSearchPaths({QStringLiteral(":/moderato/guide")});  // the screenshots, beside the text
    QFile guide(QStringLiteral(":/moderato/guide/user-guide.md"));
    if (guide.open(QIODevice::ReadOnly)) browser_->setMarkdown(QString::fromUtf8(guide.readAll()));
    else browser_->setPlainText(tr("The user guide is missing from this build."));
    layout->addWidget(browser_);
    resize(860, 760);
}

}  // namespace moderato::ui
