// A multilevel analysis in the workbench, driven through its widgets: the
// Groups slot and the multilevel choices in Specify (each an undo step, the
// conflicts with weights, clusters and standard errors refused or resolved
// with a note), the random part and each term's df in Estimates, the memo's
// random-part sentences, and the Checks section's note in place of the
// influence plot. The data are the teams of tests/reference/fixtures
// (made by tests/reference/make_mixed_reference.py) with a column `shift`
// added here; the numbers on screen are compared with core fits computed in
// the test (fit_model on the same table and specification), SDs and
// correlations with their definitions, and counts made from the CSV.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QAction>
#include <QCheckBox>
#include <QComboBox>
#include <QDropEvent>
#include <QFile>
#include <QLabel>
#include <QMimeData>
#include <QScrollArea>
#include <QTableView>
#include <QTableWidget>
#include <QTest>
#include <QTextDocument>
#include <QTextEdit>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>
#include <map>
#include <set>

#include "estimates/coefficient_model.hpp"
#include "moderato/estimation/diagnostics.hpp"
#include "moderato/estimation/fit.hpp"
#include "moderato/project/project.hpp"
#include "plots/diagnostic_plots.hpp"
#include "qstring_print.hpp"
#include "sample_window.hpp"
#include "screenshot.hpp"
#include "sections/checks_section.hpp"
#include "sections/estimates_section.hpp"
#include "sections/flagged_rows_model.hpp"
#include "sections/memo_section.hpp"
#include "sections/random_part_view.hpp"
#include "sections/specify_section.hpp"
#include "specify/column_mime.hpp"
#include "specify/multilevel_panel.hpp"
#include "specify/role_slot.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

QString teamsCsv() { return test::samplesDir() + QStringLiteral("/../tests/reference/fixtures/mixed_teams.csv"); }

// The teams data plus `shift` (1, 2, 3 in turn: a predictor with no slope of its own, invented here),
// and a project whose one analysis is hours by climate with shift as a control, HC3 errors, no groups.
QString writeTeamsProject(const QTemporaryDir& dir) {
    QFile in(teamsCsv());
    EXPECT_TRUE(in.open(QIODevice::ReadOnly)) << teamsCsv().toStdString();
    QFile out(dir.filePath(QStringLiteral("teams.csv")));
    EXPECT_TRUE(out.open(QIODevice::WriteOnly));
    int row = 0;
    for (QByteArray line : in.readAll().split('\n')) {
        if (line.trimmed().isEmpty()) continue;
        out.write(line.trimmed() + (row == 0 ? QByteArray(",shift") : "," + QByteArray::number(row % 3 + 1)) + "\n");
        ++row;
    }
    out.close();
    Project p;
    DataSource src;
    src.id = "teams";
    src.path = "teams.csv";
    src.import.column_kinds["team"] = ColumnKind::Categorical;
    p.datasets.push_back(src);
    Analysis a;
    a.id = "teams";
    a.name = "hours by climate";
    a.dataset = "teams";
    a.roles.outcome = "score";
    a.roles.focal = "hours";
    a.roles.moderator = "climate";
    a.roles.controls = {"shift"};
    a.se = SeKind::HC3;
    p.analyses.push_back(a);
    const QString path = dir.filePath(QStringLiteral("teams.moderato"));
    write_project_file(p, path.toStdString());
    return path;
}

struct Teams : test::SampleWindow {
    QTemporaryDir data;
    Teams() : SampleWindow(QSize(1400, 900)) { EXPECT_TRUE(open(writeTeamsProject(data))); }
    SpecifySection* specify() const { return w.analysisPage()->specify(); }
    MultilevelPanel* panel() const { return specify()->multilevelPanel(); }
    EstimatesSection* estimates() const { return w.analysisPage()->estimates(); }
    std::shared_ptr<const Table> table() const { return w.document()->table(analysis().dataset); }
    // The same specification fitted by core here.
    FitResult coreFit() const { return fit_model(*table(), model_spec(analysis())); }
    void pick(Role role, const std::string& column) {
        QAction* a = specify()->slot(role)->pickAction(column);
        ASSERT_NE(a, nullptr) << "no picker entry for " << column;
        a->trigger();
    }
    void chooseGroups() {
        showSection(AnalysisPage::Specify);
        pick(Role::Groups, "team");
        ASSERT_TRUE(waitForRun());
        ASSERT_TRUE(w.runner()->error(id).isEmpty()) << w.runner()->error(id).toStdString();
    }
};

