#include "shell/recovery_prompt.hpp"

#include <QDateTime>
#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QMessageBox>
#include <QPushButton>
#include <memory>

#include "model/project_document.hpp"
#include "model/recovery_store.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/sha256.hpp"
#include "shell/main_window.hpp"

namespace moderato::ui {

namespace {

QString projectName(const RecoveryCopy& copy) {
    return copy.project_path.empty() ? MainWindow::tr("an unsaved project")
                                     : QFileInfo(QString::fromStdString(copy.project_path)).fileName();
}

RecoveryAnswer ask(MainWindow* window, const RecoveryCopy& copy) {
    const QDateTime when = QDateTime::fromString(QString::fromStdString(copy.written), Qt::ISODate);
    QMessageBox box(QMessageBox::Question, MainWindow::tr("Unsaved edits found"),
                    MainWindow::tr("Moderato ended without saving your edits to %1 (kept %2). Bring them back?")
                        .arg(projectName(copy), QLocale().toString(when.toLocalTime(), QLocale::ShortFormat)),
                    QMessageBox::NoButton, window);
    box.setInformativeText(
        MainWindow::tr("Restore opens the project with these edits, shown as not yet saved. Open Both opens the "
                       "saved project in this window and the edits in a second one, to compare them. Discard "
                       "deletes the kept edits."));
    QPushButton* restore = box.addButton(MainWindow::tr("Restore"), QMessageBox::AcceptRole);
    QPushButton* both = copy.project_path.empty() || !QFileInfo::exists(QString::fromStdString(copy.project_path))
                            ? nullptr
                            : box.addButton(MainWindow::tr("Open Both"), QMessageBox::ActionRole);
    box.addButton(MainWindow::tr("Discard"), QMessageBox::DestructiveRole);
    box.setDefaultButton(restore);
    box.exec();  // a question whose answer decides the next step (as confirmDiscard)
    if (box.clickedButton() == restore) return RecoveryAnswer::Restore;
    if (both && box.clickedButton() == both) return RecoveryAnswer::Both;
    return RecoveryAnswer::Discard;
}

// Whether the project file is no longer the one the edits started from.
bool projectFileChanged(const RecoveryCopy& copy) {
    if (copy.project_path.empty()) return false;
    try {
        return sha256_file(copy.project_path) != copy.project_sha256;
    } catch (const InputError&) {
        return true;  // gone or unreadable
    }
}

// Opens the recovered edits in `window`; the copy is removed once they are in.
void restore(MainWindow* window, const RecoveryStore::Found& found, bool askWhereToSave) {
    auto project = std::make_shared<Project>(found.copy.project);
    for (auto& d : project->datasets) {
        const auto it = found.copy.data_paths.find(d.id);
        if (it != found.copy.data_paths.end()) d.path = it->second;
    }
    const RecoveryCopy copy = found.copy;
    const QString file = found.file;
    const bool changed = projectFileChanged(copy);
    window->openProjectFrom(QString::fromStdString(copy.project_path), project, {},
                            [window, copy, file, changed, askWhereToSave] {
                                ProjectDocument* doc = window->document();
                                window->recovery()->setProjectHash(copy.project_sha256);
                                doc->setConfirmSaveTarget(changed || askWhereToSave);
                                doc->markUnsaved();
                                QFile::remove(file);  // this window keeps its own copy from now on
                                if (changed)
                                    window->report(MainWindow::tr("Edits restored"),
                                                   MainWindow::tr("The project file %1 changed since these edits "
                                                                  "were made; Save asks where to save them.")
                                                       .arg(QString::fromStdString(copy.project_path)),
                                                   false);
                            });
}

}  // namespace

RecoveryAnswer recoveryAnswerFromEnvironment() {
    const QString a = qEnvironmentVariable("MODERATO_RECOVERY_ANSWER").toLower();
    if (a == QLatin1String("restore")) return RecoveryAnswer::Restore;
    if (a == QLatin1String("discard")) return RecoveryAnswer::Discard;
    if (a == QLatin1String("both")) return RecoveryAnswer::Both;
    return RecoveryAnswer::Ask;
}

bool offerRecovery(MainWindow* window, RecoveryAnswer preset) {
    const RecoveryStore::Scan scan = RecoveryStore::findOrphans(window->recovery()->folder());
    if (!scan.problems.isEmpty())
        window->report(MainWindow::tr("Unreadable recovery copy"), scan.problems.join(QStringLiteral("\n\n")));
    bool busy = false;
    for (const auto& found : scan.orphans) {
        // One window opens one project at a time: further copies wait for the next start.
        if (busy) break;
        const RecoveryAnswer answer = preset == RecoveryAnswer::Ask ? ask(window, found.copy) : preset;
        if (answer == RecoveryAnswer::Discard) {
            QFile::remove(found.file);
            continue;
        }
        if (answer == RecoveryAnswer::Both && !found.copy.project_path.empty()) {
            auto* second = new MainWindow;
            second->setAttribute(Qt::WA_DeleteOnClose);
            second->move(window->pos() + QPoint(48, 48));
            second->show();
            restore(second, found, true);
            window->openProject(QString::fromStdString(found.copy.project_path));
        } else {
            restore(window, found, false);
        }
        busy = true;
    }
    return busy;
}

}  // namespace moderato::ui
