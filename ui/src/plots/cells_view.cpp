#include "plots/cells_view.hpp"

#include <qcustomplot.h>
#include <QApplication>
#include <QClipboard>
#include <QHBoxLayout>
#include <QHeaderView>
#include <QLabel>
#include <QPushButton>
#include <QSplitter>
#include <QStandardItemModel>
#include <QTableView>
#include <QVBoxLayout>
#include <cmath>

#include "common/figure_caption.hpp"
#include "common/number_text.hpp"
#include "common/table_clipboard.hpp"
#include "plots/plot_style.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

// The house order of an estimate (as in the memo's tables and the Probe section):
// the estimate, its interval, SE, test value, p.
enum Col { cItem = 0, cN, cObserved, cEstimate, cLower, cUpper, cSe, cStat, cP, cExp, cExpLower, cExpUpper };

QStandardItem* numberItem(const QString& text) {
    auto* item = new QStandardItem(text);
    item->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
    return item;
}

// "age = 41.2, region = North": categorical columns by their level name.
QString held(const CellTable& c, const Design& d) {
    QStringList parts;
    for (const auto& [col, v] : c.held) {
        QString value = numberText(v);
        if (const CategoricalInfo* info = d.categorical(col)) {
            const auto k = static_cast<std::size_t>(std::llround(v));
            if (k < info->levels.size()) value = QString::fromStdString(info->levels[k]);
        }
        parts << QStringLiteral("%1 = %2").arg(QString::fromStdString(col), value);
    }
    return parts.join(QStringLiteral(", "));
}

}  // namespace