void dropOn(RoleSlot* slot, const QMimeData* mime) {
    const QPoint at = slot->rect().center();
    QDragEnterEvent enter(at, Qt::CopyAction | Qt::MoveAction, mime, Qt::LeftButton, Qt::NoModifier);
    QCoreApplication::sendEvent(slot, &enter);
    ASSERT_TRUE(enter.isAccepted()) << "the slot refused the drag";
    QDropEvent drop(QPointF(at), Qt::CopyAction | Qt::MoveAction, mime, Qt::LeftButton, Qt::NoModifier);
    QCoreApplication::sendEvent(slot, &drop);
}

// Whether `column` takes one value in every team of the CSV (a team-level column), counted here.
bool constantWithinTeams(const Table& t, const std::string& column) {
    const Column& team = t.at("team");
    const Column& x = t.at(column);
    std::map<int, double> first;
    for (std::size_t r = 0; r < t.rows(); ++r) {
        const auto [it, added] = first.emplace(team.codes[r], x.numbers[r]);
        if (!added && it->second != x.numbers[r]) return false;
    }
    return true;
}

// Scrolls `w` into view (as a user would) and clicks it.
void click(QWidget* w) {
    ASSERT_NE(w, nullptr);
    for (QWidget* p = w->parentWidget(); p; p = p->parentWidget())
        if (auto* scroll = qobject_cast<QScrollArea*>(p)) scroll->ensureWidgetVisible(w);
    QCoreApplication::processEvents();
    QTest::mouseClick(w, Qt::LeftButton);
}

QString plainText(const QLabel* label) {
    QTextDocument doc;
    doc.setHtml(label->text());
    return doc.toPlainText();
}

}  // namespace

