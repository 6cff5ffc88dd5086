// The Surface plot, the Cells plot with its cell table, and the Checks
// section, driven through the main window on the sample projects. Every
// number drawn is compared with the same quantity computed directly through
// core in the test (core cell_table, surface_grid, diagnostics on a design
// and fit built here from the project file), and the flag list with the
// rules of thumb (common practice: |studentised residual| > 3, leverage >
// 3p/n, Cook's distance > 4/n) applied here to core's diagnostics. The
// influence view's rule lines are checked against those thresholds worked
// out here (closed form), and the residual plot's bin means and intervals
// against means and standard deviations computed here.
//
// Set MODERATO_SCREENSHOT_DIR to also save a PNG of each widget there.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QApplication>
#include <QClipboard>
#include <QDir>
#include <QFileInfo>
#include <QHeaderView>
#include <QLabel>
#include <QLocale>
#include <QPushButton>
#include <QSignalSpy>
#include <QStandardItemModel>
#include <QTableView>
#include <QTest>
#include <cmath>
#include <map>
#include <set>

#include "common/direct_fit.hpp"
#include "data/dataset_page.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/estimation/diagnostics.hpp"
#include "moderato/estimation/distributions.hpp"
#include "moderato/probing/surface_view.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/reading/csv.hpp"
#include "plots/cells_view.hpp"
#include "plots/diagnostic_plots.hpp"
#include "plots/scatter_thinning.hpp"
#include "plots/surface_plot.hpp"
#include "sample_window.hpp"
#include "screenshot.hpp"
#include "sections/checks_section.hpp"
#include "sections/flagged_rows_model.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

TEST(CellsView, VolunteerOnboardingSeriesMatchCoreCellTable) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("volunteer-onboarding")));
    const auto run = win.run();
    ASSERT_TRUE(run);
    ASSERT_TRUE(run->cells.has_value());
    const test::DirectFit d =
        test::direct_fit(test::sampleProject(QStringLiteral("volunteer-onboarding")).toStdString());
    // core cell_table on the design and fit built here
    const CellTable ref = cell_table(d.design, d.fit, d.analysis.roles.focal, d.analysis.roles.moderator);

    CellsView view;
    view.resize(1000, 760);
    view.setRun(win.analysis(), *run);
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
            // Columns: item, n, observed, estimate, CI low, CI high, SE, test value, p (the house order).
            EXPECT_NEAR(m->item(r, 7)->text().toDouble(), ref.interaction_test->statistic,
                        5e-4 * ref.interaction_test->statistic);
        }
    }
    EXPECT_EQ(cellRows, static_cast<int>(ref.cells.size()));

    // "Copy table" puts the whole table on the clipboard as tab-separated text.
    QApplication::clipboard()->clear();
    QTest::mouseClick(view.findChild<QPushButton*>(QStringLiteral("copy-cell-table")), Qt::LeftButton);
    EXPECT_EQ(QApplication::clipboard()->text(), tsv);
    EXPECT_EQ(tsv.count(QLatin1Char('\n')), m->rowCount() + 1);
    test::saveScreenshot(&view, QStringLiteral("cells-volunteer-onboarding.png"));
    view.resize(1500, 520);  // wide: the table beside the plot
    test::saveScreenshot(&view, QStringLiteral("cells-volunteer-onboarding-wide.png"));

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
    test::saveScreenshot(&view, QStringLiteral("cells-logistic.png"));
}

