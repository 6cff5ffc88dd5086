// The Surface plot, the Cells plot with its cell table, and the Checks
// section, driven through the main window on the sample projects. Every
// number drawn is compared with the same quantity computed directly through
// core in the test (core cell_table, surface_grid, diagnostics on a design
// and fit built here from the project file), and the flag list with the
// rules of thumb (common practice: |studentised residual| > 3, leverage >
// 3p/n, Cook's distance > 4/n) applied here to core's diagnostics.
//
// Set MODERATO_SCREENSHOT_DIR to also save a PNG of each widget there.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QApplication>
#include <QClipboard>
#include <QDir>
#include <QHeaderView>
#include <QLabel>
#include <QPushButton>
#include <QSignalSpy>
#include <QStandardItemModel>
#include <QTableView>
#include <QTest>
#include <cmath>
#include <map>
#include <set>

#include "data/dataset_page.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/estimation/diagnostics.hpp"
#include "moderato/probing/surface_view.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/csv.hpp"
#include "plots/cells_view.hpp"
#include "plots/diagnostic_plots.hpp"
#include "plots/scatter_thinning.hpp"
#include "plots/surface_plot.hpp"
#include "sections/checks_section.hpp"
#include "sections/flagged_rows_model.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// The analysis as core sees it straight from the project file.
struct Direct {
    LoadedProject loaded;
    Analysis analysis;
    std::shared_ptr<const Table> table;
    Design design;
    FitResult fit;
};

Direct direct(const QString& name) {
    Direct d{load_project(test::sampleProject(name).toStdString()), {}, {}, {}, {}};
    d.analysis = d.loaded.project.analyses.front();
    d.table = std::make_shared<const Table>(*d.loaded.tables.at(d.analysis.dataset));
    d.design = build_design(*d.table, model_spec(d.analysis));
    d.fit = fit_design(d.design, model_spec(d.analysis));
    return d;
}

std::shared_ptr<const AnalysisRun> openAndRun(MainWindow& w, const QString& name) {
    w.setInteractive(false);
    if (!w.openProject(test::sampleProject(name))) {
        ADD_FAILURE() << w.lastMessage().toStdString();
        return nullptr;
    }
    const QString id = w.analysisPage()->analysisId();
    if (!test::waitUntil([&] { return w.runner()->result(id) || !w.runner()->error(id).isEmpty(); })) return nullptr;
    return w.runner()->result(id);
}

void screenshot(QWidget* widget, const QString& file) {
    const QString dir = qEnvironmentVariable("MODERATO_SCREENSHOT_DIR");
    if (dir.isEmpty()) return;
    QDir().mkpath(dir);
    QCoreApplication::processEvents();  // let layouts settle
    widget->grab().save(QDir(dir).filePath(file));
}

}  // namespace

