#include "shell/main_window.hpp"
#include "shell/undo_keys.hpp"
#include "shell/user_guide.hpp"

#include <QAction>
#include <QApplication>
#include <QClipboard>
#include <QCloseEvent>
#include <QDir>
#include <QDragEnterEvent>
#include <QDropEvent>
#include <QFileDialog>
#include <QFileInfo>
#include <QInputDialog>
#include <QLabel>
#include <QLineEdit>
#include <QMenuBar>
#include <QMessageBox>
#include <QMimeData>
#include <QSettings>
#include <QSplitter>
#include <QStackedWidget>
#include <QStatusBar>
#include <QTableView>
#include <QTimer>
#include <QToolBar>
#include <optional>

#include "common/background_job.hpp"
#include "common/figure_caption.hpp"
#include "common/job_progress_dialog.hpp"
#include "common/table_clipboard.hpp"
#include "data/dataset_page.hpp"
#include "data/import_dialog.hpp"
#include "data/postgres_dialog.hpp"
#include "data/source_choice.hpp"
#include "export/figure_export_dialog.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "model/recovery_store.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "moderato/support/error.hpp"
#include "moderato/support/file_util.hpp"
#include "moderato/support/sha256.hpp"
#include "sections/checks_section.hpp"
#include "sections/memo_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/locate_data.hpp"
#include "shell/project_sidebar.hpp"

// The resources live in a static library: register them once (outside any namespace).
static void initResources() { Q_INIT_RESOURCE(moderato); }

