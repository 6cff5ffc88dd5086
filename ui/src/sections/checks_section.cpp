#include "sections/checks_section.hpp"

#include <QFileInfo>
#include <QGridLayout>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QItemSelectionModel>
#include <QLabel>
#include <QProgressBar>
#include <QPushButton>
#include <QTableView>
#include <QTimer>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>

#include "common/background_job.hpp"
#include "common/inline_work.hpp"
#include "common/number_text.hpp"
#include "common/scale_words.hpp"
#include "model/project_document.hpp"
#include "plots/diagnostic_plots.hpp"
#include "sections/flagged_rows_model.hpp"

namespace moderato::ui {

namespace {
// What stands in the influence plot's place for a multilevel fit.
QLabel* influenceNoteLabel(QWidget* parent) {
    auto* note = new QLabel(parent);
    note->setObjectName(QStringLiteral("checks-influence-note"));
    note->setWordWrap(true);
    note->setAlignment(Qt::AlignTop | Qt::AlignLeft);
    note->setTextInteractionFlags(Qt::TextSelectableByMouse);
    note->setText(
        ChecksSection::tr("<b>No influence plot for a multilevel fit.</b> Cook's distance and leverage are "
                          "measures of an ordinary least-squares fit; they do not carry over to a model whose rows "
                          "share their group's effects, so they are not shown. Rows are flagged by their "
                          "standardised conditional residual alone; to see whether one group sways the results, "
                          "fit the model without it."));
    note->hide();
    return note;
}
}  // namespace

ChecksSection::ChecksSection(ProjectDocument* doc, QWidget* parent)
    : AnalysisSection(doc, parent),
      threshold_(kInlineWorkCells),
      note_(new QLabel(this)),
      busy_(new QProgressBar(this)),
      cancel_(new QPushButton(tr("Cancel"), this)),
      residuals_(new DiagnosticPlot(DiagnosticPlot::Residuals, this)),
      quantiles_(new DiagnosticPlot(DiagnosticPlot::Quantiles, this)),
      influence_(new DiagnosticPlot(DiagnosticPlot::Influence, this)),
      influenceNote_(influenceNoteLabel(this)),
      rules_(new QLabel(this)),
      list_(new QTableView(this)),
      model_(new FlaggedRowsModel(this)),
      show_(new QPushButton(tr("Show in dataset"), this)) {
    setObjectName(QStringLiteral("checks-section"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 4, 0, 0);
    note_->setObjectName(QStringLiteral("checks-note"));
    note_->setWordWrap(true);
    note_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    auto* top = new QHBoxLayout;
    top->addWidget(note_, 1);
    busy_->setObjectName(QStringLiteral("checks-busy"));
    busy_->setRange(0, 0);  // the diagnostics report no progress: an indicator that they run
    busy_->setTextVisible(false);
    busy_->setMaximumWidth(80);
    busy_->hide();
    top->addWidget(busy_);
    cancel_->setObjectName(QStringLiteral("checks-cancel"));
    cancel_->hide();
    top->addWidget(cancel_);
    layout->addLayout(top);

    auto* grid = new QGridLayout;
    grid->setSpacing(6);
    grid->addWidget(residuals_, 0, 0);
    grid->addWidget(quantiles_, 0, 1);
    grid->addWidget(influence_, 1, 0);
    grid->addWidget(influenceNote_, 1, 0);  // in the influence plot's place for a multilevel fit
    auto* panel = new QWidget(this);
    auto* side = new QVBoxLayout(panel);
    side->setContentsMargins(0, 0, 0, 0);
    auto* heading = new QLabel(tr("<b>Flagged rows</b>"), panel);
    side->addWidget(heading);
    rules_->setObjectName(QStringLiteral("checks-rules"));
    rules_->setWordWrap(true);
    rules_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    side->addWidget(rules_);
    list_->setObjectName(QStringLiteral("flagged-rows"));
    list_->setModel(model_);
    list_->setSelectionBehavior(QAbstractItemView::SelectRows);
    list_->setSelectionMode(QAbstractItemView::ExtendedSelection);
    list_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    list_->verticalHeader()->hide();
    list_->verticalHeader()->setDefaultSectionSize(list_->fontMetrics().height() + 6);
    list_->horizontalHeader()->setStretchLastSection(true);
    list_->setShowGrid(false);
    // Columns sized from the first rows only: sizing them from every flagged
    // row of a big fit would hold up the window.
    list_->horizontalHeader()->setResizeContentsPrecision(kListSizingRows);
    list_->setWordWrap(false);
    side->addWidget(list_, 1);
    auto* buttons = new QHBoxLayout;
    buttons->addStretch(1);
    show_->setObjectName(QStringLiteral("show-in-dataset"));
    show_->setToolTip(tr("Select these rows in the dataset's grid"));
    show_->setEnabled(false);
    buttons->addWidget(show_);
    side->addLayout(buttons);
    grid->addWidget(panel, 1, 1);
    grid->setRowStretch(0, 1);
    grid->setRowStretch(1, 1);
    grid->setColumnStretch(0, 1);
    grid->setColumnStretch(1, 1);
    layout->addLayout(grid, 1);

    connect(list_->selectionModel(), &QItemSelectionModel::selectionChanged, this, [this] { selectionChanged(); });
    connect(show_, &QPushButton::clicked, this, &ChecksSection::emitSelectedRows);
    connect(cancel_, &QPushButton::clicked, this, [this] {
        if (job_) cancel();
        else startWorker();  // "Compute again" after a cancelled pass
    });
    connect(list_, &QTableView::doubleClicked, this, [this] { emitSelectedRows(); });
    for (DiagnosticPlot* p : {residuals_, quantiles_, influence_})
        connect(p, &DiagnosticPlot::observationClicked, this, &ChecksSection::selectObservation);
}

QList<FigureSource*> ChecksSection::figures() {
    if (multilevel()) return {residuals_, quantiles_};  // no influence plot (see influenceNote_)
    return {residuals_, quantiles_, influence_};
}

std::shared_ptr<const Diagnostics> ChecksSection::plotted(std::size_t k) const {
    return k == 2 && diag_ && diag_->multilevel ? nullptr : diag_;
}

namespace {
// Whether two runs have the same rows, design and estimates: then their
// diagnostics are the same (they do not depend on the SE kind or the probe).
bool sameFit(const AnalysisRun& a, const AnalysisRun& b) {
    auto same = [](const Eigen::VectorXd& u, const Eigen::VectorXd& v) {
        return u.size() == v.size() && std::equal(u.data(), u.data() + u.size(), v.data(), [](double x, double y) {
                   return x == y || (std::isnan(x) && std::isnan(y));
               });
    };
    return a.table == b.table && a.fit.family == b.fit.family && a.design.rows == b.design.rows &&
           a.design.X.cols() == b.design.X.cols() && same(a.design.weights, b.design.weights) &&
           same(a.fit.beta, b.fit.beta) && same(a.fit.fitted, b.fit.fitted);
}
}  // namespace

void ChecksSection::showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) {
    if (id == id_ && run == run_ && error == error_ && !dirty_ && (diag_ || job_ || !run)) return;
    if (id == id_ && run && run_ && (diag_ || job_) && !dirty_ && sameFit(*run, *run_)) {
        run_ = std::move(run);  // a probe-only change: the checks (or the pass computing them) stand
        return;
    }
    dropWorker();  // its result would belong to the run no longer on show
    id_ = id;
    run_ = std::move(run);
    error_ = error;
    diag_.reset();
    dirty_ = true;
    if (isVisible()) computeWhenDue();
}

void ChecksSection::showEvent(QShowEvent* event) {
    AnalysisSection::showEvent(event);
    computeWhenDue();
}

std::shared_ptr<const Diagnostics> ChecksSection::diagnostics() {
    ensureComputed();
    return diag_;
}

void ChecksSection::computeWhenDue() {
    if (!dirty_ || job_) return;
    const double cells =
        run_ ? static_cast<double>(run_->design.X.rows()) * static_cast<double>(run_->design.X.cols()) : 0.0;
    if (cells < threshold_) ensureComputed();
    else startWorker();
}

void ChecksSection::ensureComputed() {
    if (job_) {
        dropWorker();
        dirty_ = true;
    }
    if (!dirty_) return;
    dirty_ = false;
    diag_.reset();
    QString problem;
    if (run_) {
        try {
            diag_ = std::make_shared<const Diagnostics>(
                moderato::diagnostics(run_->design, run_->sample_fit ? *run_->sample_fit : run_->fit));
        } catch (const std::exception& e) {
            problem = tr("The checks could not be computed: %1").arg(QString::fromUtf8(e.what()));
        }
    } else {
        problem = error_.isEmpty() ? tr("No fitted model yet.") : error_;
    }
    showDiagnostics(problem);
    Q_EMIT computed();
}

void ChecksSection::startWorker() {
    dropWorker();
    if (!run_) return;
    dirty_ = false;
    const int generation = ++generation_;
    struct Outcome {
        std::shared_ptr<const Diagnostics> diag;
        QString problem;
        std::vector<std::shared_ptr<const DiagnosticPoints>> points;  // residuals, quantiles, influence
        std::shared_ptr<const RowNumbers> rows;
    };
    auto outcome = std::make_shared<Outcome>();
    job_ = new BackgroundJob(this);
    connect(job_, &BackgroundJob::finished, this, [this, job = job_, generation, outcome](bool cancelled) {
        job->deleteLater();
        if (generation != generation_ || cancelled) return;  // dropped: a newer run, or cancelled
        job_ = nullptr;
        busy_->hide();
        cancel_->hide();
        diag_ = outcome->diag;
        showDiagnostics(outcome->problem, outcome->points, true, outcome->rows);
    });
    diag_.reset();
    showDiagnostics(QString());  // the checks of an earlier fit never stay on show under this note
    busy_->show();
    cancel_->setText(tr("Cancel"));
    cancel_->setToolTip(tr("Stop computing the checks"));
    cancel_->show();
    note_->setText(
        tr("Computing the checks of %1 rows…").arg(countText(static_cast<long long>(run_->design.X.rows()))));
    job_->start([run = run_, outcome](const BackgroundJob::Progress&) {
        try {
            outcome->diag = std::make_shared<const Diagnostics>(
                moderato::diagnostics(run->design, run->sample_fit ? *run->sample_fit : run->fit));
            outcome->rows = std::make_shared<const RowNumbers>(rowNumbers(*run));
            for (auto kind : {DiagnosticPlot::Residuals, DiagnosticPlot::Quantiles, DiagnosticPlot::Influence})
                outcome->points.push_back(std::make_shared<const DiagnosticPoints>(
                    DiagnosticPlot::points(kind, *outcome->diag, *outcome->rows)));
        } catch (const std::exception& e) {
            outcome->diag.reset();
            outcome->points.clear();
            outcome->rows.reset();
            outcome->problem =
                ChecksSection::tr("The checks could not be computed: %1").arg(QString::fromUtf8(e.what()));
        }
    });
}

void ChecksSection::dropWorker() {
    if (!job_) return;
    ++generation_;  // its result is dropped when it arrives
    job_->cancel();
    job_ = nullptr;
    busy_->hide();
    cancel_->hide();
}

void ChecksSection::cancel() {
    if (!job_) return;
    dropWorker();
    dirty_ = true;  // still due: "Compute again", or the next time the section is shown
    note_->setText(tr("The checks were cancelled."));
    cancel_->setText(tr("Compute again"));
    cancel_->setToolTip(tr("Compute the checks of this fit"));
    cancel_->show();
}

void ChecksSection::showDiagnostics(const QString& problem,
                                    const std::vector<std::shared_ptr<const DiagnosticPoints>>& points, bool staged,
                                    std::shared_ptr<const RowNumbers> rows) {
    const int shown = ++shown_;  // a plot still due from an earlier call is not drawn
    plotsDue_ = false;
    if (!rows) rows = std::make_shared<const RowNumbers>(diag_ ? rowNumbers(*run_) : RowNumbers{});
    if (staged && diag_ && points.size() == 3) {
        plotsDue_ = true;
        drawPlotLater(0, shown, rows, points);
    } else {
        DiagnosticPlot* const plots[] = {residuals_, quantiles_, influence_};
        for (std::size_t k = 0; k < 3; ++k)
            plots[k]->setDiagnostics(plotted(k), *rows, k < points.size() ? points[k] : nullptr);
        if (staged) Q_EMIT computed();
    }
    const bool ml = diag_ && diag_->multilevel;
    influence_->setVisible(!ml);
    influenceNote_->setVisible(ml);
    list_->setColumnHidden(FlaggedRowsModel::Leverage, ml);
    list_->setColumnHidden(FlaggedRowsModel::Cooks, ml);
    model_->setDiagnostics(diag_, run_ ? run_->table : nullptr);
    list_->resizeColumnsToContents();  // sized from at most kListSizingRows rows (set up in the constructor)
    show_->setEnabled(false);
    if (!diag_) {
        note_->setText(problem);
        rules_->clear();
        return;
    }
    QString note = noteText(*diag_);
    if (run_ && run_->sample_fit)  // a fit in the database: the checks see the sample only
        note = tr("These checks use the random sample of %1 rows read for plots; the estimates use all %2 rows "
                  "in the database.")
                   .arg(countText(static_cast<long long>(run_->sample_fit->n)),
                        countText(static_cast<long long>(run_->fit.n))) +
               QLatin1Char(' ') + note;
    note_->setText(note);
    rules_->setText(rulesText(*diag_));
}

void ChecksSection::drawPlotLater(std::size_t k, int shown, std::shared_ptr<const RowNumbers> rows,
                                  std::vector<std::shared_ptr<const DiagnosticPoints>> points) {
    // One plot a turn of the event loop, built in one turn and painted in the
    // next: drawing a dense plot takes a while, and the window answers in
    // between. computed() follows the last painting.
    QTimer::singleShot(0, this, [this, k, shown, rows = std::move(rows), points = std::move(points)] {
        if (shown != shown_) return;  // the section has shown something else since
        if (k == points.size()) {
            plotsDue_ = false;
            Q_EMIT computed();
            return;
        }
        DiagnosticPlot* const plots[] = {residuals_, quantiles_, influence_};
        plots[k]->setDiagnostics(plotted(k), *rows, points[k], true);
        // The painting was posted just now, so it comes in the next turn; the
        // next plot one turn after it (events posted during a turn wait for the next).
        QTimer::singleShot(0, this, [=, this] { drawPlotLater(k + 1, shown, rows, points); });
    });
}

RowNumbers ChecksSection::rowNumbers(const AnalysisRun& run) {
    // As the flagged-rows list names them: the file line when the table
    // knows it, else the row of the dataset (1-based).
    RowNumbers r;
    const Table* table = run.table.get();
    const bool lines = table && !table->row_lines.empty();
    const std::size_t n = static_cast<std::size_t>(run.design.X.rows());
    r.number.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        const std::size_t row = run.design.rows.empty() ? i : run.design.rows[i];
        r.number[i] = lines && row < table->row_lines.size() ? static_cast<double>(table->row_lines[row])
                                                             : static_cast<double>(row + 1);
    }
    const QString file = table ? QFileInfo(QString::fromStdString(table->source)).fileName() : QString();
    r.word = lines ? tr("line") : tr("row");
    r.axisTitle = lines && !file.isEmpty() ? tr("line of %1").arg(file) : tr("row of the dataset");
    return r;
}

