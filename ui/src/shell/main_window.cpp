#include "shell/main_window.hpp"

#include <QAction>
#include <QApplication>
#include <QClipboard>
#include <QCloseEvent>
#include <QDir>
#include <QDragEnterEvent>
#include <QDropEvent>
#include <QEventLoop>
#include <QFileDialog>
#include <QFileInfo>
#include <QFutureWatcher>
#include <QLabel>
#include <QMenuBar>
#include <QMessageBox>
#include <QMimeData>
#include <QProgressDialog>
#include <QSettings>
#include <QSplitter>
#include <QStackedWidget>
#include <QStatusBar>
#include <QTableView>
#include <QTimer>
#include <QtConcurrent/QtConcurrentRun>
#include <atomic>

#include "common/figure_caption.hpp"
#include "common/table_clipboard.hpp"
#include "data/dataset_page.hpp"
#include "data/import_dialog.hpp"
#include "export/figure_export_dialog.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/sha256.hpp"
#include "sections/checks_section.hpp"
#include "sections/memo_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/project_sidebar.hpp"

// The resources live in a static library: register them once (outside any namespace).
static void initResources() { Q_INIT_RESOURCE(moderato); }

namespace moderato::ui {

namespace {
constexpr int kMaxRecent = 8;

// Runs `work` in a worker thread while the event loop keeps the window
// alive; shows a progress dialog with Cancel after a short delay.
template <typename Result, typename Work>
Result runWithProgress(QWidget* parent, const QString& label, bool interactive, Work work, bool* cancelled) {
    std::atomic<int> permille{0};
    std::atomic<bool> stop{false};
    CsvProgress progress;
    progress.callback = [&](std::size_t done, std::size_t total) {
        permille = total ? static_cast<int>(1000.0 * static_cast<double>(done) / static_cast<double>(total)) : 0;
        return !stop.load();
    };
    QFutureWatcher<Result> watcher;
    QEventLoop loop;
    QObject::connect(&watcher, &QFutureWatcher<Result>::finished, &loop, &QEventLoop::quit);
    watcher.setFuture(QtConcurrent::run([&] { return work(progress); }));
    std::unique_ptr<QProgressDialog> dialog;
    if (interactive) {
        dialog = std::make_unique<QProgressDialog>(label, QObject::tr("Cancel"), 0, 1000, parent);
        dialog->setWindowModality(Qt::WindowModal);
        dialog->setMinimumDuration(400);
        QObject::connect(dialog.get(), &QProgressDialog::canceled, [&] { stop = true; });
        auto* timer = new QTimer(dialog.get());
        QObject::connect(timer, &QTimer::timeout, [&] { dialog->setValue(permille.load()); });
        timer->start(50);
    }
    if (!watcher.isFinished()) loop.exec();
    *cancelled = stop.load();
    return watcher.result();
}

// The platform's keys for a standard action, then those of `usual` it lacks
// (a plain X11 session binds no key to Save As and only Ctrl+Shift+Z to Redo).
QList<QKeySequence> withFallback(QKeySequence::StandardKey key, const QList<QKeySequence>& usual) {
    QList<QKeySequence> keys = QKeySequence::keyBindings(key);
    for (const QKeySequence& k : usual)
        if (!keys.contains(k)) keys << k;
    return keys;
}

struct LoadOutcome {
    std::shared_ptr<LoadedProject> project;
    std::shared_ptr<const Table> table;
    std::string sha256;  // of the data file read
    QString error;
    bool cancelled = false;
};

}  // namespace

bool isProjectPath(const QString& path) { return path.endsWith(QLatin1String(".moderato"), Qt::CaseInsensitive); }

MainWindow::MainWindow(QWidget* parent)
    : QMainWindow(parent),
      doc_(new ProjectDocument(this)),
      runner_(new AnalysisRunner(doc_, this)),
      sidebar_(new ProjectSidebar(doc_, this)),
      pages_(new QStackedWidget(this)),
      welcome_(new QLabel(this)),
      datasetPage_(new DatasetPage(doc_, this)),
      analysisPage_(new AnalysisPage(doc_, runner_, this)) {
    initResources();
    setObjectName(QStringLiteral("moderato-main-window"));
    setWindowIcon(QIcon(QStringLiteral(":/moderato/moderato.svg")));
    setAcceptDrops(true);
    welcome_->setAlignment(Qt::AlignCenter);
    welcome_->setWordWrap(true);
    welcome_->setText(
        tr("<h2>Moderato</h2><p>Does this effect depend on that?</p>"
           "<p>Open a project or a data file (File menu, or drop it here).<br>"
           "Sample projects are in the <i>sample-projects</i> folder.</p>"));
    pages_->addWidget(welcome_);
    pages_->addWidget(datasetPage_);
    pages_->addWidget(analysisPage_);
    auto* splitter = new QSplitter(this);
    splitter->setObjectName(QStringLiteral("main-splitter"));
    splitter->addWidget(sidebar_);
    splitter->addWidget(pages_);
    splitter->setStretchFactor(1, 1);
    splitter->setSizes({200, 1000});
    setCentralWidget(splitter);
    buildMenus();
    connect(sidebar_, &ProjectSidebar::analysisActivated, this, &MainWindow::showAnalysis);
    connect(sidebar_, &ProjectSidebar::datasetActivated, this, &MainWindow::showDataset);
    connect(sidebar_, &ProjectSidebar::figureActivated, this, [this](const QString& id) {
        for (const auto& f : doc_->project().figures)
            if (f.id == id.toStdString()) {
                showAnalysis(QString::fromStdString(f.analysis));
                const bool checks = is_check_plot(f.plot);
                analysisPage_->showSection(checks ? AnalysisPage::Checks : AnalysisPage::Probe);
            }
    });
    connect(analysisPage_->checks(), &ChecksSection::rowsSelected, this,
            [this](const QString& datasetId, const std::vector<std::size_t>& rows) {
                showDataset(datasetId);
                datasetPage_->selectRows(rows);
            });
    connect(doc_, &ProjectDocument::filePathChanged, this, &MainWindow::updateTitle);
    connect(doc_->undoStack(), &QUndoStack::cleanChanged, this, &MainWindow::updateTitle);
    connect(doc_, &ProjectDocument::structureChanged, this, [this] {
        // The page on screen may have been removed (undo of an add, a delete).
        if (pages_->currentWidget() == analysisPage_ && !doc_->analysis(analysisPage_->analysisId())) showFirstItem();
        if (pages_->currentWidget() == datasetPage_ &&
            !doc_->project().dataset(datasetPage_->datasetId().toStdString()))
            showFirstItem();
    });
    QSettings settings;
    restoreGeometry(settings.value(QStringLiteral("window/geometry")).toByteArray());
    restoreState(settings.value(QStringLiteral("window/state")).toByteArray());
    splitter->restoreState(settings.value(QStringLiteral("window/splitter")).toByteArray());
    if (!settings.contains(QStringLiteral("window/geometry"))) resize(1360, 860);
    updateTitle();
}

MainWindow::~MainWindow() {
    runner_->waitForIdle();
    // The children (document, pages, actions) are deleted after this body, in
    // creation order; the undo stack signals while it is destroyed, so nothing
    // may still be listening to the document or its stack by then.
    doc_->undoStack()->disconnect();
    doc_->disconnect();
}

void MainWindow::buildMenus() {
    QMenu* file = menuBar()->addMenu(tr("&File"));
    file->addAction(tr("&New Project"), QKeySequence::New, this, [this] {
        if (confirmDiscard()) doc_->clear(), showFirstItem();
    });
    file->addAction(tr("&Open…"), QKeySequence::Open, this, [this] {
        if (!confirmDiscard()) return;
        const QString path = QFileDialog::getOpenFileName(
            this, tr("Open project or data"), QString(),
            tr("Projects and data (*.moderato *.csv *.tsv *.txt);;Moderato projects (*.moderato);;"
               "Delimited text (*.csv *.tsv *.txt);;All files (*)"));
        if (!path.isEmpty()) openPath(path);
    });
    recentMenu_ = file->addMenu(tr("Open &Recent"));
    rebuildRecentMenu();
    file->addAction(tr("&Import Data…"), QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_I), this, [this] {
        const QString path = QFileDialog::getOpenFileName(this, tr("Import data"), QString(),
                                                          tr("Delimited text (*.csv *.tsv *.txt);;All files (*)"));
        if (!path.isEmpty()) openPath(path);
    });
    file->addSeparator();
    file->addAction(tr("&Save"), QKeySequence::Save, this, [this] { save(); });
    file->addAction(tr("Save &As…"), this,
                    [this] {
                        const QString path = QFileDialog::getSaveFileName(this, tr("Save project"), doc_->filePath(),
                                                                          tr("Moderato projects (*.moderato)"));
                        if (!path.isEmpty()) saveAs(isProjectPath(path) ? path : path + QStringLiteral(".moderato"));
                    })
        ->setShortcuts(withFallback(QKeySequence::SaveAs, {QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_S)}));
    file->addSeparator();
    file->addAction(tr("&Export Figure…"), QKeySequence(Qt::CTRL | Qt::Key_E), this, &MainWindow::exportFigure);
    file->addAction(tr("Export &Tables…"), this, [this] { showMemo(MemoSection::SaveTables); });
    file->addAction(tr("&Memo…"), QKeySequence(Qt::CTRL | Qt::Key_M), this, [this] { showMemo(-1); });
    file->addSeparator();
    auto* quit = file->addAction(tr("&Quit"), QKeySequence::Quit, this, &QWidget::close);
    quit->setMenuRole(QAction::QuitRole);

    QMenu* edit = menuBar()->addMenu(tr("&Edit"));
    QAction* undo = doc_->undoStack()->createUndoAction(this, tr("&Undo"));
    undo->setShortcut(QKeySequence::Undo);
    QAction* redo = doc_->undoStack()->createRedoAction(this, tr("&Redo"));
    // Both usual keys for Redo on every desktop (some offer only one of them).
    redo->setShortcuts(withFallback(
        QKeySequence::Redo, {QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_Z), QKeySequence(Qt::CTRL | Qt::Key_Y)}));
    edit->addAction(undo);
    edit->addAction(redo);
    edit->addSeparator();
    edit->addAction(tr("&Copy"), QKeySequence::Copy, this, &MainWindow::copySelection);

    QMenu* view = menuBar()->addMenu(tr("&View"));
    const QStringList sections{tr("Specify"), tr("Estimates"), tr("Probe"), tr("Checks"), tr("Memo")};
    for (int i = 0; i < sections.size(); ++i)
        view->addAction(sections[i], this, [this, i] {
            if (pages_->currentWidget() == analysisPage_)
                analysisPage_->showSection(static_cast<AnalysisPage::Section>(i));
        });

    QMenu* help = menuBar()->addMenu(tr("&Help"));
    help->addAction(tr("&About Moderato"), this, [this] {
        QMessageBox::about(this, tr("About Moderato"),
                           tr("<h3>Moderato %1</h3><p>A workbench for moderated effects in regression: "
                              "conditional effects, Johnson–Neyman regions, crossover points.</p>"
                              "<p>Results from observational data are associations, not causal effects.</p>"
                              "<p>Free software under the GNU General Public License, version 3 or later. "
                              "Plots by QCustomPlot (GPL-3.0).</p>")
                               .arg(QStringLiteral(MODERATO_VERSION)));
    });
}