TEST(CellsView, VolunteerOnboardingSeriesMatchCoreCellTable) {
    MainWindow w;
    const auto run = openAndRun(w, QStringLiteral("volunteer-onboarding"));
    ASSERT_TRUE(run);
    ASSERT_TRUE(run->cells.has_value());
    const Direct d = direct(QStringLiteral("volunteer-onboarding"));
    // core cell_table on the design and fit built here
    const CellTable ref = cell_table(d.design, d.fit, d.analysis.roles.focal, d.analysis.roles.moderator);

    CellsView view;
    view.resize(1000, 760);
    view.setRun(*w.document()->analysis(w.analysisPage()->analysisId()), *run);
    view.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&view));
    EXPECT_FALSE(view.showsProbability());
    ASSERT_EQ(view.seriesCount(), static_cast<int>(ref.column_levels.size()));  // one series per moderator level
    const std::size_t rows = ref.row_levels.size();
    for (int k = 0; k < view.seriesCount(); ++k) {
        SCOPED_TRACE(ref.column_levels[static_cast<std::size_t>(k)]);
        QCPGraph* g = view.seriesGraph(k);
        EXPECT_TRUE(g->name().contains(QString::fromStdString(ref.column_levels[static_cast<std::size_t>(k)])));
        ASSERT_EQ(g->data()->size(), static_cast<int>(rows));
        QCPErrorBars* bars = view.seriesBars(k);
        ASSERT_EQ(bars->dataCount(), static_cast<int>(rows));
        // the same colour as the legend's series k, joined by a line
        EXPECT_EQ(g->lineStyle(), QCPGraph::lsLine);
        for (std::size_t i = 0; i < rows; ++i) {
            const Cell& c = ref.at(i, static_cast<std::size_t>(k));
            const auto it = g->data()->at(static_cast<int>(i));
            // x: the focal level i (dodged by less than half a step)
            EXPECT_NEAR(it->key, static_cast<double>(i), 0.3);
            EXPECT_NEAR(it->value, c.estimate, 1e-12 * std::abs(c.estimate));  // core cell_table
            const QCPErrorBarsData e = bars->data()->at(static_cast<int>(i));
            EXPECT_NEAR(it->value - e.errorMinus, c.ci_lower, 1e-9);  // whisker ends = core CI
            EXPECT_NEAR(it->value + e.errorPlus, c.ci_upper, 1e-9);
        }
        // observed means (hollow) equal core's per-cell means
        QCPGraph* obs = view.observedGraph(k);
        ASSERT_EQ(obs->data()->size(), static_cast<int>(rows));
    }
    // parallel vs not: the joined lines' slopes differ by the interaction contrast (2 x 2)
    ASSERT_EQ(ref.interactions.size(), 1u);
    const double slope0 = view.seriesGraph(0)->data()->at(1)->value - view.seriesGraph(0)->data()->at(0)->value;
    const double slope1 = view.seriesGraph(1)->data()->at(1)->value - view.seriesGraph(1)->data()->at(0)->value;
    EXPECT_NEAR(slope1 - slope0, ref.interactions.front().estimate, 1e-9);

    // The cell table: cells, simple effects, the contrast and the joint test.
    const QString tsv = view.tableText();
    EXPECT_TRUE(tsv.contains(QStringLiteral("Joint test of the interaction")));
    EXPECT_TRUE(tsv.contains(QStringLiteral("Interaction contrasts")));
    EXPECT_TRUE(tsv.contains(QStringLiteral("Simple effects of %1").arg(QString::fromStdString(ref.row_factor))));
    QStandardItemModel* m = view.tableModel();
    int cellRows = 0;
    for (int r = 0; r < m->rowCount(); ++r) {
        const QString label = m->item(r, 0)->text();
        for (const Cell& c : ref.cells)
            if (label == QStringLiteral("%1, %2").arg(QString::fromStdString(c.row_level),
                                                      QString::fromStdString(c.column_level))) {
                ++cellRows;
                EXPECT_EQ(m->item(r, 1)->text().toULongLong(), c.n);
                EXPECT_NEAR(m->item(r, 3)->text().toDouble(), c.estimate, 5e-4 * std::abs(c.estimate));
            }
        if (label.startsWith(QStringLiteral("Wald F"))) {
            ASSERT_TRUE(ref.interaction_test.has_value());
            EXPECT_NEAR(m->item(r, 5)->text().toDouble(), ref.interaction_test->statistic,
                        5e-4 * ref.interaction_test->statistic);
        }
    }
    EXPECT_EQ(cellRows, static_cast<int>(ref.cells.size()));

    // "Copy table" puts the whole table on the clipboard as tab-separated text.
    QApplication::clipboard()->clear();
    QTest::mouseClick(view.findChild<QPushButton*>(QStringLiteral("copy-cell-table")), Qt::LeftButton);
    EXPECT_EQ(QApplication::clipboard()->text(), tsv);
    EXPECT_EQ(tsv.count(QLatin1Char('\n')), m->rowCount() + 1);
    screenshot(&view, QStringLiteral("cells-volunteer-onboarding.png"));
    view.resize(1500, 520);  // wide: the table beside the plot
    screenshot(&view, QStringLiteral("cells-volunteer-onboarding-wide.png"));

    view.setGreyscale(true);
    const QColor c = view.seriesGraph(1)->pen().color();
    EXPECT_EQ(c.red(), c.green());
    EXPECT_EQ(c.green(), c.blue());
}