CellsView::CellsView(QWidget* parent)
    : QWidget(parent),
      plot_(new QCustomPlot(this)),
      table_(new QTableView(this)),
      model_(new QStandardItemModel(this)),
      note_(new QLabel(this)),
      copy_(new QPushButton(tr("Copy table"), this)) {
    setObjectName(QStringLiteral("cells-view"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    splitter_ = new QSplitter(Qt::Horizontal, this);
    auto* splitter = splitter_;
    splitter->addWidget(plot_);
    auto* side = new QWidget(this);
    auto* sideLayout = new QVBoxLayout(side);
    sideLayout->setContentsMargins(4, 0, 0, 0);
    table_->setObjectName(QStringLiteral("cell-table"));
    table_->setModel(model_);
    table_->setSelectionBehavior(QAbstractItemView::SelectItems);
    table_->setSelectionMode(QAbstractItemView::ExtendedSelection);
    table_->setEditTriggers(QAbstractItemView::NoEditTriggers);
    table_->verticalHeader()->hide();
    table_->verticalHeader()->setDefaultSectionSize(table_->fontMetrics().height() + 6);
    table_->setWordWrap(false);
    table_->setAlternatingRowColors(false);
    table_->setShowGrid(false);
    sideLayout->addWidget(table_, 1);
    note_->setWordWrap(true);
    note_->setObjectName(QStringLiteral("cell-table-note"));
    note_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    sideLayout->addWidget(note_);
    auto* buttons = new QHBoxLayout;
    buttons->addStretch(1);
    copy_->setObjectName(QStringLiteral("copy-cell-table"));
    copy_->setToolTip(tr("Copy the whole cell table as tab-separated text (Ctrl+C copies the selected cells)"));
    buttons->addWidget(copy_);
    sideLayout->addLayout(buttons);
    splitter->addWidget(side);
    splitter->setStretchFactor(0, 5);
    splitter->setStretchFactor(1, 6);
    splitter->setSizes({450, 550});
    layout->addWidget(splitter);
    connect(copy_, &QPushButton::clicked, this, [this] { QApplication::clipboard()->setText(tableText()); });

    stylePlot(plot_, font());
    plot_->plotLayout()->insertRow(0);
    title_ = new QCPTextElement(plot_, QString(), font());
    title_->setTextColor(estuary::ink);
    plot_->plotLayout()->addElement(0, 0, title_);
    // The legend below the plot, one row.
    auto* legendRect = new QCPLayoutGrid;
    plot_->plotLayout()->addElement(2, 0, legendRect);
    plot_->legend->setVisible(true);
    plot_->legend->setFillOrder(QCPLayoutGrid::foColumnsFirst);
    plot_->legend->setWrap(4);
    plot_->legend->setBorderPen(Qt::NoPen);
    legendRect->addElement(0, 0, plot_->legend);
    legendRect->setMargins(QMargins(0, 0, 0, 4));
    plot_->plotLayout()->setRowStretchFactor(2, 0.001);
    plot_->xAxis->grid()->setVisible(false);
    copy_->setEnabled(false);
}

void CellsView::setRun(const Analysis& analysis, const AnalysisRun& run) {
    if (!run.cells) {
        clear();
        return;
    }
    cells_ = *run.cells;
    logistic_ = run.cells->family == Family::Logistic;
    probability_ = logistic_ && analysis.probe.scale == ProbeScale::Outcome;
    outcome_ = QString::fromStdString(analysis.roles.outcome);
    held_ = held(*cells_, run.design);
    seText_ = seDescription(analysis, run);
    fillTable();
    redraw();
}

void CellsView::clear() {
    cells_.reset();
    fillTable();
    redraw();
}

void CellsView::setGreyscale(bool on) {
    greyscale_ = on;
    redraw();
}

void CellsView::resizeEvent(QResizeEvent* event) {
    QWidget::resizeEvent(event);
    // The table beside the plot when there is room for both, else under it.
    const Qt::Orientation o = width() >= 1300 ? Qt::Horizontal : Qt::Vertical;
    if (splitter_->orientation() != o) {
        splitter_->setOrientation(o);
        const int total = o == Qt::Horizontal ? width() : height();
        splitter_->setSizes(o == Qt::Horizontal ? QList<int>{total * 9 / 20, total * 11 / 20}
                                                : QList<int>{total * 11 / 20, total * 9 / 20});
    }
}

QString CellsView::tableText() const { return modelAsTsv(model_); }

void CellsView::redraw() {
    plot_->clearPlottables();
    plot_->clearItems();
    series_.clear();
    bars_.clear();
    observed_.clear();
    if (!cells_) {
        title_->setText(QString());
        plot_->legend->setVisible(false);
        plot_->replot();
        return;
    }
    const CellTable& c = *cells_;
    const int rows = static_cast<int>(c.row_levels.size()), cols = static_cast<int>(c.column_levels.size());
    const bool showObserved = !logistic_ || probability_;
    drawTitleAndAxes(c);

    // One series a column level, dodged around each row level.
    const double spacing = cols > 1 ? std::min(0.12, 0.45 / (cols - 1)) : 0.0;
    double lo = INFINITY, hi = -INFINITY;
    for (int k = 0; k < cols; ++k) drawSeries(c, k, spacing, showObserved, lo, hi);
    if (showObserved) {
        // One legend entry for all observed means, in ink.
        auto* key = new QCPGraph(plot_->xAxis, plot_->yAxis);
        key->setName(logistic_ ? tr("observed share (hollow)") : tr("observed mean (hollow)"));
        key->setLineStyle(QCPGraph::lsNone);
        key->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, QPen(estuary::ink, 1.2), Qt::NoBrush, 6));
    }
    plot_->legend->setVisible(true);
    plot_->xAxis->setRange(-0.5, rows - 0.5);
    if (std::isfinite(lo) && std::isfinite(hi)) {
        const double pad = hi > lo ? 0.08 * (hi - lo) : 1.0;
        plot_->yAxis->setRange(lo - pad, hi + pad);
    }
    plot_->replot();
}