void MainWindow::report(const QString& title, const QString& text, bool warning) {
    lastMessage_ = text;
    Q_EMIT messageReported(title, text);
    statusBar()->showMessage(text.left(200), 8000);
    if (!interactive_) return;
    if (warning) QMessageBox::warning(this, title, text);
    else QMessageBox::information(this, title, text);
}

bool MainWindow::openPath(const QString& path) {
    if (isProjectPath(path)) return openProject(path);
    if (!interactive_) return importData(path, CsvOptions{});
    ImportDialog dialog(path, this);
    if (dialog.exec() != QDialog::Accepted || !dialog.table()) return false;
    const std::string id = doc_->addDataset(path, dialog.options(), dialog.table());
    showAddedDataset(path, id);
    return true;
}

bool MainWindow::openProject(const QString& path) {
    bool cancelled = false;
    const std::string file = path.toStdString();
    const LoadOutcome outcome = runWithProgress<LoadOutcome>(
        this, tr("Opening %1…").arg(QFileInfo(path).fileName()), interactive_,
        [file](const CsvProgress& progress) {
            LoadOutcome o;
            try {
                o.project = std::make_shared<LoadedProject>(load_project(file, progress));
            } catch (const Cancelled&) {
                o.cancelled = true;
            } catch (const InputError& e) {
                o.error = QString::fromStdString(e.what());
            } catch (const std::exception& e) {
                o.error = tr("Internal error: %1").arg(QString::fromUtf8(e.what()));
            }
            return o;
        },
        &cancelled);
    if (outcome.cancelled || cancelled) {
        statusBar()->showMessage(tr("Opening cancelled; nothing was changed."), 5000);
        return false;
    }
    if (!outcome.error.isEmpty()) {
        report(tr("Cannot open project"), outcome.error);
        return false;
    }
    LoadedProject loaded = std::move(*outcome.project);
    const std::vector<std::string> warnings = loaded.warnings;
    doc_->adopt(std::move(loaded));
    addRecent(QFileInfo(path).absoluteFilePath());
    showFirstItem();
    if (!warnings.empty()) {
        QStringList lines;
        for (const auto& w : warnings) lines << QString::fromStdString(w);
        report(tr("Project opened with notes"), lines.join(QStringLiteral("\n\n")));
    }
    return true;
}