// Choosing Groups: the choices appear, the focal predictor's random slope is
// on (it varies within teams) with a note, the standard errors become the
// model's own (HC3 does not apply), and one undo step takes it all back.
TEST(Multilevel, ChoosingGroupsShowsTheChoicesAndSetsTheModel) {
    Teams t;
    t.showSection(AnalysisPage::Specify);
    EXPECT_FALSE(t.panel()->isVisibleTo(t.specify()));
    const int undoBefore = t.undo()->count();
    t.chooseGroups();
    EXPECT_EQ(t.undo()->count(), undoBefore + 1);
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Set Groups to team"));
    const Analysis& a = t.analysis();
    EXPECT_EQ(a.multilevel.groups, "team");
    ASSERT_FALSE(constantWithinTeams(*t.table(), "hours"));  // hours varies within teams (counted here)
    EXPECT_EQ(a.multilevel.random_slopes, std::vector<std::string>{"hours"});
    EXPECT_EQ(a.se, SeKind::Classical);
    const QString note = t.specify()->message();
    EXPECT_TRUE(note.contains(QStringLiteral("own slope of 'hours'"))) << note.toStdString();
    EXPECT_TRUE(note.contains(QStringLiteral("model-based"))) << note.toStdString();
    EXPECT_FALSE(t.specify()->seBox()->isEnabled());
    EXPECT_EQ(t.specify()->seBox()->currentText(), QStringLiteral("model-based (multilevel model)"));

    // The choices: one row per numeric predictor (hours, climate, shift), the combos at their defaults.
    EXPECT_TRUE(t.panel()->isVisibleTo(t.specify()));
    for (const char* c : {"hours", "climate", "shift"}) {
        ASSERT_NE(t.panel()->randomSlopeBox(c), nullptr) << c;
        EXPECT_NE(t.panel()->centreWithinBox(c), nullptr) << c;
        EXPECT_NE(t.panel()->groupMeansBox(c), nullptr) << c;
    }
    EXPECT_TRUE(t.panel()->randomSlopeBox("hours")->isChecked());
    EXPECT_FALSE(t.panel()->randomSlopeBox("shift")->isChecked());
    // climate is a team-level column (counted here): its slope cannot vary between teams.
    ASSERT_TRUE(constantWithinTeams(*t.table(), "climate"));
    EXPECT_FALSE(t.panel()->randomSlopeBox("climate")->isEnabled());
    EXPECT_EQ(t.panel()->estimationBox()->currentData().toInt(), static_cast<int>(MixedEstimation::Reml));
    EXPECT_EQ(t.panel()->dfBox()->currentData().toInt(), static_cast<int>(FixedEffectDf::Satterthwaite));

    // The fit is the multilevel one core computes for this specification.
    const auto run = t.run();
    ASSERT_TRUE(run && run->fit.multilevel);
    EXPECT_EQ(run->fit.multilevel->terms, (std::vector<std::string>{"intercept", "hours"}));
    test::saveScreenshot(&t.w, QStringLiteral("multilevel-specify.png"));

    // Undo: single-level again, HC3 back, the choices hidden.
    t.undo()->undo();
    EXPECT_TRUE(t.analysis().multilevel.groups.empty());
    EXPECT_TRUE(t.analysis().multilevel.random_slopes.empty());
    EXPECT_EQ(t.analysis().se, SeKind::HC3);
    EXPECT_FALSE(t.panel()->isVisibleTo(t.specify()));
    EXPECT_TRUE(t.specify()->seBox()->isEnabled());
    t.undo()->redo();
    EXPECT_EQ(t.analysis().multilevel.random_slopes, std::vector<std::string>{"hours"});
}

// Each choice is one undoable edit, and the fit follows it (the run's
// random part against the specification).
TEST(Multilevel, EachChoiceIsAnUndoStepTheFitFollows) {
    Teams t;
    t.chooseGroups();
    const int start = t.undo()->count();
    MultilevelPanel* p = t.panel();
    click(p->randomSlopeBox("shift"));
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Turn on the random slope of shift"));
    click(p->centreWithinBox("hours"));
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Centre hours within groups"));
    click(p->groupMeansBox("hours"));
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Add the group means of hours"));
    test::chooseByKeys(p->estimationBox(), p->estimationBox()->findData(static_cast<int>(MixedEstimation::Ml)));
    test::chooseByKeys(p->covarianceBox(), p->covarianceBox()->findData(static_cast<int>(RandomCovariance::Diagonal)));
    test::chooseByKeys(p->dfBox(), p->dfBox()->findData(static_cast<int>(FixedEffectDf::BetweenWithin)));
    EXPECT_EQ(t.undo()->count(), start + 6);  // one step each
    const MultilevelSpec& ml = t.analysis().multilevel;
    EXPECT_EQ(ml.random_slopes, (std::vector<std::string>{"hours", "shift"}));
    EXPECT_EQ(ml.centre_within, std::vector<std::string>{"hours"});
    EXPECT_EQ(ml.group_means, std::vector<std::string>{"hours"});
    EXPECT_EQ(ml.estimation, MixedEstimation::Ml);
    EXPECT_EQ(ml.covariance, RandomCovariance::Diagonal);
    EXPECT_EQ(ml.df, FixedEffectDf::BetweenWithin);
    ASSERT_TRUE(t.waitForRun());
    ASSERT_TRUE(t.w.runner()->error(t.id).isEmpty()) << t.w.runner()->error(t.id).toStdString();
    const auto run = t.run();
    ASSERT_TRUE(run && run->fit.multilevel);
    EXPECT_EQ(run->fit.multilevel->estimation, MixedEstimation::Ml);
    EXPECT_EQ(run->fit.multilevel->structure, RandomCovariance::Diagonal);
    EXPECT_GE(run->fit.index_of(group_mean_name("hours")), 0);  // the group means joined the model
    for (int k = 0; k < 6; ++k) t.undo()->undo();
    EXPECT_EQ(t.analysis().multilevel.random_slopes, std::vector<std::string>{"hours"});
    EXPECT_TRUE(t.analysis().multilevel.centre_within.empty());
    EXPECT_EQ(t.analysis().multilevel.estimation, MixedEstimation::Reml);
    EXPECT_FALSE(p->centreWithinBox("hours")->isChecked());
    EXPECT_EQ(p->estimationBox()->currentData().toInt(), static_cast<int>(MixedEstimation::Reml));
}