TEST(CellsView, LogisticProbabilityScaleShowsProbabilitiesAndOddsRatios) {
    // A logistic 2 x 2 design (tests/reference/fixtures/cells_logit_2x2.csv,
    // simulated by make_cells_reference.py).
    const std::string csv = std::string(MODERATO_TEST_DATA_DIR) + "/../reference/fixtures/cells_logit_2x2.csv";
    auto table = std::make_shared<const Table>(read_csv(csv, CsvOptions{}));
    Analysis a;
    a.id = "logit-cells";
    a.name = "format × mentor";
    a.dataset = "cells";
    a.roles.outcome = "renewed";
    a.roles.focal = "format";
    a.roles.moderator = "mentor";
    a.roles.controls = {"tenure"};
    a.family = Family::Logistic;
    a.probe.scale = ProbeScale::Outcome;
    const AnalysisRun run = run_analysis(table, a);
    ASSERT_TRUE(run.cells.has_value());
    // core cell_table on a design and fit built here
    const Design d = build_design(*table, model_spec(a));
    const CellTable ref = cell_table(d, fit_design(d, model_spec(a)), "format", "mentor");

    CellsView view;
    view.resize(1000, 760);
    view.setRun(a, run);
    ASSERT_TRUE(view.showsProbability());
    ASSERT_EQ(view.seriesCount(), 2);
    for (int k = 0; k < 2; ++k)
        for (int i = 0; i < 2; ++i) {
            const Cell& c = ref.at(static_cast<std::size_t>(i), static_cast<std::size_t>(k));
            const double v = view.seriesGraph(k)->data()->at(i)->value;
            EXPECT_NEAR(v, c.probability, 1e-12);  // core cell_table probability
            const QCPErrorBarsData e = view.seriesBars(k)->data()->at(i);
            EXPECT_NEAR(v - e.errorMinus, c.probability_lower, 1e-12);
            EXPECT_NEAR(v + e.errorPlus, c.probability_upper, 1e-12);
            // probability interval = inverse logit of the log-odds interval (closed form)
            EXPECT_NEAR(c.probability_upper, 1 / (1 + std::exp(-c.ci_upper)), 1e-14);
            // hollow markers: the observed share of 1s
            EXPECT_NEAR(view.observedGraph(k)->data()->at(i)->value, c.observed_mean, 1e-12);
        }
    QStandardItemModel* m = view.tableModel();
    EXPECT_EQ(m->horizontalHeaderItem(9)->text(), QStringLiteral("probability / odds ratio"));
    const QString tsv = view.tableText();
    EXPECT_TRUE(tsv.contains(QStringLiteral("ratio of odds ratios")));
    EXPECT_TRUE(tsv.contains(QStringLiteral("Wald χ²(1)")));
    int contrastRows = 0;
    for (int r = 0; r < m->rowCount(); ++r)
        if (m->item(r, 0)->text().startsWith(QStringLiteral("(onsite − online) at yes minus at no"))) {
            ++contrastRows;
            ASSERT_EQ(ref.interactions.size(), 1u);
            // ratio of odds ratios = exp(difference in differences) (closed form)
            EXPECT_NEAR(m->item(r, 9)->text().toDouble(), std::exp(ref.interactions[0].estimate),
                        5e-4 * std::exp(ref.interactions[0].estimate));
        }
    EXPECT_EQ(contrastRows, 1);
    view.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&view));
    screenshot(&view, QStringLiteral("cells-logistic.png"));
}