TEST(SurfacePlot, OrchardNitrogenColourMapMatchesCoreSurfaceGrid) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    const auto run = win.run();
    ASSERT_TRUE(run);
    ASSERT_TRUE(run->surface.has_value());
    const test::DirectFit d = test::direct_fit(test::sampleProject(QStringLiteral("orchard-nitrogen")).toStdString());
    // core surface_grid on the design and fit built here (41 x 41, its default)
    const SurfaceGrid ref = surface_grid(d.design, d.fit, d.analysis.roles.focal, d.analysis.roles.moderator);
    const DataRegion region = data_region(d.design, d.analysis.roles.focal, d.analysis.roles.moderator);

    SurfacePlot plot;
    plot.resize(760, 520);
    plot.setRun(win.analysis(), *run);
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
            // No cell is faded: the wash beyond the data is a mask along the hull (test_surface_mask.cpp).
            EXPECT_EQ(map->data()->alpha(i, k), 255) << i << "," << k;
        }
    EXPECT_EQ(plot.beyondCellCount(), beyond);
    EXPECT_EQ(plot.region().x, region.x);  // the masked hull is core's data_region
    EXPECT_EQ(plot.region().z, region.z);
    EXPECT_TRUE(plot.beyondMask());
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
    test::saveScreenshot(&plot, QStringLiteral("surface-orchard-nitrogen.png"));

    // Greyscale: the ramp's dark end is a grey.
    plot.setGreyscale(true);
    const QRgb top = plot.colorMap()->gradient().color(1.0, QCPRange(0, 1));
    EXPECT_EQ(qRed(top), qGreen(top));
    EXPECT_EQ(qGreen(top), qBlue(top));
    test::saveScreenshot(&plot, QStringLiteral("surface-orchard-nitrogen-grey.png"));
}

TEST(SurfacePlot, DataPointsFollowTheAnalysisSetting) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    const auto run = win.run();
    ASSERT_TRUE(run);
    Analysis a = win.analysis();
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
    test::SampleWindow win(test::sampleProject(QStringLiteral("trial-conversion")));
    const auto run = win.run();
    ASSERT_TRUE(run);
    ASSERT_TRUE(run->surface.has_value());
    const Analysis& a = win.analysis();
    ASSERT_EQ(a.probe.scale, ProbeScale::Outcome);
    const test::DirectFit d = test::direct_fit(test::sampleProject(QStringLiteral("trial-conversion")).toStdString());
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
    test::saveScreenshot(&plot, QStringLiteral("surface-trial-conversion.png"));
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
    test::SampleWindow win(test::sampleProject(name));
    MainWindow& w = win.w;
    const auto run = win.run();
    ASSERT_TRUE(run);
    win.showSection(AnalysisPage::Checks);
    ChecksSection* checks = w.analysisPage()->checks();
    ASSERT_TRUE(checks->isVisible());
    const auto diag = checks->diagnostics();
    ASSERT_TRUE(diag);

    const test::DirectFit d = test::direct_fit(test::sampleProject(name).toStdString());
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
    // The rules are stated in words, with their numbers (n rows, p coefficients).
    const QString rules = checks->rulesLabel()->text();
    const QString n = QLocale(QLocale::English).toString(static_cast<qulonglong>(ref.n));
    const QString p = QString::number(ref.p);
    EXPECT_TRUE(rules.contains(QStringLiteral("common practice"))) << rules.toStdString();
    EXPECT_TRUE(rules.contains(QStringLiteral("beyond ±3"))) << rules.toStdString();
    EXPECT_TRUE(rules.contains(QStringLiteral("leverage above 3 × %1 / %2 = ").arg(p, n))) << rules.toStdString();
    EXPECT_TRUE(rules.contains(QStringLiteral("Cook's distance above 4 / %1 = ").arg(n))) << rules.toStdString();
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
    test::saveScreenshot(checks, QStringLiteral("checks-%1.png").arg(name));

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