void CellsView::drawTitleAndAxes(const CellTable& c) {
    const int rows = static_cast<int>(c.row_levels.size());
    const QString rowF = QString::fromStdString(c.row_factor);
    QString what;
    if (probability_) what = tr("Predicted probability that %1 = 1").arg(outcome_);
    else if (logistic_) what = tr("Predicted log-odds that %1 = 1").arg(outcome_);
    else what = tr("Predicted %1").arg(outcome_);
    title_->setText(tr("%1 in each cell, with %2 intervals").arg(what, levelText(c.level)));

    auto* ticker = new QCPAxisTickerText;
    for (int i = 0; i < rows; ++i)
        ticker->addTick(i, QString::fromStdString(c.row_levels[static_cast<std::size_t>(i)]));
    plot_->xAxis->setTicker(QSharedPointer<QCPAxisTicker>(ticker));
    plot_->xAxis->setSubTicks(false);
    plot_->xAxis->setTickLength(0, 4);
    setAxisTitle(plot_->xAxis, rowF);
    setAxisTitle(plot_->yAxis, probability_ ? tr("P(%1 = 1)").arg(outcome_)
                                            : (logistic_ ? tr("log-odds of %1 = 1").arg(outcome_) : outcome_));
}

void CellsView::drawSeries(const CellTable& c, int k, double spacing, bool showObserved, double& lo, double& hi) {
    const int rows = static_cast<int>(c.row_levels.size()), cols = static_cast<int>(c.column_levels.size());
    const QString colF = QString::fromStdString(c.column_factor);
    const double dodge = (k - (cols - 1) / 2.0) * spacing;
    QVector<double> x, y, minus, plus, ox, oy;
    for (int i = 0; i < rows; ++i) {
        const Cell& cell = c.at(static_cast<std::size_t>(i), static_cast<std::size_t>(k));
        const double est = probability_ ? cell.probability : cell.estimate;
        const double l = probability_ ? cell.probability_lower : cell.ci_lower;
        const double u = probability_ ? cell.probability_upper : cell.ci_upper;
        x << i + dodge;
        y << est;
        minus << est - l;
        plus << u - est;
        if (std::isfinite(l)) lo = std::min(lo, l);
        if (std::isfinite(u)) hi = std::max(hi, u);
        if (showObserved && cell.n > 0 && std::isfinite(cell.observed_mean)) {
            ox << i + dodge + spacing * 0.45 + 0.04;
            oy << cell.observed_mean;
            lo = std::min(lo, cell.observed_mean);
            hi = std::max(hi, cell.observed_mean);
        }
    }
    const QColor colour = greyscale_ ? estuary::toGrey(estuary::series(k)) : estuary::series(k);
    auto* g = new QCPGraph(plot_->xAxis, plot_->yAxis);
    g->setName(
        QStringLiteral("%1 = %2").arg(colF, QString::fromStdString(c.column_levels[static_cast<std::size_t>(k)])));
    g->setPen(estuary::seriesPen(k, 2.0, greyscale_));
    g->setScatterStyle(
        QCPScatterStyle(static_cast<QCPScatterStyle::ScatterShape>(estuary::markerShape(k)), colour, colour, 8));
    g->setData(x, y, true);
    auto* bars = new QCPErrorBars(plot_->xAxis, plot_->yAxis);
    bars->removeFromLegend();
    bars->setDataPlottable(g);
    bars->setErrorType(QCPErrorBars::etValueError);
    bars->setData(minus, plus);
    QPen barPen(colour);
    barPen.setWidthF(1.4);
    bars->setPen(barPen);
    bars->setWhiskerWidth(8);
    bars->setSymbolGap(9);
    series_.push_back(g);
    bars_.push_back(bars);
    auto* obs = new QCPGraph(plot_->xAxis, plot_->yAxis);
    obs->setName(tr("observed mean"));
    obs->setLineStyle(QCPGraph::lsNone);
    obs->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, QPen(colour, 1.2), Qt::NoBrush, 6));
    obs->setData(ox, oy, true);
    obs->removeFromLegend();
    observed_.push_back(obs);
}