TEST(SurfacePlot, OrchardNitrogenColourMapMatchesCoreSurfaceGrid) {
    MainWindow w;
    const auto run = openAndRun(w, QStringLiteral("orchard-nitrogen"));
    ASSERT_TRUE(run);
    ASSERT_TRUE(run->surface.has_value());
    const Direct d = direct(QStringLiteral("orchard-nitrogen"));
    // core surface_grid on the design and fit built here (41 x 41, its default)
    const SurfaceGrid ref = surface_grid(d.design, d.fit, d.analysis.roles.focal, d.analysis.roles.moderator);
    const DataRegion region = data_region(d.design, d.analysis.roles.focal, d.analysis.roles.moderator);

    SurfacePlot plot;
    plot.resize(760, 520);
    plot.setRun(*w.document()->analysis(w.analysisPage()->analysisId()), *run);
    plot.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&plot));
    QCPColorMap* map = plot.colorMap();
    ASSERT_TRUE(map);
    ASSERT_EQ(map->data()->keySize(), static_cast<int>(ref.x_values.size()));
    ASSERT_EQ(map->data()->valueSize(), static_cast<int>(ref.z_values.size()));
    EXPECT_DOUBLE_EQ(map->data()->keyRange().lower, ref.x_values.front());
    EXPECT_DOUBLE_EQ(map->data()->keyRange().upper, ref.x_values.back());
    EXPECT_DOUBLE_EQ(map->data()->valueRange().lower, ref.z_values.front());
    EXPECT_DOUBLE_EQ(map->data()->valueRange().upper, ref.z_values.back());
    int beyond = 0;
    for (int i = 0; i < map->data()->keySize(); ++i)
        for (int k = 0; k < map->data()->valueSize(); ++k) {
            EXPECT_NEAR(map->data()->cell(i, k), ref.predicted(k, i), 1e-12 * std::abs(ref.predicted(k, i)));
            const bool outside =
                !region.contains(ref.x_values[static_cast<std::size_t>(i)], ref.z_values[static_cast<std::size_t>(k)]);
            beyond += outside;
            EXPECT_EQ(map->data()->alpha(i, k) < 255, outside) << i << "," << k;
        }
    EXPECT_EQ(plot.beyondCellCount(), beyond);
    EXPECT_GT(beyond, 0);  // random scatter never fills the corners of its bounding box
    EXPECT_EQ(plot.figurePlot()->xAxis->label(), QString::fromStdString(d.analysis.roles.focal));
    EXPECT_EQ(plot.figurePlot()->yAxis->label(), QString::fromStdString(d.analysis.roles.moderator));
    EXPECT_EQ(plot.colorScale()->axis()->label(), QString::fromStdString(d.analysis.roles.outcome));
    // "beyond the data" is named in the legend, beside the edge of the data
    QStringList legend;
    for (int i = 0; i < plot.figurePlot()->legend->itemCount(); ++i)
        if (auto* item = qobject_cast<QCPPlottableLegendItem*>(plot.figurePlot()->legend->item(i)))
            legend << item->plottable()->name();
    EXPECT_TRUE(legend.contains(QStringLiteral("beyond the data")));
    EXPECT_TRUE(legend.contains(QStringLiteral("edge of the observed data")));
    EXPECT_TRUE(plot.figurePlot()->legend->visible());
    screenshot(&plot, QStringLiteral("surface-orchard-nitrogen.png"));

    // Greyscale: the ramp's dark end is a grey.
    plot.setGreyscale(true);
    const QRgb top = plot.colorMap()->gradient().color(1.0, QCPRange(0, 1));
    EXPECT_EQ(qRed(top), qGreen(top));
    EXPECT_EQ(qGreen(top), qBlue(top));
    screenshot(&plot, QStringLiteral("surface-orchard-nitrogen-grey.png"));
}

TEST(SurfacePlot, DataPointsFollowTheAnalysisSetting) {
    MainWindow w;
    const auto run = openAndRun(w, QStringLiteral("orchard-nitrogen"));
    ASSERT_TRUE(run);
    Analysis a = *w.document()->analysis(w.analysisPage()->analysisId());
    auto observedRows = [](SurfacePlot& plot) {
        int n = 0;
        for (int i = 0; i < plot.figurePlot()->graphCount(); ++i)
            if (plot.figurePlot()->graph(i)->name() == QStringLiteral("observed rows"))
                n += plot.figurePlot()->graph(i)->dataCount();
        return n;
    };
    SurfacePlot plot;
    a.probe.show_points = true;
    plot.setRun(a, *run);
    EXPECT_GT(observedRows(plot), 0);
    // "Data points" off: the surface shows no rows either (the export too).
    a.probe.show_points = false;
    plot.setRun(a, *run);
    EXPECT_EQ(observedRows(plot), 0);
}