namespace {

// The file line of each observation of the fit (the rows the design kept).
std::vector<double> fileLines(const test::DirectFit& d) {
    std::vector<double> lines;
    for (std::size_t row : d.design.rows) lines.push_back(static_cast<double>(d.table->row_lines.at(row)));
    return lines;
}

// The observations above `limit` by `value`, largest first, at most `most` of them.
std::vector<std::size_t> largestAbove(const Eigen::VectorXd& value, double limit, std::size_t most) {
    std::vector<std::size_t> over;
    for (Eigen::Index i = 0; i < value.size(); ++i)
        if (std::isfinite(value[i]) && value[i] > limit) over.push_back(static_cast<std::size_t>(i));
    std::stable_sort(over.begin(), over.end(), [&](std::size_t a, std::size_t b) {
        return value[static_cast<Eigen::Index>(a)] > value[static_cast<Eigen::Index>(b)];
    });
    if (over.size() > most) over.resize(most);
    return over;
}

// Every point of a panel (rows and flagged rows) as x -> y.
std::map<double, double> panelPoints(DiagnosticPlot* plot, int panel) {
    std::map<double, double> points;
    for (QCPGraph* g : {plot->pointsGraph(panel), plot->flaggedGraph(panel)})
        for (auto it = g->data()->constBegin(); it != g->data()->constEnd(); ++it) points[it->key] = it->value;
    return points;
}

// The texts of the plot's text items that start with `prefix`.
std::set<QString> itemTexts(QCustomPlot* plot, const QString& prefix) {
    std::set<QString> texts;
    for (int i = 0; i < plot->itemCount(); ++i)
        if (auto* t = qobject_cast<QCPItemText*>(plot->item(i)))
            if (t->text().startsWith(prefix)) texts.insert(t->text());
    return texts;
}

void checkInfluenceView(const QString& name) {
    SCOPED_TRACE(name.toStdString());
    test::SampleWindow win(test::sampleProject(name));
    MainWindow& w = win.w;
    ASSERT_TRUE(win.run());
    win.showSection(AnalysisPage::Checks);
    DiagnosticPlot* plot = w.analysisPage()->checks()->influencePlot();
    ASSERT_EQ(plot->figureKey(), QStringLiteral("influence"));  // the key project files store
    ASSERT_EQ(plot->panelCount(), 2);

    const test::DirectFit d = test::direct_fit(test::sampleProject(name).toStdString());
    const Diagnostics ref = diagnostics(d.design, d.fit);  // core diagnostics on the fit built here
    const double n = static_cast<double>(d.design.rows.size());
    double p = 0;  // estimable coefficients (aliased ones are NaN)
    for (Eigen::Index j = 0; j < d.fit.beta.size(); ++j) p += std::isnan(d.fit.beta[j]) ? 0 : 1;
    // The flag rules as lines (closed form: 4/n and 3p/n; common practice).
    EXPECT_NEAR(plot->ruleValue(0), 4.0 / n, 1e-15);
    EXPECT_NEAR(plot->ruleValue(1), 3.0 * p / n, 1e-15);
    // ... stated over each panel, and drawn across it at that value.
    const QString rows = QLocale(QLocale::English).toString(static_cast<qulonglong>(n));
    EXPECT_TRUE(
        plot->panelCaption(0).startsWith(QStringLiteral("Cook's distance: flagged above 4 / %1 rows = ").arg(rows)))
        << plot->panelCaption(0).toStdString();
    EXPECT_TRUE(plot->panelCaption(1).startsWith(
        QStringLiteral("Leverage: flagged above 3 × %1 coefficients / %2 rows = ").arg(p).arg(rows)))
        << plot->panelCaption(1).toStdString();
    int rules = 0;
    for (int i = 0; i < plot->figurePlot()->graphCount(); ++i) {
        QCPGraph* g = plot->figurePlot()->graph(i);
        if (g->name() != QStringLiteral("flag rule")) continue;
        const int panel = g->keyAxis()->axisRect() == plot->panelRect(0) ? 0 : 1;
        ASSERT_EQ(g->dataCount(), 2);
        for (int k = 0; k < 2; ++k) EXPECT_EQ(g->data()->at(k)->value, plot->ruleValue(panel));
        ++rules;
    }
    EXPECT_EQ(rules, 2);

    // Each row at its file line, with core's Cook's distance above and leverage below.
    const std::vector<double> lines = fileLines(d);
    const std::map<double, double> cooks = panelPoints(plot, 0), leverage = panelPoints(plot, 1);
    ASSERT_EQ(leverage.size(), lines.size()) << "every row is drawn (no thinning at this size)";
    for (std::size_t i = 0; i < lines.size(); ++i) {
        const auto e = static_cast<Eigen::Index>(i);
        ASSERT_TRUE(leverage.count(lines[i])) << "line " << lines[i];
        EXPECT_NEAR(leverage.at(lines[i]), ref.leverage[e], 1e-12);
        if (std::isfinite(ref.cooks_distance[e])) {
            EXPECT_NEAR(cooks.at(lines[i]), ref.cooks_distance[e], 1e-12);
        }
    }
    // The largest rows above each line are labelled "line N".
    const auto expectLabels = [&](int panel, const Eigen::VectorXd& value, double limit) {
        const std::vector<std::size_t> want = largestAbove(value, limit, DiagnosticPlot::kMaxLabels);
        EXPECT_EQ(plot->labelledObservations(panel), want) << "panel " << panel;
        return want;
    };
    std::set<QString> wantTexts;
    for (std::size_t o : expectLabels(0, ref.cooks_distance, 4.0 / n))
        wantTexts.insert(QStringLiteral("line %1").arg(static_cast<qulonglong>(lines[o])));
    for (std::size_t o : expectLabels(1, ref.leverage, 3.0 * p / n))
        wantTexts.insert(QStringLiteral("line %1").arg(static_cast<qulonglong>(lines[o])));
    EXPECT_FALSE(wantTexts.empty());
    EXPECT_EQ(itemTexts(plot->figurePlot(), QStringLiteral("line ")), wantTexts);
    // Axis titles in words; no fixed Cook's distance contours (no curves at all).
    EXPECT_EQ(plot->panelRect(0)->axis(QCPAxis::atLeft)->label(), QStringLiteral("Cook's distance"));
    EXPECT_EQ(plot->panelRect(1)->axis(QCPAxis::atLeft)->label(), QStringLiteral("leverage"));
    EXPECT_EQ(plot->panelRect(1)->axis(QCPAxis::atBottom)->label(),
              QStringLiteral("line of %1").arg(QFileInfo(QString::fromStdString(d.table->source)).fileName()));
    for (int i = 0; i < plot->figurePlot()->plottableCount(); ++i)
        EXPECT_EQ(qobject_cast<QCPCurve*>(plot->figurePlot()->plottable(i)), nullptr);
}

}  // namespace