bool MainWindow::importData(const QString& path, const CsvOptions& options) {
    bool cancelled = false;
    const std::string file = path.toStdString();
    const LoadOutcome outcome = runWithProgress<LoadOutcome>(
        this, tr("Reading %1…").arg(QFileInfo(path).fileName()), interactive_,
        [file, options](const CsvProgress& progress) {
            LoadOutcome o;
            try {
                o.table = std::make_shared<const Table>(read_csv(file, options, progress));
                o.sha256 = sha256_file(file);
            } catch (const Cancelled&) {
                o.cancelled = true;
            } catch (const InputError& e) {
                o.error = QString::fromStdString(e.what());
            }
            return o;
        },
        &cancelled);
    if (outcome.cancelled || cancelled) return false;
    if (!outcome.error.isEmpty()) {
        report(tr("Cannot read data"), outcome.error);
        return false;
    }
    const std::string id = doc_->addDataset(path, options, outcome.table, outcome.sha256);
    showAddedDataset(path, id);
    return true;
}

bool MainWindow::save() {
    if (doc_->filePath().isEmpty()) {
        if (!interactive_) return false;
        const QString path =
            QFileDialog::getSaveFileName(this, tr("Save project"), QString(), tr("Moderato projects (*.moderato)"));
        if (path.isEmpty()) return false;
        return saveAs(isProjectPath(path) ? path : path + QStringLiteral(".moderato"));
    }
    return saveAs(doc_->filePath());
}