TEST(SurfacePlot, LogisticProbabilityScaleShowsProbabilities) {
    MainWindow w;
    const auto run = openAndRun(w, QStringLiteral("trial-conversion"));
    ASSERT_TRUE(run);
    ASSERT_TRUE(run->surface.has_value());
    const Analysis& a = *w.document()->analysis(w.analysisPage()->analysisId());
    ASSERT_EQ(a.probe.scale, ProbeScale::Outcome);
    const Direct d = direct(QStringLiteral("trial-conversion"));
    const SurfaceGrid ref = surface_grid(d.design, d.fit, d.analysis.roles.focal, d.analysis.roles.moderator);
    SurfacePlot plot;
    plot.resize(760, 520);
    plot.setRun(a, *run);
    ASSERT_TRUE(plot.showsProbability());
    QCPColorMap* map = plot.colorMap();
    for (int i : {0, 20, 40})
        for (int k : {0, 13, 40}) {
            // closed form: 1 / (1 + exp(-log-odds))
            const double p = 1.0 / (1.0 + std::exp(-ref.predicted(k, i)));
            EXPECT_NEAR(map->data()->cell(i, k), p, 1e-12);
        }
    EXPECT_TRUE(plot.subtitle().contains(QStringLiteral("probability")));
    EXPECT_TRUE(plot.colorScale()->axis()->label().startsWith(QStringLiteral("P(")));
    plot.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&plot));
    screenshot(&plot, QStringLiteral("surface-trial-conversion.png"));
}