TEST(ChecksSection, InfluenceViewDrawsCoreNumbersWithTheFlagRules) {
    checkInfluenceView(QStringLiteral("orchard-nitrogen"));
}

TEST(ChecksSection, LogisticInfluenceViewDrawsCoreNumbersWithTheFlagRules) {
    // trial-conversion: rows with a missing region, so file lines and fit rows differ
    checkInfluenceView(QStringLiteral("trial-conversion"));
}

TEST(ChecksSection, ResidualBinsShowTheMeanResidualWithItsInterval) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    MainWindow& w = win.w;
    ASSERT_TRUE(win.run());
    win.showSection(AnalysisPage::Checks);
    DiagnosticPlot* plot = w.analysisPage()->checks()->residualPlot();
    const test::DirectFit d = test::direct_fit(test::sampleProject(QStringLiteral("orchard-nitrogen")).toStdString());
    // Residuals y - fitted in order of the fitted value, computed here.
    const Eigen::Index m = d.fit.fitted.size();
    std::vector<Eigen::Index> order(static_cast<std::size_t>(m));
    for (Eigen::Index i = 0; i < m; ++i) order[static_cast<std::size_t>(i)] = i;
    std::stable_sort(order.begin(), order.end(),
                     [&](Eigen::Index a, Eigen::Index b) { return d.fit.fitted[a] < d.fit.fitted[b]; });
    // 480 rows: min(480 / 10, 20) = 20 bins of 24 rows (the rule in diagnostic_plots.cpp).
    const std::size_t k = 20;
    ASSERT_EQ(m, 480);
    QCPGraph* means = plot->binMeansGraph();
    ASSERT_TRUE(means);
    ASSERT_EQ(means->dataCount(), static_cast<int>(k));
    auto bars = plot->binIntervals()->data();
    ASSERT_EQ(bars->size(), static_cast<int>(k));
    for (std::size_t g = 0; g < k; ++g) {
        const std::size_t lo = g * 480 / k, hi = (g + 1) * 480 / k;
        double sf = 0, sr = 0;
        for (std::size_t t = lo; t < hi; ++t) {
            const Eigen::Index i = order[t];
            sf += d.fit.fitted[i];
            sr += d.design.y[i] - d.fit.fitted[i];
        }
        const double c = static_cast<double>(hi - lo), mean = sr / c;
        double ss = 0;
        for (std::size_t t = lo; t < hi; ++t) {
            const Eigen::Index i = order[t];
            ss += std::pow(d.design.y[i] - d.fit.fitted[i] - mean, 2);
        }
        // mean ± t(0.975, c − 1) s / √c (closed form; the t quantile from core's Boost wrapper)
        const double half = dist::t_quantile(0.975, c - 1) * std::sqrt(ss / (c - 1)) / std::sqrt(c);
        const auto point = means->data()->at(static_cast<int>(g));
        EXPECT_NEAR(point->key, sf / c, 1e-9);
        EXPECT_NEAR(point->value, mean, 1e-9);
        EXPECT_NEAR(bars->at(static_cast<int>(g)).errorMinus, half, 1e-9);
        EXPECT_NEAR(bars->at(static_cast<int>(g)).errorPlus, half, 1e-9);
    }
    EXPECT_EQ(plot->panelRect()->axis(QCPAxis::atLeft)->label(), QStringLiteral("residual (observed − fitted)"));
}