// Groups rules out weights and clusters: the edit is refused with the reason
// and the other roles keep their columns; dragging the Clusters column onto
// Groups moves it, with the model's own standard errors.
TEST(Multilevel, GroupsBesideWeightsOrClustersIsExplainedAndTheirColumnsKept) {
    Teams t;
    t.showSection(AnalysisPage::Specify);
    QTest::mouseClick(t.specify()->slot(Role::Controls)->removeButton("shift"), Qt::LeftButton);
    t.pick(Role::Weights, "shift");
    ASSERT_EQ(t.analysis().roles.weights, "shift");
    const int undoBefore = t.undo()->count();
    t.pick(Role::Groups, "team");
    EXPECT_EQ(t.undo()->count(), undoBefore);  // refused
    EXPECT_TRUE(t.analysis().multilevel.groups.empty());
    EXPECT_EQ(t.analysis().roles.weights, "shift");
    EXPECT_TRUE(t.specify()->message().contains(QStringLiteral("does not take weights: remove 'shift' from Weights")))
        << t.specify()->message().toStdString();

    QTest::mouseClick(t.specify()->slot(Role::Weights)->clearButton(), Qt::LeftButton);
    t.pick(Role::Clusters, "team");
    ASSERT_EQ(t.analysis().se, SeKind::Cluster);
    std::unique_ptr<QMimeData> chip(columnMimeData("team", Role::Clusters));
    dropOn(t.specify()->slot(Role::Groups), chip.get());
    EXPECT_EQ(t.analysis().multilevel.groups, "team");
    EXPECT_TRUE(t.analysis().roles.clusters.empty());
    EXPECT_EQ(t.analysis().se, SeKind::Classical);
    EXPECT_EQ(t.undo()->undoText(), QStringLiteral("Move team from Clusters to Groups"));

    // With Groups, a Clusters column is refused and Groups stays.
    t.pick(Role::Clusters, "shift");
    EXPECT_TRUE(t.analysis().roles.clusters.empty());
    EXPECT_EQ(t.analysis().multilevel.groups, "team");
    EXPECT_TRUE(t.specify()->message().contains(QStringLiteral("Clusters 'shift'")))
        << t.specify()->message().toStdString();
}