void CellsView::fillTable() {
    model_->clear();
    copy_->setEnabled(cells_.has_value());
    if (!cells_) {
        note_->clear();
        return;
    }
    const CellTable& c = *cells_;
    setTableHeader(c);
    const QString rowF = QString::fromStdString(c.row_factor), colF = QString::fromStdString(c.column_factor);
    appendSection(logistic_ ? tr("Cells: %1, %2 (predicted log-odds; probability = inverse logit)").arg(rowF, colF)
                            : tr("Cells: %1, %2 (predicted mean)").arg(rowF, colF));
    for (const Cell& cell : c.cells) appendCell(cell);
    appendEffects(c.row_effects, rowF);
    appendEffects(c.column_effects, colF);
    if (!c.interactions.empty()) {
        appendSection(logistic_ ? tr("Interaction contrasts of %1 by %2 (difference in differences of log-odds; "
                                     "ratio of odds ratios)")
                                      .arg(rowF, colF)
                                : tr("Interaction contrasts of %1 by %2 (difference in differences)").arg(rowF, colF));
        for (const InteractionContrast& ic : c.interactions) {
            const QString label =
                QStringLiteral("(%1 − %2) at %3 minus at %4")
                    .arg(QString::fromStdString(ic.row_level), QString::fromStdString(c.row_levels.front()),
                         QString::fromStdString(ic.column_level), QString::fromStdString(c.column_levels.front()));
            appendInference(label, ic.estimate, ic.std_error, ic.statistic, ic.p_value, ic.ci_lower, ic.ci_upper,
                            ic.odds_ratio, ic.odds_ratio_lower, ic.odds_ratio_upper, ic.estimable);
        }
    }
    appendSection(tr("Joint test of the interaction"));
    appendJointTest(c);
    fitLabelColumn();
    fillNote(c);
}

void CellsView::setTableHeader(const CellTable& c) {
    const QString stat = std::isinf(c.df) || logistic_ ? QStringLiteral("z") : QStringLiteral("t");
    const QString joint = logistic_ ? QStringLiteral("χ²") : QStringLiteral("F");
    const QString lvl = levelText(c.level);
    QStringList header{QString(),
                       tr("n"),
                       logistic_ ? tr("observed share") : tr("observed mean"),
                       logistic_ ? tr("estimate (log-odds)") : tr("estimate"),
                       tr("%1 low").arg(lvl),
                       tr("%1 high").arg(lvl),
                       tr("SE"),
                       QStringLiteral("%1 / %2").arg(stat, joint),
                       tr("p")};
    if (logistic_) header << tr("probability / odds ratio") << tr("lower") << tr("upper");
    model_->setHorizontalHeaderLabels(header);
}

void CellsView::appendSection(const QString& text) {
    const int ncol = model_->columnCount();
    QList<QStandardItem*> row;
    auto* item = new QStandardItem(text);
    QFont f = item->font();
    f.setBold(true);
    item->setFont(f);
    row << item;
    for (int k = 1; k < ncol; ++k) row << new QStandardItem;
    model_->appendRow(row);
    table_->setSpan(model_->rowCount() - 1, 0, 1, ncol);
}

void CellsView::appendInference(const QString& label, double est, double se, double st, double p, double lo, double hi,
                                double e, double el, double eh, bool estimable) {
    const int ncol = model_->columnCount();
    QList<QStandardItem*> row;
    row << new QStandardItem(label) << numberItem(QString()) << numberItem(QString());
    if (!estimable) {
        row << numberItem(tr("not estimable"));
        for (int k = cLower; k < ncol; ++k) row << numberItem(QString());
    } else {
        row << numberItem(numberText(est)) << numberItem(numberText(lo)) << numberItem(numberText(hi))
            << numberItem(numberText(se)) << numberItem(numberText(st)) << numberItem(pValueText(p));
        if (logistic_) row << numberItem(numberText(e)) << numberItem(numberText(el)) << numberItem(numberText(eh));
    }
    model_->appendRow(row);
}