TEST(ChecksSection, LabelsAreSpelledOut) {
    for (const QString& name : {QStringLiteral("orchard-nitrogen"), QStringLiteral("trial-conversion")}) {
        SCOPED_TRACE(name.toStdString());
        test::SampleWindow win(test::sampleProject(name));
        MainWindow& w = win.w;
        ASSERT_TRUE(win.run());
        win.showSection(AnalysisPage::Checks);
        ChecksSection* checks = w.analysisPage()->checks();
        ASSERT_TRUE(checks->diagnostics());
        QStringList texts;
        for (DiagnosticPlot* p : {checks->residualPlot(), checks->quantilePlot(), checks->influencePlot()}) {
            QCustomPlot* cp = p->figurePlot();
            for (QCPAxisRect* rect : cp->axisRects())
                for (QCPAxis* axis : rect->axes()) texts << axis->label();
            for (int i = 0; i < cp->legend->itemCount(); ++i)
                if (auto* item = qobject_cast<QCPPlottableLegendItem*>(cp->legend->item(i)))
                    texts << item->plottable()->name();
        }
        QAbstractItemModel* m = checks->flaggedView()->model();
        for (int c = 0; c < m->columnCount(); ++c) texts << m->headerData(c, Qt::Horizontal).toString();
        for (int r = 0; r < m->rowCount(); ++r) texts << m->index(r, FlaggedRowsModel::Rules).data().toString();
        texts << checks->rulesLabel()->text() << checks->findChild<QLabel*>(QStringLiteral("checks-note"))->text();
        for (const QString& t : texts) {
            EXPECT_FALSE(t.contains(QStringLiteral("std."))) << t.toStdString();
            EXPECT_FALSE(t.contains(QStringLiteral("Cook's D"))) << t.toStdString();
            EXPECT_FALSE(t.contains(QStringLiteral("p/n"))) << t.toStdString();
        }
        EXPECT_TRUE(texts.contains(name == QStringLiteral("trial-conversion")
                                       ? QStringLiteral("standardised Pearson residual")
                                       : QStringLiteral("externally studentised residual")));
    }
}