// The Estimates section: each term's df in the last column and the random
// part, against the fit core computes here; no R².
TEST(Multilevel, EstimatesShowEachTermsDfAndTheRandomPart) {
    Teams t;
    t.chooseGroups();
    t.showSection(AnalysisPage::Estimates);
    const FitResult core = t.coreFit();  // core fit, computed in the test
    ASSERT_TRUE(core.multilevel);
    CoefficientModel* m = t.estimates()->coefficients();
    EXPECT_EQ(m->headerData(CoefficientModel::Df, Qt::Horizontal, Qt::DisplayRole).toString(), QStringLiteral("df"));
    ASSERT_EQ(m->rowCount(), static_cast<int>(core.coefficients.size()));
    for (int r = 0; r < m->rowCount(); ++r) {
        const Coefficient& c = core.coefficients[static_cast<std::size_t>(r)];
        EXPECT_DOUBLE_EQ(m->index(r, CoefficientModel::Estimate).data(CoefficientModel::ValueRole).toDouble(),
                         c.estimate);
        EXPECT_DOUBLE_EQ(m->index(r, CoefficientModel::Df).data(CoefficientModel::ValueRole).toDouble(), c.df);
        // Satterthwaite df are not whole: four significant digits (format_df's rule), checked with printf here.
        EXPECT_EQ(m->index(r, CoefficientModel::Df).data(CoefficientModel::FormattedRole).toString(),
                  test::fourDigits(c.df))
            << c.term;
    }
    EXPECT_FALSE(t.estimates()->fitLabel()->text().contains(QStringLiteral("R\u00b2")));
    EXPECT_FALSE(t.estimates()->comparisonLabel()->text().contains(QStringLiteral("R\u00b2")));
    EXPECT_TRUE(
        plainText(t.estimates()->headerLabel()).contains(QStringLiteral("multilevel linear model in groups of team")));

    RandomPartView* rp = t.estimates()->randomPart();
    ASSERT_TRUE(rp->isVisibleTo(t.estimates()));
    QTableWidget* table = rp->table();
    const auto& ml = *core.multilevel;
    ASSERT_EQ(table->rowCount(), 3);  // intercept, slope of hours, residual
    const auto value = [&](int r, int c) { return table->item(r, c)->data(Qt::UserRole).toDouble(); };
    EXPECT_EQ(table->item(1, 0)->text(), QStringLiteral("slope of hours"));
    EXPECT_DOUBLE_EQ(value(0, 1), ml.covariance(0, 0));
    EXPECT_DOUBLE_EQ(value(1, 2), std::sqrt(ml.covariance(1, 1)));  // SD: the square root (definition)
    // The correlation tau10 / sqrt(tau00 tau11) (definition).
    EXPECT_NEAR(value(1, 3), ml.covariance(1, 0) / std::sqrt(ml.covariance(0, 0) * ml.covariance(1, 1)), 1e-12);
    EXPECT_DOUBLE_EQ(value(2, 1), ml.residual_variance);
    EXPECT_EQ(table->item(2, 1)->text(), test::fourDigits(ml.residual_variance));
    const QString details = plainText(rp->detailsLabel());
    EXPECT_TRUE(details.contains(QStringLiteral("45 groups of team"))) << details.toStdString();  // 45 teams in the CSV
    ASSERT_EQ(ml.slope_tests.size(), 1u);
    EXPECT_TRUE(
        details.contains(QStringLiteral("likelihood ratio %1").arg(test::fourDigits(ml.slope_tests[0].statistic))))
        << details.toStdString();
    EXPECT_TRUE(details.contains(QStringLiteral("50:50 mixture of \u03c7\u00b2(1) and \u03c7\u00b2(2)")));
    EXPECT_TRUE(details.contains(QStringLiteral("Estimation: REML")));
    EXPECT_TRUE(details.contains(QStringLiteral("degrees of freedom: Satterthwaite")));
    EXPECT_EQ(rp->singularLabel()->isVisibleTo(rp), ml.singular);
    ASSERT_FALSE(ml.singular);
    test::saveScreenshot(&t.w, QStringLiteral("multilevel-estimates.png"));

    // A random slope for shift (no slope of its own in these data): core finds the fit singular, and the
    // section says so.
    t.showSection(AnalysisPage::Specify);
    click(t.panel()->randomSlopeBox("shift"));
    ASSERT_TRUE(t.waitForRun());
    t.showSection(AnalysisPage::Estimates);
    const FitResult withShift = t.coreFit();
    ASSERT_TRUE(withShift.multilevel && withShift.multilevel->singular);
    EXPECT_TRUE(rp->singularLabel()->isVisibleTo(rp));
    EXPECT_TRUE(rp->singularLabel()->text().contains(QStringLiteral("Singular fit")));
    EXPECT_TRUE(plainText(rp->detailsLabel()).contains(QStringLiteral("No intraclass correlation")));
    test::saveScreenshot(rp, QStringLiteral("multilevel-random-part-singular.png"));
}