bool MainWindow::saveAs(const QString& path) {
    try {
        doc_->saveAs(path);
    } catch (const InputError& e) {
        report(tr("Cannot save project"), QString::fromStdString(e.what()));
        return false;
    }
    addRecent(doc_->filePath());
    statusBar()->showMessage(tr("Saved %1").arg(doc_->filePath()), 4000);
    return true;
}

void MainWindow::showAnalysis(const QString& id) {
    if (!doc_->analysis(id)) return;
    sidebar_->select(QStringLiteral("analysis"), id);
    analysisPage_->showAnalysis(id);
    pages_->setCurrentWidget(analysisPage_);
}

void MainWindow::showDataset(const QString& id) {
    if (!doc_->project().dataset(id.toStdString())) return;
    sidebar_->select(QStringLiteral("dataset"), id);
    datasetPage_->showDataset(id);
    pages_->setCurrentWidget(datasetPage_);
}

void MainWindow::showAddedDataset(const QString& path, const std::string& id) {
    addRecent(QFileInfo(path).absoluteFilePath());
    // Adding a dataset starts an analysis of it (ProjectDocument::addDataset): show that.
    if (!doc_->project().analyses.empty() && doc_->project().analyses.back().dataset == id)
        showAnalysis(QString::fromStdString(doc_->project().analyses.back().id));
    else showDataset(QString::fromStdString(id));
}

void MainWindow::showFirstItem() {
    const Project& p = doc_->project();
    if (!p.analyses.empty()) showAnalysis(QString::fromStdString(p.analyses.front().id));
    else if (!p.datasets.empty()) showDataset(QString::fromStdString(p.datasets.front().id));
    else pages_->setCurrentWidget(welcome_);
}

bool MainWindow::confirmDiscard() {
    if (!doc_->isModified() || !interactive_) return true;
    const auto answer = QMessageBox::question(
        this, tr("Unsaved changes"), tr("%1 has unsaved changes. Save them first?").arg(doc_->displayName()),
        QMessageBox::Save | QMessageBox::Discard | QMessageBox::Cancel, QMessageBox::Save);
    if (answer == QMessageBox::Cancel) return false;
    if (answer == QMessageBox::Save) return save();
    return true;
}