namespace {

// The IRLS weights of a generalized fit, which its leverage uses.
QString workingWeights(Family f) {
    switch (f) {
        case Family::Logistic:
            return ChecksSection::tr("p(1 − p)");
        case Family::Probit:
            return ChecksSection::tr("φ(η)² / (p(1 − p))");
        case Family::Poisson:
            return ChecksSection::tr("μ");
        case Family::NegativeBinomial:
            return ChecksSection::tr("μ / (1 + αμ)");
        case Family::Linear:
            break;
    }
    return {};
}

}  // namespace

QString ChecksSection::noteText(const Diagnostics& d) const {
    if (d.multilevel) return multilevelNoteText(d);
    QStringList note;
    const QString bins =
        tr("The squares are the mean residual in bins of the fitted value, each with its 95% interval: where "
           "an interval misses the zero line, the residuals there average away from zero and the model misses a "
           "pattern (with many bins, about one interval in twenty misses zero by chance alone).");
    if (generalized(d.family)) {
        note << tr("%1 fit: %2s against the %3.")
                    .arg(familyTitle(d.family), QString::fromStdString(d.plot_residual_name),
                         QString::fromStdString(d.fitted_name))
             << bins
             << tr("The quantile plot uses %1s, which for %2 need not follow the line closely: look for isolated "
                   "points. Leverage uses the fit's working weights %3.")
                    .arg(QString::fromStdString(d.quantile_residual_name),
                         binary_outcome(d.family) ? tr("a 0/1 outcome") : tr("small counts"), workingWeights(d.family));
    } else {
        note << (d.weighted ? tr("Weighted fit: residuals are scaled by the square root of the weight.")
                            : tr("Residuals against fitted values: a funnel shape means the spread changes."))
             << bins
             << tr("Quantile plot: externally studentised residuals against normal quantiles; points near the "
                   "line y = x suggest roughly normal errors.");
    }
    note << tr(
        "Influence: Cook's distance and leverage of each row, in the order of the data; the dashed line "
        "is the rule that flags rows, and the largest rows above it are labelled.");
    for (const auto& n : d.notes) note << QString::fromStdString(n);
    return note.join(QLatin1Char(' '));
}