// The memo: the random part in sentences and the multilevel cautions; no R².
TEST(Multilevel, MemoStatesTheRandomPartAndItsCautions) {
    Teams t;
    t.chooseGroups();
    t.activate();
    QTest::keyClick(&t.w, Qt::Key_5, Qt::ControlModifier);
    MemoSection* memo = t.w.analysisPage()->memo();
    ASSERT_TRUE(test::waitUntil(
        [&] { return memo->isVisible() && memo->editor()->toPlainText().contains(QStringLiteral("Findings")); }));
    const QString text = memo->editor()->toPlainText();
    // 45 teams of 1 to 14 rows (counted from the CSV by the data's generator, fixture mixed_slope.json).
    EXPECT_TRUE(text.contains(QStringLiteral("Rows are nested in 45 groups of team (1 to 14 rows each")))
        << text.toStdString();
    const FitResult core = t.coreFit();  // core fit, computed in the test
    const MultilevelResult& ml = *core.multilevel;
    EXPECT_TRUE(text.contains(
        QStringLiteral("the intercept varies with SD %1").arg(test::fourDigits(std::sqrt(ml.covariance(0, 0))))));
    EXPECT_TRUE(text.contains(QStringLiteral("Whether the slope of hours varies between groups: likelihood ratio %1")
                                  .arg(test::fourDigits(ml.slope_tests[0].statistic))));
    EXPECT_TRUE(text.contains(QStringLiteral("typical group of team")));
    EXPECT_TRUE(text.contains(QStringLiteral("extrapolation across groups")));
    EXPECT_TRUE(text.contains(QStringLiteral("Random part: variance between and within groups of team")));
    EXPECT_FALSE(text.contains(QStringLiteral("R\u00b2"))) << "a multilevel memo reports no R²";
}

// Checks: the residual plot shows the conditional residuals; in place of the
// influence plot (least-squares measures) a note; rows flagged by the
// residual rule alone, with no leverage or Cook's distance columns.
TEST(Multilevel, ChecksShowConditionalResidualsAndANoteInPlaceOfInfluence) {
    Teams t;
    t.chooseGroups();
    t.showSection(AnalysisPage::Checks);
    ChecksSection* checks = t.w.analysisPage()->checks();
    ASSERT_TRUE(test::waitUntil([&] { return checks->shownDiagnostics() != nullptr; }));
    EXPECT_FALSE(checks->influencePlot()->isVisibleTo(checks));
    EXPECT_TRUE(checks->influenceNote()->isVisibleTo(checks));
    EXPECT_TRUE(checks->influenceNote()->text().contains(QStringLiteral("Cook's distance and leverage")));
    EXPECT_EQ(checks->figures().size(), 2);  // residuals and quantiles only
    EXPECT_TRUE(checks->flaggedView()->isColumnHidden(FlaggedRowsModel::Leverage));
    EXPECT_TRUE(checks->flaggedView()->isColumnHidden(FlaggedRowsModel::Cooks));

    // The residual plot's points: y minus the fitted values with the group effects, from core's fit made here.
    const FitResult core = t.coreFit();
    DiagnosticPlot* plot = checks->residualPlot();
    auto data = plot->pointsGraph()->data();
    std::set<double> shown;
    for (auto it = data->constBegin(); it != data->constEnd(); ++it) shown.insert(it->value);
    for (Eigen::Index i = 0; i < core.residuals.size(); ++i) {
        if (std::fabs(core.residuals[i] / std::sqrt(core.multilevel->residual_variance)) > 3) continue;  // flagged
        EXPECT_TRUE(shown.count(core.residuals[i])) << "row " << i;
    }
    EXPECT_TRUE(checks->rulesLabel()->text().contains(QStringLiteral("standardised conditional residual")));
    test::saveScreenshot(&t.w, QStringLiteral("multilevel-checks.png"));
}