namespace moderato::ui {

namespace {
constexpr int kMaxRecent = 8;

// The platform's keys for a standard action, then those of `usual` it lacks
// (a plain X11 session binds no key to Save As and only Ctrl+Shift+Z to Redo).
QList<QKeySequence> withFallback(QKeySequence::StandardKey key, const QList<QKeySequence>& usual) {
    QList<QKeySequence> keys = QKeySequence::keyBindings(key);
    for (const QKeySequence& k : usual)
        if (!keys.contains(k)) keys << k;
    return keys;
}

}  // namespace

// What a load in the worker produced; read on the UI thread once it ended.
struct LoadOutcome {
    std::shared_ptr<LoadedProject> project;
    std::shared_ptr<const Table> table;
    std::string sha256;  // of the data file read
    QString error;
    bool cancelled = false;
    // Opening a project: what was asked for (to ask again with a located data
    // file) and the data file found missing, if one was.
    std::shared_ptr<const Project> inMemory;
    DataLocations moved;
    std::optional<MissingDataFile> missing;
    std::function<void()> adopted;
    // PostgreSQL: the passwords this load was given, and the address of a
    // server that asked for one it was not given.
    DatabasePasswords passwords;
    std::string passwordFor;
};

namespace {

// Runs one load (`read` fills the outcome) and turns every failure into the
// outcome's message; core's readers throw Cancelled when asked to stop.
template <typename Read>
void loadInto(LoadOutcome& o, Read read) {
    try {
        read();
    } catch (const Cancelled&) {
        o.cancelled = true;
    } catch (const MissingDataFile& e) {
        o.missing = e;
        o.error = QString::fromStdString(e.what());
    } catch (const PasswordNeeded& e) {
        o.passwordFor = e.location();
        o.error = QString::fromStdString(e.what());
    } catch (const InputError& e) {
        o.error = QString::fromStdString(e.what());
    } catch (const std::bad_alloc&) {
        o.error = MainWindow::tr("There is not enough memory to read this file.");
    } catch (const std::exception& e) {
        o.error = MainWindow::tr("Internal error: %1").arg(QString::fromUtf8(e.what()));
    }
}

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
      analysisPage_(new AnalysisPage(doc_, runner_, this)),
      recovery_(new RecoveryStore(doc_, RecoveryStore::defaultFolder(), this)),
      progressDelayMs_(JobProgressDialog::kDefaultDelayMs) {
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
    buildToolBar();
    new UndoKeys(this);
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
    // A load still running is cancelled by its job as the job goes (with the
    // children); analysis workers own copies of what they read and finish on their own.
    // The children (document, pages, actions) are deleted after this body, in
    // creation order; the undo stack signals while it is destroyed, so nothing
    // may still be listening to the document or its stack by then.
    doc_->undoStack()->disconnect();
    doc_->disconnect();
}

QString MainWindow::newAnalysis() {
    std::string dataset;
    if (pages_->currentWidget() == datasetPage_) dataset = datasetPage_->datasetId().toStdString();
    else if (const Analysis* a = doc_->analysis(analysisPage_->analysisId())) dataset = a->dataset;
    if (!doc_->project().dataset(dataset) && !doc_->project().datasets.empty())
        dataset = doc_->project().datasets.front().id;
    if (dataset.empty()) {
        report(tr("New analysis"), tr("Import a data file first (File › Import Data…): an analysis needs a dataset."));
        return {};
    }
    const QString id = sidebar_->newAnalysis(QString::fromStdString(dataset));
    if (!id.isEmpty()) showAnalysis(id);
    return id;
}

UserGuide* MainWindow::showUserGuide() {
    if (!guide_) guide_ = new UserGuide(this);
    guide_->show();
    guide_->raise();
    guide_->activateWindow();
    return guide_;
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
            tr("Projects and data (*.moderato *.csv *.tsv *.txt *.xlsx *.sqlite *.sqlite3 *.db);;Moderato projects "
               "(*.moderato);;Delimited text (*.csv *.tsv *.txt);;Workbooks (*.xlsx);;SQLite databases (*.sqlite "
               "*.sqlite3 *.db);;All files (*)"));
        if (!path.isEmpty()) openPath(path);
    });
    recentMenu_ = file->addMenu(tr("Open &Recent"));
    rebuildRecentMenu();
    newAnalysisAction_ = file->addAction(tr("New &Analysis"), QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_N), this,
                                         [this] { newAnalysis(); });
    file->addAction(tr("&Import Data…"), QKeySequence(Qt::CTRL | Qt::SHIFT | Qt::Key_I), this, [this] {
        const QString path = QFileDialog::getOpenFileName(
            this, tr("Import data"), QString(),
            tr("Data (*.csv *.tsv *.txt *.xlsx *.sqlite *.sqlite3 *.db);;Delimited text (*.csv *.tsv *.txt);;"
               "Workbooks (*.xlsx);;SQLite databases (*.sqlite *.sqlite3 *.db);;All files (*)"));
        if (!path.isEmpty()) openPath(path);
    });
    file->addAction(tr("Connect to &PostgreSQL…"), this, [this] { connectToDatabase(); })
        ->setObjectName(QStringLiteral("connect-postgres"));
    file->addSeparator();
    file->addAction(tr("&Save"), QKeySequence::Save, this, [this] { save(); });
    file->addAction(tr("Save &As…"), this,
                    [this] {
                        const QString path = QFileDialog::getSaveFileName(
                            this, tr("Save project"), suggestedProjectPath(), tr("Moderato projects (*.moderato)"));
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
    help->addAction(tr("&User Guide"), QKeySequence::HelpContents, this, [this] { showUserGuide(); });
    help->addAction(tr("&About Moderato"), this, [this] {
        QMessageBox* box =
            showMessageBox(QMessageBox::NoIcon, tr("About Moderato"),
                           tr("<h3>Moderato %1</h3><p>A workbench for moderated effects in regression: "
                              "conditional effects, Johnson–Neyman regions, crossover points.</p>"
                              "<p>Results from observational data are associations, not causal effects.</p>"
                              "<p>Free software under the GNU General Public License, version 3 or later. "
                              "Plots by QCustomPlot (GPL-3.0).</p>")
                               .arg(QStringLiteral(MODERATO_VERSION)));
        box->setIconPixmap(windowIcon().pixmap(64, 64));
    });
}

void MainWindow::buildToolBar() {
    QToolBar* bar = addToolBar(tr("Commands"));
    bar->setObjectName(QStringLiteral("main-toolbar"));  // for saveState()/restoreState()
    bar->setMovable(false);
    bar->setToolButtonStyle(Qt::ToolButtonTextOnly);
    newAnalysisAction_->setToolTip(tr("New analysis of the dataset on show (%1)")
                                       .arg(newAnalysisAction_->shortcut().toString(QKeySequence::NativeText)));
    bar->addAction(newAnalysisAction_);
}

QString MainWindow::suggestedProjectPath() const {
    if (!doc_->filePath().isEmpty()) return doc_->filePath();
    // Not saved yet: beside the (first) data file, named after it.
    for (const DataSource& d : doc_->project().datasets) {
        if (d.kind == SourceKind::PostgreSQL) continue;  // an address, not a folder
        const QFileInfo data(doc_->dataPath(d.id));
        if (data.fileName().isEmpty()) continue;
        return QDir(data.absolutePath()).filePath(data.completeBaseName() + QStringLiteral(".moderato"));
    }
    return QDir::home().filePath(tr("untitled") + QStringLiteral(".moderato"));
}

void MainWindow::report(const QString& title, const QString& text, bool warning) {
    lastMessage_ = text;
    Q_EMIT messageReported(title, text);
    statusBar()->showMessage(text.left(200), 8000);
    if (!interactive_) return;
    showMessageBox(warning ? QMessageBox::Warning : QMessageBox::Information, title, text);
}

QMessageBox* MainWindow::showMessageBox(int icon, const QString& title, const QString& text) {
    // Opened, not run: the window goes on (a load may finish meanwhile).
    auto* box = new QMessageBox(static_cast<QMessageBox::Icon>(icon), title, text, QMessageBox::Ok, this);
    box->setAttribute(Qt::WA_DeleteOnClose);
    box->open();
    return box;
}

void MainWindow::openPath(const QString& path) {
    if (isProjectPath(path)) return openProject(path);
    if (!interactive_) return importData(path, CsvOptions{});
    // The import dialog reads the file itself (in a worker, with its own
    // progress bar); it is opened, not run: the rest happens when it is accepted.
    auto* dialog = new ImportDialog(path, this);
    dialog->setAttribute(Qt::WA_DeleteOnClose);
    connect(dialog, &QDialog::accepted, this, [this, dialog, path] {
        if (!dialog->table()) return;
        const std::string id = doc_->addDataset(path, dialog->options(), dialog->table(), {}, dialog->source());
        showAddedDataset(path, id);
    });
    dialog->open();
}

void MainWindow::openProject(const QString& path) { openProjectFrom(path, nullptr, {}); }

void MainWindow::openProjectFrom(const QString& path, std::shared_ptr<const Project> project,
                                 const DataLocations& moved, std::function<void()> adopted,
                                 const DatabasePasswords& passwords) {
    const std::string file = path.toStdString();
    const std::string folder = path.isEmpty() ? std::string() : QFileInfo(path).absolutePath().toStdString();
    auto outcome = std::make_shared<LoadOutcome>();
    outcome->inMemory = std::move(project);
    outcome->moved = moved;
    outcome->adopted = std::move(adopted);
    outcome->passwords = passwords;
    outcome->passwords.insert(doc_->passwords().begin(), doc_->passwords().end());
    const QString name = path.isEmpty() ? tr("Untitled project") : QFileInfo(path).fileName();
    startLoad(
        path, tr("Opening %1…").arg(name),
        [outcome, file, folder](const BackgroundJob::Progress& progress) {
            // A save into this folder killed before its rename (a crash, a
            // power cut) left its temporary file; its writer is gone, so the
            // file goes. A live writer's file, and any other file, stays.
            if (!file.empty()) remove_stale_temp_files(folder);
            loadInto(*outcome, [&] {
                const CsvProgress p{progress};
                outcome->project = std::make_shared<LoadedProject>(
                    outcome->inMemory
                        ? load_project_data(*outcome->inMemory, file, p, outcome->moved, outcome->passwords)
                        : load_project(file, p, outcome->moved, outcome->passwords));
            });
        },
        [this, path, outcome](bool cancelled) { return adoptProject(path, *outcome, cancelled); });
}

void MainWindow::importData(const QString& path, const CsvOptions& options) {
    const std::string file = path.toStdString();
    auto outcome = std::make_shared<LoadOutcome>();
    startLoad(
        path, tr("Reading %1…").arg(QFileInfo(path).fileName()),
        [outcome, file, options](const BackgroundJob::Progress& progress) {
            loadInto(*outcome, [&] {
                // Without the dialog: a text file, or a workbook's first worksheet (a database
                // needs its table chosen, so read_source refuses it with a message).
                const SourceSpec source{sourceKindOfFile(QString::fromStdString(file)), file, {}, {}, {}};
                outcome->table = std::make_shared<const Table>(read_source(source, options, CsvProgress{progress}));
                outcome->sha256 = sha256_file(file);
            });
        },
        [this, path, options, outcome](bool cancelled) { return addImported(path, options, *outcome, cancelled); });
}

void MainWindow::startLoad(const QString& path, const QString& text, BackgroundJob::Work work,
                           std::function<LoadResult(bool cancelled)> done) {
    if (load_) {
        report(tr("Still loading"),
               tr("%1 is still being read. Wait for it, or cancel it, before opening another file.")
                   .arg(QDir::toNativeSeparators(loadingPath_)));
        Q_EMIT loadFinished(path, Failed);
        return;
    }
    load_ = new BackgroundJob(this);
    loadingPath_ = path;
    connect(load_, &BackgroundJob::progressChanged, this, &MainWindow::loadProgress);
    connect(load_, &BackgroundJob::finished, this, [this, path, done = std::move(done)](bool cancelled) {
        load_->deleteLater();
        load_ = nullptr;
        loadingPath_.clear();
        statusBar()->clearMessage();
        const LoadResult result = done(cancelled);
        if (load_) return;  // it goes on in another load (a located data file), which reports the end
        Q_EMIT loadFinished(path, result);
    });
    if (interactive_) new JobProgressDialog(load_, text, this, progressDelayMs_);
    statusBar()->showMessage(text);
    load_->start(std::move(work));
}

void MainWindow::cancelLoad() {
    if (load_) load_->cancel();
}

MainWindow::LoadResult MainWindow::adoptProject(const QString& path, LoadOutcome& outcome, bool cancelled) {
    // Nothing of a cancelled load is kept, even when it had just finished.
    if (cancelled || outcome.cancelled) {
        statusBar()->showMessage(tr("Opening cancelled; nothing was changed."), 5000);
        return Cancelled;
    }
    // A moved data file the user located: opened again with it (that load reports; this result is not emitted).
    if (outcome.missing && locateMissing(path, outcome)) return Cancelled;
    if (!outcome.passwordFor.empty() && askPassword(path, outcome)) return Cancelled;
    if (!outcome.error.isEmpty() || !outcome.project) {
        report(tr("Cannot open project"),
               outcome.error.isEmpty() ? tr("The project could not be read.") : outcome.error);
        return Failed;
    }
    LoadedProject loaded = std::move(*outcome.project);
    for (const auto& [where, secret] : outcome.passwords) doc_->setPassword(where, secret);  // they worked: kept
    const std::vector<std::string> warnings = loaded.warnings;
    doc_->adopt(std::move(loaded));
    if (!outcome.moved.empty()) doc_->relocateData(outcome.moved, tr("Locate data file"));
    if (outcome.adopted) outcome.adopted();
    if (!path.isEmpty()) addRecent(QFileInfo(path).absoluteFilePath());
    showFirstItem();
    if (!warnings.empty()) {
        QStringList lines;
        for (const auto& w : warnings) lines << QString::fromStdString(w);
        report(tr("Project opened with notes"), lines.join(QStringLiteral("\n\n")));
    }
    return Loaded;
}

MainWindow::LoadResult MainWindow::addImported(const QString& path, const CsvOptions& options,
                                               const LoadOutcome& outcome, bool cancelled) {
    if (cancelled || outcome.cancelled) {
        statusBar()->showMessage(tr("Reading cancelled; nothing was added."), 5000);
        return Cancelled;
    }
    if (!outcome.error.isEmpty() || !outcome.table) {
        report(tr("Cannot read data"), outcome.error.isEmpty() ? tr("The file could not be read.") : outcome.error);
        return Failed;
    }
    const SourceSpec place{sourceKindOfFile(path), {}, {}, {}, {}};
    const std::string id = doc_->addDataset(path, options, outcome.table, outcome.sha256, place);
    showAddedDataset(path, id);
    return Loaded;
}

bool MainWindow::locateMissing(const QString& path, const LoadOutcome& outcome) {
    const MissingDataFile& m = *outcome.missing;
    DataLocator ask = locator_;
    if (!ask && interactive_)
        ask = [this](const QString& dataset, const QString& recorded, const QString& file) {
            return askForMovedDataFile(this, dataset, recorded, file);
        };
    if (!ask) return false;
    const QString chosen =
        ask(QString::fromStdString(m.dataset), QString::fromStdString(m.recorded), QString::fromStdString(m.looked_at));
    const std::string file = QFileInfo(chosen).absoluteFilePath().toStdString();
    const auto tried = outcome.moved.find(m.dataset);
    if (chosen.isEmpty() || (tried != outcome.moved.end() && tried->second == file)) return false;
    DataLocations moved = outcome.moved;
    moved[m.dataset] = file;
    // Opened again with the chosen file; its SHA-256 is checked as for any data file.
    openProjectFrom(path, outcome.inMemory, moved, outcome.adopted, outcome.passwords);
    return true;
}

bool MainWindow::askPassword(const QString& path, const LoadOutcome& outcome) {
    const QString location = QString::fromStdString(outcome.passwordFor);
    if (outcome.passwords.count(outcome.passwordFor)) return false;  // asked once already: report
    PasswordAsker ask = passwordAsker_;
    if (!ask && interactive_)
        ask = [this](const QString& where) -> std::optional<QString> {
            bool ok = false;
            const QString typed = QInputDialog::getText(
                this, tr("Password"),
                tr("The PostgreSQL server at %1 asks for a password.\nIt is used while Moderato runs and never "
                   "saved.")
                    .arg(QString(where).replace(QLatin1Char('&'), QStringLiteral("&&"))),  // '&' is no shortcut
                QLineEdit::Password, QString(), &ok);
            return ok ? std::optional<QString>(typed) : std::nullopt;
        };
    if (!ask) return false;
    const std::optional<QString> typed = ask(location);
    if (!typed) return false;
    DatabasePasswords passwords = outcome.passwords;
    passwords[outcome.passwordFor] = typed->toStdString();
    openProjectFrom(path, outcome.inMemory, outcome.moved, outcome.adopted, passwords);
    return true;
}

void MainWindow::connectToDatabase() {
    auto* connection = new PostgresDialog(this);
    connection->setAttribute(Qt::WA_DeleteOnClose);
    connect(connection, &QDialog::accepted, this, [this, connection] {
        const std::string password = connection->password();
        auto* dialog = new ImportDialog(connection->location(), password, connection->tables(), this);
        dialog->setAttribute(Qt::WA_DeleteOnClose);
        connect(dialog, &QDialog::accepted, this, [this, dialog, password] { addServerDataset(*dialog, password); });
        dialog->open();
    });
    connection->open();
}

void MainWindow::addServerDataset(const ImportDialog& dialog, const std::string& password) {
    if (!dialog.table()) return;
    const SourceSpec source = dialog.source();
    if (!password.empty()) doc_->setPassword(source.location, password);
    const QString where = QString::fromStdString(source.location);
    const std::string id =
        doc_->addDataset(where, dialog.options(), dialog.table(), dialog.fingerprint(), source, dialog.inDatabase());
    showAddedDataset(where, id);
}

bool MainWindow::save() {
    // Recovered edits whose project file changed meanwhile: ask where (the chooser confirms overwriting).
    if (doc_->filePath().isEmpty() || doc_->confirmSaveTarget()) {
        if (!interactive_) return false;
        const QString path = QFileDialog::getSaveFileName(this, tr("Save project"), suggestedProjectPath(),
                                                          tr("Moderato projects (*.moderato)"));
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
    const DataSource* added = doc_->project().dataset(id);
    if (!added || added->kind != SourceKind::PostgreSQL) addRecent(QFileInfo(path).absoluteFilePath());
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
    recovery_->discard();  // a clean quit keeps no recovery copy
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
    auto* dialog = new FigureExportDialog(figures, doc_, id, caption, this);
    if (a && run) {  // each plot's own caption (the Effect plot's names the straight-line check)
        QStringList captions;
        for (FigureSource* f : figures) captions << figureCaption(*a, *run, f->figureKind());
        dialog->setFigureCaptions(captions);
    }
    dialog->setAttribute(Qt::WA_DeleteOnClose);
    // Each save says where the file went (the dialog stays open).
    connect(dialog, &FigureExportDialog::figureSaved, this, [this](const QString& path) {
        statusBar()->showMessage(
            tr("Saved the figure to %1").arg(QDir::toNativeSeparators(QFileInfo(path).absoluteFilePath())), 10000);
    });
    dialog->open();
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