QString ChecksSection::multilevelNoteText(const Diagnostics& d) const {
    QStringList note;
    note << tr(
        "Multilevel fit: the residuals are conditional ones, each row's outcome minus the fixed part and its "
        "group's predicted effects, against the fitted values with those effects. The squares are the mean "
        "residual in bins of the fitted value, each with its 95% interval: where an interval misses the zero "
        "line, the model misses a pattern there. Quantile plot: the conditional residuals divided by the "
        "residual SD against normal quantiles; points near the line y = x suggest roughly normal errors "
        "within groups.");
    for (const auto& n : d.notes) note << QString::fromStdString(n);
    return note.join(QLatin1Char(' '));
}

QString ChecksSection::multilevelRulesText(const Diagnostics& d) const {
    const QString n = countText(static_cast<long long>(d.n));
    return tr("Rows are flagged by one rule of thumb (common practice, not a test), with %1 rows in the fit: "
              "standardised conditional residual beyond ±%2. %3 of %1 rows flagged, largest residual first.")
        .arg(n, numberText(d.rules.residual_limit), countText(static_cast<long long>(d.flagged.size())));
}

QString ChecksSection::rulesText(const Diagnostics& d) const {
    if (d.multilevel) return multilevelRulesText(d);
    // The rules core applies (diagnostics.hpp, DiagnosticRules), in words.
    const QString n = countText(static_cast<long long>(d.n));
    const QString residual =
        generalized(d.family) ? QString::fromStdString(d.check_residual_name) : tr("externally studentised residual");
    auto multiple = [](double v) { return v == std::round(v) ? countText(static_cast<long long>(v)) : numberText(v); };
    QString rules =
        tr("Rows are flagged by rules of thumb (common practice, not tests), with %1 rows in the fit and %2 "
           "estimated coefficients: %3 beyond ±%4 · leverage above %5 × %2 / %1 = %6 · Cook's distance above "
           "%7 / %1 = %8.")
            .arg(n, countText(static_cast<long long>(d.p)), residual, multiple(d.rules.residual_limit),
                 multiple(d.rules.leverage_multiple), numberText(d.leverage_threshold),
                 multiple(d.rules.cooks_numerator), numberText(d.cooks_threshold));
    rules += QLatin1Char(' ') + tr("%1 of %2 rows flagged, most influential first.")
                                    .arg(countText(static_cast<long long>(d.flagged.size())), n);
    if (d.n > 20000) rules += QLatin1Char(' ') + tr("Dense plots are thinned; flagged rows are always drawn.");
    return rules;
}

void ChecksSection::selectionChanged() {
    std::vector<std::size_t> obs;
    for (const QModelIndex& i : list_->selectionModel()->selectedRows())
        if (const FlaggedRow* r = model_->flagged(i.row())) obs.push_back(r->observation);
    show_->setEnabled(!obs.empty());
    for (DiagnosticPlot* p : {residuals_, quantiles_, influence_}) p->setHighlighted(obs);
}

void ChecksSection::emitSelectedRows() {
    std::vector<std::size_t> rows;
    for (const QModelIndex& i : list_->selectionModel()->selectedRows())
        if (const FlaggedRow* r = model_->flagged(i.row())) rows.push_back(r->table_row);
    if (rows.empty()) return;
    std::sort(rows.begin(), rows.end());
    rows.erase(std::unique(rows.begin(), rows.end()), rows.end());
    const Analysis* a = doc_->analysis(id_);
    if (!a) return;
    Q_EMIT rowsSelected(QString::fromStdString(a->dataset), rows);
}

void ChecksSection::selectObservation(std::size_t observation) {
    const int row = model_->rowOf(observation);
    if (row < 0) return;
    list_->selectRow(row);
    list_->scrollTo(model_->index(row, 0));
}

}  // namespace moderato::ui