namespace {

// The rules applied here to core's diagnostics (common practice).
std::set<std::size_t> expectedFlaggedTableRows(const Diagnostics& g, const Design& design) {
    std::set<std::size_t> rows;
    const double n = static_cast<double>(g.n), p = g.p;
    const Eigen::VectorXd& r = g.family == Family::Logistic ? g.standardised : g.studentised;
    for (Eigen::Index i = 0; i < static_cast<Eigen::Index>(g.n); ++i) {
        const bool flag = std::abs(r[i]) > 3.0 || g.leverage[i] > 3.0 * p / n || g.cooks_distance[i] > 4.0 / n ||
                          g.leverage[i] >= 1.0 - 1e-10;
        if (flag) rows.insert(design.rows[static_cast<std::size_t>(i)]);
    }
    return rows;
}

void checkFlaggedList(const QString& name, bool clickAndShow) {
    SCOPED_TRACE(name.toStdString());
    MainWindow w;
    const auto run = openAndRun(w, name);
    ASSERT_TRUE(run);
    w.resize(1400, 900);
    w.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&w));
    w.analysisPage()->showSection(AnalysisPage::Checks);
    ChecksSection* checks = w.analysisPage()->checks();
    ASSERT_TRUE(checks->isVisible());
    const auto diag = checks->diagnostics();
    ASSERT_TRUE(diag);

    const Direct d = direct(name);
    const Diagnostics ref = diagnostics(d.design, d.fit);  // core diagnostics on the fit built here
    const std::set<std::size_t> expected = expectedFlaggedTableRows(ref, d.design);
    ASSERT_FALSE(expected.empty());

    QTableView* view = checks->flaggedView();
    QAbstractItemModel* m = view->model();
    ASSERT_EQ(m->rowCount(), static_cast<int>(expected.size()));
    // Each listed line is the file line of a flagged table row.
    std::map<std::size_t, std::size_t> lineToRow;
    for (std::size_t r : expected) lineToRow[d.table->row_lines.at(r)] = r;
    std::set<std::size_t> listed;
    for (int r = 0; r < m->rowCount(); ++r) {
        const std::size_t line = m->index(r, FlaggedRowsModel::Line).data().toULongLong();
        ASSERT_TRUE(lineToRow.count(line)) << "line " << line << " is not a flagged row";
        listed.insert(lineToRow[line]);
        EXPECT_FALSE(m->index(r, FlaggedRowsModel::Rules).data().toString().isEmpty());
    }
    EXPECT_EQ(listed, expected);
    // The rules are stated.
    EXPECT_TRUE(checks->rulesLabel()->text().contains(QStringLiteral("common practice")));
    EXPECT_TRUE(checks->rulesLabel()->text().contains(QStringLiteral("3p/n")));
    // Flagged points are all drawn in each plot.
    for (DiagnosticPlot* p : {checks->residualPlot(), checks->quantilePlot(), checks->influencePlot()}) {
        SCOPED_TRACE(p->figureKey().toStdString());
        std::size_t finiteFlagged = 0;
        for (const auto& f : diag->flagged)
            finiteFlagged += std::isfinite(diag->check_residual()[static_cast<Eigen::Index>(f.observation)]);
        EXPECT_GE(p->drawnFlagged().size(), finiteFlagged);
        EXPECT_EQ(p->drawnFlagged().size() + p->drawnObservations().size() <= diag->n, true);
    }
    QStringList keys;
    for (FigureSource* f : checks->figures()) keys << f->figureKey();
    EXPECT_EQ(keys, (QStringList{QStringLiteral("residuals"), QStringLiteral("qq"), QStringLiteral("influence")}));
    screenshot(checks, QStringLiteral("checks-%1.png").arg(name));

    if (!clickAndShow) return;
    // Select the second listed row with the mouse and press "Show in dataset".
    QSignalSpy spy(checks, &ChecksSection::rowsSelected);
    const int pick = m->rowCount() > 1 ? 1 : 0;
    const QModelIndex idx = m->index(pick, FlaggedRowsModel::Rules);
    view->scrollTo(idx);
    QTest::mouseClick(view->viewport(), Qt::LeftButton, {}, view->visualRect(idx).center());
    ASSERT_EQ(view->selectionModel()->selectedRows().size(), 1);
    QPushButton* button = checks->showInDatasetButton();
    ASSERT_TRUE(button->isEnabled());
    QTest::mouseClick(button, Qt::LeftButton);
    ASSERT_EQ(spy.count(), 1);
    const QList<QVariant> args = spy.takeFirst();
    EXPECT_EQ(args.at(0).toString(), QString::fromStdString(d.analysis.dataset));
    const auto rows = args.at(1).value<std::vector<std::size_t>>();
    ASSERT_EQ(rows.size(), 1u);
    const std::size_t line = m->index(pick, FlaggedRowsModel::Line).data().toULongLong();
    EXPECT_EQ(rows.front(), lineToRow.at(line));
    EXPECT_TRUE(expected.count(rows.front()));
    // The main window showed the dataset.
    EXPECT_EQ(w.datasetPage()->datasetId(), QString::fromStdString(d.analysis.dataset));

    // Clicking a flagged point in a plot selects its row in the list.
    w.showAnalysis(w.analysisPage()->analysisId());
    w.analysisPage()->showSection(AnalysisPage::Checks);
    ASSERT_TRUE(test::waitUntil([&] { return checks->isVisible(); }));
    DiagnosticPlot* plot = checks->influencePlot();
    QCustomPlot* cp = plot->figurePlot();
    cp->replot();
    ASSERT_FALSE(plot->drawnFlagged().empty());
    const std::size_t target = plot->drawnFlagged().back();
    const auto point = plot->flaggedGraph()->data()->at(plot->flaggedGraph()->dataCount() - 1);
    const QPoint at(static_cast<int>(std::lround(cp->xAxis->coordToPixel(point->key))),
                    static_cast<int>(std::lround(cp->yAxis->coordToPixel(point->value))));
    view->clearSelection();
    QTest::mouseClick(cp, Qt::LeftButton, {}, at);
    const QModelIndexList sel = view->selectionModel()->selectedRows();
    ASSERT_EQ(sel.size(), 1);
    const std::size_t clickedLine = m->index(sel.front().row(), FlaggedRowsModel::Line).data().toULongLong();
    EXPECT_EQ(lineToRow.at(clickedLine), d.design.rows[target]);
}

}  // namespace