void MainWindow::closeEvent(QCloseEvent* event) {
    if (!confirmDiscard()) {
        event->ignore();
        return;
    }
    QSettings settings;
    settings.setValue(QStringLiteral("window/geometry"), saveGeometry());
    settings.setValue(QStringLiteral("window/state"), saveState());
    if (auto* splitter = findChild<QSplitter*>(QStringLiteral("main-splitter")))
        settings.setValue(QStringLiteral("window/splitter"), splitter->saveState());
    event->accept();
}

void MainWindow::dragEnterEvent(QDragEnterEvent* event) {
    if (event->mimeData()->hasUrls()) {
        for (const QUrl& url : event->mimeData()->urls())
            if (url.isLocalFile()) {
                event->acceptProposedAction();
                return;
            }
    }
}

void MainWindow::dropEvent(QDropEvent* event) {
    for (const QUrl& url : event->mimeData()->urls()) {
        if (!url.isLocalFile()) continue;
        const QString path = url.toLocalFile();
        if (isProjectPath(path) && !confirmDiscard()) return;
        openPath(path);
        event->acceptProposedAction();
        return;
    }
}

void MainWindow::addRecent(const QString& path) {
    QSettings settings;
    QStringList recent = settings.value(QStringLiteral("recentFiles")).toStringList();
    recent.removeAll(path);
    recent.prepend(path);
    while (recent.size() > kMaxRecent) recent.removeLast();
    settings.setValue(QStringLiteral("recentFiles"), recent);
    rebuildRecentMenu();
}

void MainWindow::rebuildRecentMenu() {
    if (!recentMenu_) return;
    recentMenu_->clear();
    const QStringList recent = QSettings().value(QStringLiteral("recentFiles")).toStringList();
    for (const QString& path : recent)
        recentMenu_
            ->addAction(QFileInfo(path).fileName(), this,
                        [this, path] {
                            if (!isProjectPath(path) || confirmDiscard()) openPath(path);
                        })
            ->setToolTip(path);
    recentMenu_->setEnabled(!recent.isEmpty());
}

void MainWindow::updateTitle() {
    setWindowTitle(
        tr("%1%2 — Moderato").arg(doc_->displayName(), doc_->isModified() ? QStringLiteral(" *") : QString()));
}

void MainWindow::exportFigure() {
    if (pages_->currentWidget() != analysisPage_) {
        report(tr("Export figure"), tr("Open an analysis and show its Probe or Checks section to export a figure."),
               false);
        return;
    }
    const QList<FigureSource*> figures = analysisPage_->currentFigures();
    if (figures.isEmpty()) {
        report(tr("Export figure"), tr("This section has no figure; show the Probe or Checks section."), false);
        return;
    }
    const QString id = analysisPage_->analysisId();
    const auto run = runner_->result(id);
    const Analysis* a = doc_->analysis(id);
    const QString caption = a && run ? figureCaption(*a, *run) : QString();
    FigureExportDialog dialog(figures, doc_, id, caption, this);
    // Saving closes the dialog: say where the file went.
    if (dialog.exec() == QDialog::Accepted && !dialog.lastSavedPath().isEmpty())
        statusBar()->showMessage(
            tr("Saved the figure to %1")
                .arg(QDir::toNativeSeparators(QFileInfo(dialog.lastSavedPath()).absoluteFilePath())),
            10000);
}

void MainWindow::showMemo(int saveKind) {
    if (pages_->currentWidget() != analysisPage_) {
        report(tr("Memo"), tr("Open an analysis first: its memo and tables are written from its results."), false);
        return;
    }
    analysisPage_->showSection(AnalysisPage::Memo);
    if (saveKind >= 0) analysisPage_->memo()->saveWithDialog(saveKind);
}

void MainWindow::copySelection() {
    // Any table with a selection: its cells as tab-separated text.
    if (auto* view = qobject_cast<QTableView*>(QApplication::focusWidget())) {
        QApplication::clipboard()->setText(tableSelectionAsTsv(view));
        return;
    }
    if (auto* w = QApplication::focusWidget()) {
        QMetaObject::invokeMethod(w, "copy");
    }
}

}  // namespace moderato::ui