void CellsView::appendCell(const Cell& cell) {
    const int ncol = model_->columnCount();
    QList<QStandardItem*> row;
    row << new QStandardItem(QStringLiteral("%1, %2").arg(QString::fromStdString(cell.row_level),
                                                          QString::fromStdString(cell.column_level)))
        << numberItem(countText(static_cast<long long>(cell.n)))
        << numberItem(cell.n ? numberText(cell.observed_mean) : QStringLiteral("—"));
    if (!cell.estimable) {
        row << numberItem(tr("not estimable"));
        for (int k = cLower; k < ncol; ++k) row << numberItem(QString());
    } else {
        row << numberItem(numberText(cell.estimate)) << numberItem(numberText(cell.ci_lower))
            << numberItem(numberText(cell.ci_upper)) << numberItem(numberText(cell.std_error)) << numberItem(QString())
            << numberItem(QString());
        if (logistic_)
            row << numberItem(numberText(cell.probability)) << numberItem(numberText(cell.probability_lower))
                << numberItem(numberText(cell.probability_upper));
    }
    model_->appendRow(row);
}

void CellsView::appendEffects(const std::vector<SimpleEffect>& list, const QString& factor) {
    if (list.empty()) return;
    appendSection(logistic_ ? tr("Simple effects of %1 (log-odds difference; odds ratio)").arg(factor)
                            : tr("Simple effects of %1 (difference in predicted means)").arg(factor));
    for (const SimpleEffect& e : list) {
        const QString label = QStringLiteral("%1 − %2, at %3")
                                  .arg(QString::fromStdString(e.level), QString::fromStdString(e.reference),
                                       QString::fromStdString(e.at_level));
        appendInference(label, e.estimate, e.std_error, e.statistic, e.p_value, e.ci_lower, e.ci_upper, e.odds_ratio,
                        e.odds_ratio_lower, e.odds_ratio_upper, e.estimable);
    }
}

void CellsView::appendJointTest(const CellTable& c) {
    const int ncol = model_->columnCount();
    QList<QStandardItem*> row;
    if (c.interaction_test) {
        const WaldTest& w = *c.interaction_test;
        const bool chi = std::isinf(w.df2);
        const QString label = chi ? tr("Wald χ²(%1), all product terms").arg(numberText(w.df1))
                                  : tr("Wald F(%1, %2), all product terms").arg(numberText(w.df1), numberText(w.df2));
        row << new QStandardItem(label);
        while (row.size() < cStat) row << numberItem(QString());
        row << numberItem(numberText(chi ? w.chi_square : w.statistic)) << numberItem(pValueText(w.p_value));
    } else {
        row << new QStandardItem(tr("not available: a product term is aliased"));
    }
    while (row.size() < ncol) row << numberItem(QString());
    model_->appendRow(row);
}

// The first column fits its row labels; section headings span the row.
void CellsView::fitLabelColumn() {
    table_->resizeColumnsToContents();
    int labelWidth = 60;
    const QFontMetrics fm(table_->font());
    for (int r = 0; r < model_->rowCount(); ++r)
        if (table_->columnSpan(r, cItem) == 1)
            labelWidth = std::max(labelWidth, fm.horizontalAdvance(model_->item(r, cItem)->text()) + 16);
    table_->setColumnWidth(cItem, std::min(labelWidth, 360));
}

void CellsView::fillNote(const CellTable& c) {
    const bool linear = !logistic_;
    const QString lvl = levelText(c.level);
    QStringList notes;
    notes << tr("Scale: %1. SEs: %2. Intervals: %3.")
                 .arg(linear ? tr("the outcome's mean") : tr("log-odds (probabilities by the inverse logit)"),
                      seText_.isEmpty() ? QString::fromLatin1(to_string(c.covariance)) : seText_, lvl);
    if (c.notes.empty() && !held_.isEmpty()) notes << tr("Other predictors held at %1.").arg(held_);
    for (const auto& n : c.notes) {
        QString text = QString::fromStdString(n);
        if (!text.isEmpty()) text[0] = text[0].toUpper();
        if (!text.endsWith(QLatin1Char('.'))) text += QLatin1Char('.');
        notes << text;
    }
    if (c.interactions.size() > 1) notes << tr("Several contrasts: read their p-values with multiple testing in mind.");
    note_->setText(notes.join(QLatin1Char(' ')));
}

}  // namespace moderato::ui