TEST(ChecksSection, VolunteerOnboardingFlagsMatchRulesOnCoreDiagnostics) {
    checkFlaggedList(QStringLiteral("volunteer-onboarding"), true);
}

TEST(ChecksSection, OrchardNitrogenFlagsMatchRulesOnCoreDiagnostics) {
    checkFlaggedList(QStringLiteral("orchard-nitrogen"), false);
}

TEST(ChecksSection, LogisticTrialConversionFlagsPastMissingRows) {
    // trial-conversion has rows with a missing region: table rows and design rows differ
    checkFlaggedList(QStringLiteral("trial-conversion"), true);
}

TEST(ChecksSection, WithoutARunShowsTheReason) {
    MainWindow w;
    ChecksSection* checks = w.analysisPage()->checks();
    checks->showAnalysis(QStringLiteral("nope"), nullptr, QStringLiteral("the Outcome column 'y' is not in d.csv"));
    EXPECT_FALSE(checks->diagnostics());
    EXPECT_EQ(checks->flaggedView()->model()->rowCount(), 0);
    EXPECT_FALSE(checks->showInDatasetButton()->isEnabled());
    EXPECT_TRUE(checks->findChild<QLabel*>(QStringLiteral("checks-note"))->text().contains(QStringLiteral("'y'")));
}

TEST(DiagnosticPlot, DenseScatterIsThinnedButFlaggedRowsAreAllDrawn) {
    // 40,000 rows: above the 20,000-point limit.
    const int n = 40000;
    std::vector<double> x(n), y(n);
    std::uint64_t state = 12345;
    auto uniform = [&] {  // a small LCG (Knuth MMIX constants): reproducible without <random>
        state = state * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(state >> 11) / 9007199254740992.0;
    };
    for (int i = 0; i < n; ++i) {
        x[static_cast<std::size_t>(i)] = uniform() * 10;
        y[static_cast<std::size_t>(i)] = 1 + 0.5 * x[static_cast<std::size_t>(i)] + (uniform() - 0.5) * 2;
    }
    y[77] += 40;  // an outlier
    Table t;
    Column cx, cy;
    cx.name = "x";
    cx.numbers = x;
    cy.name = "y";
    cy.numbers = y;
    t.columns = {cy, cx};
    ModelSpec s;
    s.outcome = "y";
    s.predictors = {"x"};
    const Design d = build_design(t, s);
    auto diag = std::make_shared<const Diagnostics>(diagnostics(d, fit_design(d, s)));
    ASSERT_FALSE(diag->flagged.empty());
    std::set<std::size_t> flagged;
    for (const auto& r : diag->flagged) flagged.insert(r.observation);
    ASSERT_TRUE(flagged.count(77));
    for (auto kind : {DiagnosticPlot::Residuals, DiagnosticPlot::Quantiles, DiagnosticPlot::Influence}) {
        DiagnosticPlot plot(kind);
        plot.resize(600, 420);
        plot.setDiagnostics(diag);
        SCOPED_TRACE(plot.figureKey().toStdString());
        EXPECT_LT(plot.drawnObservations().size() + plot.drawnFlagged().size(), static_cast<std::size_t>(n));
        EXPECT_EQ(std::set<std::size_t>(plot.drawnFlagged().begin(), plot.drawnFlagged().end()), flagged);
        EXPECT_EQ(plot.flaggedGraph()->dataCount(), static_cast<int>(flagged.size()));
    }
    // Below the limit every point is drawn.
    EXPECT_EQ(
        thinScatter(std::vector<double>(x.begin(), x.begin() + 1000), std::vector<double>(y.begin(), y.begin() + 1000))
            .size(),
        1000u);
}