TEST(DiagnosticPlot, ManyFlaggedRowsAreThinnedOnAFineGridKeepingTheLabelledOnes) {
    // 60,000 rows, one in eight far out in x (x in [10, 11], the rest in
    // [0, 1]): their leverage is about 1/n + 7/n, above the 3p/n = 6/n rule
    // (by construction: (x - mean)² ≈ 7 var(x)), so 7,500 rows are flagged.
    // The display-thinning rule
    // (diagnostic_plots.cpp): unflagged points one per cell of a 120 × 80
    // grid; above 5,000 flagged points, flagged points one per cell of a
    // 120 × 80 grid too, always keeping the labelled (largest) rows. The bounds
    // below are the grids' cell counts (thinScatter's bins run 0..bins, by
    // construction).
    const int n = 60000;
    std::vector<double> x(n), y(n);
    std::uint64_t state = 2024;
    auto uniform = [&] {  // a small LCG (Knuth MMIX constants)
        state = state * 6364136223846793005ULL + 1442695040888963407ULL;
        return (static_cast<double>(state >> 11) + 0.5) / 9007199254740992.0;
    };
    for (std::size_t i = 0; i < static_cast<std::size_t>(n); ++i) {
        x[i] = (i % 8 == 0 ? 10 : 0) + uniform();
        y[i] = 1 + 0.5 * x[i] + (uniform() - 0.5) * 2;
    }
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
    std::set<std::size_t> flagged;
    for (const auto& r : diag->flagged) flagged.insert(r.observation);
    ASSERT_GT(flagged.size(), 5000u) << "the data must flag more rows than the flagged-thinning limit";
    for (auto kind : {DiagnosticPlot::Residuals, DiagnosticPlot::Quantiles, DiagnosticPlot::Influence}) {
        DiagnosticPlot plot(kind);
        plot.resize(600, 420);
        plot.setDiagnostics(diag);
        SCOPED_TRACE(plot.figureKey().toStdString());
        for (int panel = 0; panel < plot.panelCount(); ++panel) {
            const auto& drawn = plot.drawnObservations(panel);
            const auto& drawnFlagged = plot.drawnFlagged(panel);
            EXPECT_LE(drawn.size(), 121u * 81u);
            EXPECT_LE(drawnFlagged.size(), 121u * 81u + 2 * DiagnosticPlot::kMaxLabels + 2);
            EXPECT_LT(drawnFlagged.size(), flagged.size());
            EXPECT_GT(drawnFlagged.size(), 0u);
            for (std::size_t o : drawnFlagged) EXPECT_TRUE(flagged.count(o)) << o;
            for (std::size_t o : drawn) EXPECT_FALSE(flagged.count(o)) << o;
            // The labelled rows (influence panels) are among the drawn flagged points.
            const std::set<std::size_t> shown(drawnFlagged.begin(), drawnFlagged.end());
            for (std::size_t o : plot.labelledObservations(panel)) EXPECT_TRUE(shown.count(o)) << o;
        }
        // Residual plot: the flagged rows with the largest and the smallest residual are drawn.
        if (kind == DiagnosticPlot::Residuals) {
            const auto r = diag->plot_residual();
            std::size_t hi = *flagged.begin(), lo = hi;
            for (std::size_t o : flagged) {
                if (r[static_cast<Eigen::Index>(o)] > r[static_cast<Eigen::Index>(hi)]) hi = o;
                if (r[static_cast<Eigen::Index>(o)] < r[static_cast<Eigen::Index>(lo)]) lo = o;
            }
            const std::set<std::size_t> shown(plot.drawnFlagged().begin(), plot.drawnFlagged().end());
            EXPECT_TRUE(shown.count(hi));
            EXPECT_TRUE(shown.count(lo));
        }
    }
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
