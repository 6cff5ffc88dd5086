// The Specify and Estimates sections driven through their widgets: roles
// changed by picker and by drop, undo/redo, refused edits, copying the
// coefficient table, the logistic sample. Numbers on screen are checked
// against a direct core fit of the same specification and, for the
// orchard-nitrogen sample, against statsmodels (fixture written by
// tests/reference/make_ui_estimates_reference.py).
#include <gtest/gtest.h>

#include <QAction>
#include <QApplication>
#include <QClipboard>
#include <QComboBox>
#include <QDoubleSpinBox>
#include <QDropEvent>
#include <QFile>
#include <QHeaderView>
#include <QLabel>
#include <QMenu>
#include <QMenuBar>
#include <QMimeData>
#include <QRadioButton>
#include <QStandardItemModel>
#include <QTableView>
#include <QTest>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>
#include <nlohmann/json.hpp>

#include "estimates/coefficient_model.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/analysis_run.hpp"
#include "moderato/project/project_loader.hpp"
#include "sample_window.hpp"
#include "sections/estimates_section.hpp"
#include "sections/specify_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "specify/column_list_model.hpp"
#include "specify/column_mime.hpp"
#include "specify/role_slot.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// An open sample project with its first analysis fitted.
struct Open : test::SampleWindow {
    explicit Open(const QString& name) : SampleWindow(test::sampleProject(name), QSize(1280, 860)) {}
    SpecifySection* specify() const { return w.analysisPage()->specify(); }
    EstimatesSection* estimates() const { return w.analysisPage()->estimates(); }
    std::shared_ptr<const Table> table() const { return w.document()->table(analysis().dataset); }
};

nlohmann::json orchardReference() {
    // Written by tests/reference/make_ui_estimates_reference.py (statsmodels 0.13.5, OLS, cov_type='HC3').
    QFile f(test::samplesDir() + QStringLiteral("/../tests/reference/fixtures/ui_estimates_orchard.json"));
    if (!f.open(QIODevice::ReadOnly)) {
        ADD_FAILURE() << "missing fixture " << f.fileName().toStdString();
        return {};
    }
    return nlohmann::json::parse(f.readAll().toStdString());
}

double cell(const CoefficientModel* m, int row, int col) {
    return m->index(row, col).data(CoefficientModel::ValueRole).toDouble();
}

void expectRel(double got, double want, double tol, const std::string& what) {
    EXPECT_LE(std::fabs(got - want), tol * std::max(1.0, std::fabs(want))) << what << ": " << got << " vs " << want;
}

// The table on screen against a fit computed directly by core for the same specification.
void expectTableEqualsFit(const CoefficientModel* m, const FitResult& fit) {
    ASSERT_EQ(m->rowCount(), static_cast<int>(fit.coefficients.size()));
    for (int r = 0; r < m->rowCount(); ++r) {
        const Coefficient& c = fit.coefficients[static_cast<std::size_t>(r)];
        EXPECT_EQ(m->index(r, CoefficientModel::Term).data().toString().toStdString(), c.term);
        EXPECT_DOUBLE_EQ(cell(m, r, CoefficientModel::Estimate), c.estimate) << c.term;
        EXPECT_DOUBLE_EQ(cell(m, r, CoefficientModel::StdError), c.std_error) << c.term;
        EXPECT_DOUBLE_EQ(cell(m, r, CoefficientModel::Statistic), c.statistic) << c.term;
        EXPECT_DOUBLE_EQ(cell(m, r, CoefficientModel::Lower), c.ci_lower) << c.term;
        EXPECT_DOUBLE_EQ(cell(m, r, CoefficientModel::Upper), c.ci_upper) << c.term;
    }
}

// The table on screen against one statsmodels case of the fixture.
void expectTableEqualsStatsmodels(const CoefficientModel* m, const nlohmann::json& ref) {
    const auto& terms = ref.at("terms");
    ASSERT_EQ(m->rowCount(), static_cast<int>(terms.size()));
    for (int r = 0; r < m->rowCount(); ++r) {
        const auto i = static_cast<std::size_t>(r);
        const std::string term = terms[i].get<std::string>();
        EXPECT_EQ(m->index(r, CoefficientModel::Term).data().toString().toStdString(), term);
        // statsmodels 0.13.5 OLS cov_type='HC3' (fixture ui_estimates_orchard.json)
        expectRel(cell(m, r, CoefficientModel::Estimate), ref["estimates"][i].get<double>(), 1e-9, term + " estimate");
        expectRel(cell(m, r, CoefficientModel::StdError), ref["std_errors"][i].get<double>(), 1e-8, term + " SE");
        expectRel(cell(m, r, CoefficientModel::Statistic), ref["statistics"][i].get<double>(), 1e-8, term + " t");
        expectRel(cell(m, r, CoefficientModel::Lower), ref["ci_lower_95"][i].get<double>(), 1e-8, term + " lower");
        expectRel(cell(m, r, CoefficientModel::Upper), ref["ci_upper_95"][i].get<double>(), 1e-8, term + " upper");
        const double p = ref["p_values"][i].get<double>();
        if (p > 1e-12) expectRel(cell(m, r, CoefficientModel::P), p, 1e-6, term + " p");
        // formatting: tiny p-values read "< 0.001" (common practice)
        if (p < 0.001) {
            EXPECT_EQ(m->index(r, CoefficientModel::P).data(CoefficientModel::FormattedRole).toString(),
                      QStringLiteral("< 0.001"));
        }
        // statsmodels variance_inflation_factor (fixture); none for the intercept
        if (ref["vif"][i].is_null()) {
            EXPECT_TRUE(std::isnan(cell(m, r, CoefficientModel::Vif))) << term;
        } else {
            expectRel(cell(m, r, CoefficientModel::Vif), ref["vif"][i].get<double>(), 1e-8, term + " VIF");
        }
    }
}

// Sends a synthesized drag-enter and drop (no QDrag) carrying `mime` to a slot.
void dropOn(RoleSlot* slot, const QMimeData* mime) {
    const QPoint at = slot->rect().center();
    QDragEnterEvent enter(at, Qt::CopyAction | Qt::MoveAction, mime, Qt::LeftButton, Qt::NoModifier);
    QCoreApplication::sendEvent(slot, &enter);
    ASSERT_TRUE(enter.isAccepted()) << "the slot refused the drag";
    QDropEvent drop(QPointF(at), Qt::CopyAction | Qt::MoveAction, mime, Qt::LeftButton, Qt::NoModifier);
    QCoreApplication::sendEvent(slot, &drop);
}

QMimeData* columnListMime(SpecifySection* s, const std::string& column) {
    const int row = s->columnModel()->rowOf(column);
    EXPECT_GE(row, 0) << column;
    return s->columnModel()->mimeData({s->columnModel()->index(row, 0)});
}

void clickPick(RoleSlot* slot, const std::string& column) {
    QAction* a = slot->pickAction(column);
    ASSERT_NE(a, nullptr) << "no picker entry for " << column;
    a->trigger();
}

}  // namespace

TEST(SpecifyEstimates, PickerMovesAControlToModeratorAndTheTableFollows) {
    Open o(QStringLiteral("orchard-nitrogen"));
    const nlohmann::json ref = orchardReference();
    // The analysis as shipped: statsmodels on the same model.
    expectTableEqualsStatsmodels(o.estimates()->coefficients(), ref["cases"]["sample_analysis"]);

    o.w.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&o.w));
    o.w.analysisPage()->showSection(AnalysisPage::Specify);
    const int undoBefore = o.undo()->count();
    // Take slope_pct out of Controls with its chip's remove button, then pick it for the Moderator.
    QToolButton* remove = o.specify()->slot(Role::Controls)->removeButton("slope_pct");
    ASSERT_NE(remove, nullptr);
    QTest::mouseClick(remove, Qt::LeftButton);
    EXPECT_TRUE(o.analysis().roles.controls.empty());
    clickPick(o.specify()->slot(Role::Moderator), "slope_pct");
    EXPECT_EQ(o.analysis().roles.moderator, "slope_pct");
    EXPECT_EQ(o.undo()->count(), undoBefore + 2);  // one undo step per edit
    EXPECT_EQ(o.undo()->undoText(), QStringLiteral("Set Moderator to slope_pct"));
    ASSERT_TRUE(o.waitForRun());
    ASSERT_TRUE(o.w.runner()->error(o.id).isEmpty()) << o.w.runner()->error(o.id).toStdString();

    // The same specification fitted directly by core (fit_model on the same data).
    const FitResult direct = fit_model(*o.table(), model_spec(o.analysis()));
    expectTableEqualsFit(o.estimates()->coefficients(), direct);
    // ... and by statsmodels 0.13.5 (OLS, HC3) on plots.csv.
    const auto& case2 = ref["cases"]["moderator_slope"];
    expectTableEqualsStatsmodels(o.estimates()->coefficients(), case2);

    // Header states SE kind and level; fit statistics and the comparison use the fixture's numbers.
    const QString header = o.estimates()->headerLabel()->text();
    EXPECT_TRUE(header.contains(QStringLiteral("HC3"))) << header.toStdString();
    EXPECT_TRUE(header.contains(QStringLiteral("95%"))) << header.toStdString();
    const QString fitText = o.estimates()->fitLabel()->text();
    // statsmodels rsquared / rsquared_adj, shown with 4 decimals
    EXPECT_TRUE(fitText.contains(QString::number(case2["r_squared"].get<double>(), 'f', 4))) << fitText.toStdString();
    EXPECT_TRUE(fitText.contains(QString::number(case2["adj_r_squared"].get<double>(), 'f', 4)));
    // statsmodels fvalue with cov_type='HC3' (a Wald F), 2 decimals
    EXPECT_TRUE(
        fitText.contains(QStringLiteral("F(3, 476) = ") + QString::number(case2["f_statistic"].get<double>(), 'f', 2)))
        << fitText.toStdString();
    const QString cmp = o.estimates()->comparisonLabel()->text();
    // statsmodels compare_f_test (classical R² change) and wald_test with HC3
    const auto& change = case2["r_squared_change"];
    EXPECT_TRUE(
        cmp.contains(QStringLiteral("F(1, 476) = ") + QString::number(change["f_statistic"].get<double>(), 'f', 2)))
        << cmp.toStdString();
    EXPECT_TRUE(cmp.contains(QString::number(change["r_squared_reduced"].get<double>(), 'f', 4))) << cmp.toStdString();
    const auto& wald = case2["wald_product"];
    EXPECT_TRUE(cmp.contains(QStringLiteral("HC3 covariance: F(1, 476) = ") +
                             QString::number(wald["statistic"].get<double>(), 'f', 2)))
        << cmp.toStdString();
    // HC3 chosen: the Wald test is the one to report, the classical R² change test secondary (one story).
    const qsizetype waldAt = cmp.indexOf(QStringLiteral("HC3 covariance: F(1, 476)"));
    EXPECT_GT(cmp.indexOf(QStringLiteral(" — <b>the test to report</b>."), waldAt), waldAt) << cmp.toStdString();
    EXPECT_EQ(cmp.count(QStringLiteral("the test to report")), 1) << cmp.toStdString();
    EXPECT_TRUE(cmp.contains(QStringLiteral("secondary here: it assumes the same error variance in every row")))
        << cmp.toStdString();

    // The equation names the columns; the reading names focal and moderator (from the roles).
    const QString eq = o.specify()->equationLabel()->toolTip();
    EXPECT_EQ(eq, QStringLiteral("ŷ = b₀ + b₁·nitrogen_kg_ha + b₂·slope_pct + b₃·nitrogen_kg_ha×slope_pct"));
    EXPECT_EQ(o.specify()->readingLabel()->text(),
              QStringLiteral("b₃ is how much the slope of nitrogen_kg_ha changes per unit of slope_pct."));
    EXPECT_TRUE(o.specify()->rowsLabel()->text().startsWith(QStringLiteral("n = 480 rows used")));
    EXPECT_TRUE(o.specify()->message().isEmpty()) << o.specify()->message().toStdString();
}

TEST(SpecifyEstimates, DroppingColumnsOnSlotsEditsTheAnalysis) {
    Open o(QStringLiteral("orchard-nitrogen"));
    SpecifySection* s = o.specify();
    // A chip dragged out of Controls onto Second moderator: a move.
    std::unique_ptr<QMimeData> fromControls(columnMimeData("slope_pct", Role::Controls));
    dropOn(s->slot(Role::SecondModerator), fromControls.get());
    EXPECT_EQ(o.analysis().roles.second_moderator, "slope_pct");
    EXPECT_TRUE(o.analysis().roles.controls.empty());
    EXPECT_EQ(o.undo()->undoText(), QStringLiteral("Move slope_pct from Controls to Second moderator"));
    ASSERT_TRUE(o.waitForRun());
    ASSERT_TRUE(o.w.runner()->error(o.id).isEmpty()) << o.w.runner()->error(o.id).toStdString();
    // The three-way model: core fit_model on the same data and roles.
    const FitResult threeWay = fit_model(*o.table(), model_spec(o.analysis()));
    expectTableEqualsFit(o.estimates()->coefficients(), threeWay);
    EXPECT_EQ(o.estimates()->coefficients()->rowCount(), 8);  // 1 + 3 mains + 3 pairs + 1 triple (closed form)

    // A column from the list dropped on an empty Controls slot, through the list model's own drag data.
    std::unique_ptr<QMimeData> listed(columnListMime(s, "soil_moisture_pct"));
    ASSERT_TRUE(listed);
    EXPECT_FALSE(columnFromMime(listed.get())->from.has_value());
    QTest::mouseClick(s->slot(Role::Moderator)->clearButton(), Qt::LeftButton);
    EXPECT_TRUE(o.analysis().roles.moderator.empty());
    dropOn(s->slot(Role::Controls), listed.get());
    EXPECT_EQ(o.analysis().roles.controls, std::vector<std::string>{"soil_moisture_pct"});
    EXPECT_EQ(o.undo()->undoText(), QStringLiteral("Add soil_moisture_pct to Controls"));
    // No Moderator now: core refuses and the banner says so, naming the role.
    ASSERT_TRUE(o.waitForRun());
    EXPECT_TRUE(s->errorBanner()->isVisibleTo(s));
    EXPECT_TRUE(s->errorBanner()->text().contains(QStringLiteral("Moderator")))
        << s->errorBanner()->text().toStdString();
    EXPECT_TRUE(o.estimates()->errorBanner()->isVisibleTo(o.estimates()));
    EXPECT_EQ(o.estimates()->coefficients()->rowCount(), 0);

    // Dragging between two single slots swaps them.
    std::unique_ptr<QMimeData> second(columnMimeData("slope_pct", Role::SecondModerator));
    dropOn(s->slot(Role::Moderator), second.get());
    EXPECT_EQ(o.analysis().roles.moderator, "slope_pct");
    EXPECT_TRUE(o.analysis().roles.second_moderator.empty());
    ASSERT_TRUE(o.waitForRun());
    EXPECT_FALSE(s->errorBanner()->isVisibleTo(s));
}

TEST(SpecifyEstimates, UndoAndRedoRestoreRolesAndTable) {
    Open o(QStringLiteral("orchard-nitrogen"));
    const nlohmann::json ref = orchardReference();
    const Roles original = o.analysis().roles;
    std::unique_ptr<QMimeData> mime(columnMimeData("slope_pct", Role::Controls));
    dropOn(o.specify()->slot(Role::Moderator), mime.get());
    const Roles moved = o.analysis().roles;
    EXPECT_EQ(moved.moderator, "slope_pct");
    ASSERT_TRUE(o.waitForRun());
    // statsmodels 0.13.5 OLS HC3 (fixture case moderator_slope)
    expectTableEqualsStatsmodels(o.estimates()->coefficients(), ref["cases"]["moderator_slope"]);
    EXPECT_EQ(o.specify()->slot(Role::Moderator)->columns(), std::vector<std::string>{"slope_pct"});

    o.undo()->undo();
    EXPECT_EQ(o.analysis().roles, original);
    ASSERT_TRUE(o.waitForRun());
    EXPECT_EQ(o.specify()->slot(Role::Moderator)->columns(), std::vector<std::string>{"soil_moisture_pct"});
    EXPECT_EQ(o.specify()->slot(Role::Controls)->columns(), std::vector<std::string>{"slope_pct"});
    // statsmodels 0.13.5 OLS HC3 (fixture case sample_analysis)
    expectTableEqualsStatsmodels(o.estimates()->coefficients(), ref["cases"]["sample_analysis"]);

    o.undo()->redo();
    EXPECT_EQ(o.analysis().roles, moved);
    ASSERT_TRUE(o.waitForRun());
    expectTableEqualsStatsmodels(o.estimates()->coefficients(), ref["cases"]["moderator_slope"]);
    EXPECT_TRUE(o.specify()->slot(Role::Controls)->columns().empty());
}

TEST(SpecifyEstimates, ANameMadeFromTheRolesFollowsThemAndAGivenNameStays) {
    Open o(QStringLiteral("orchard-nitrogen"));
    // The sample's name was given by a person: a role change leaves it.
    const std::string given = o.analysis().name;
    std::unique_ptr<QMimeData> mime(columnMimeData("slope_pct", Role::Controls));
    dropOn(o.specify()->slot(Role::Moderator), mime.get());
    EXPECT_EQ(o.analysis().roles.moderator, "slope_pct");
    EXPECT_EQ(o.analysis().name, given);
    o.undo()->undo();
    // A name that is the roles' own (as a new analysis gets) follows the next role change.
    Analysis named = o.analysis();
    named.name = roleBasedName(named.roles);
    EXPECT_EQ(named.name, "nitrogen_kg_ha × soil_moisture_pct");
    o.w.document()->setAnalysis(named, QStringLiteral("Rename"));
    std::unique_ptr<QMimeData> again(columnMimeData("slope_pct", Role::Controls));
    dropOn(o.specify()->slot(Role::Moderator), again.get());
    EXPECT_EQ(o.analysis().name, "nitrogen_kg_ha × slope_pct");
    o.undo()->undo();
    EXPECT_EQ(o.analysis().name, "nitrogen_kg_ha × soil_moisture_pct");
}

TEST(SpecifyEstimates, RefusedEditsExplainThemselvesAndChangeNothing) {
    Open o(QStringLiteral("orchard-nitrogen"));
    SpecifySection* s = o.specify();
    const Analysis before = o.analysis();
    const int undoBefore = o.undo()->count();

    // The Moderator picked again as the Focal predictor.
    clickPick(s->slot(Role::Focal), "soil_moisture_pct");
    EXPECT_EQ(o.analysis(), before);
    EXPECT_EQ(o.undo()->count(), undoBefore);
    QString msg = s->message();
    EXPECT_TRUE(msg.contains(QStringLiteral("'soil_moisture_pct'"))) << msg.toStdString();
    EXPECT_TRUE(msg.contains(QStringLiteral("Focal predictor"))) << msg.toStdString();
    EXPECT_TRUE(msg.contains(QStringLiteral("Moderator"))) << msg.toStdString();
    EXPECT_TRUE(s->messageLabel()->isVisibleTo(s));

    // A control dropped from the column list on the Outcome.
    std::unique_ptr<QMimeData> listed(columnListMime(s, "slope_pct"));
    dropOn(s->slot(Role::Outcome), listed.get());
    EXPECT_EQ(o.analysis(), before);
    EXPECT_EQ(o.undo()->count(), undoBefore);
    msg = s->message();
    EXPECT_TRUE(msg.contains(QStringLiteral("'slope_pct'")) && msg.contains(QStringLiteral("Outcome")) &&
                msg.contains(QStringLiteral("Controls")))
        << msg.toStdString();

    // Cluster-robust SE with no Clusters column.
    const int cluster = s->seBox()->findData(static_cast<int>(SeKind::Cluster));
    s->seBox()->setCurrentIndex(cluster);
    Q_EMIT s->seBox()->activated(cluster);
    EXPECT_EQ(o.analysis(), before);
    EXPECT_TRUE(s->message().contains(QStringLiteral("Clusters"))) << s->message().toStdString();
    EXPECT_EQ(s->seBox()->currentData().toInt(), static_cast<int>(SeKind::HC3));  // the box shows the real setting

    // Logistic family with a yield outcome (not 0/1).
    QTest::keyClick(s->familyBox(), Qt::Key_Down);
    EXPECT_EQ(o.analysis(), before);
    msg = s->message();
    EXPECT_TRUE(msg.contains(QStringLiteral("logistic")) && msg.contains(QStringLiteral("'yield_t_ha'")))
        << msg.toStdString();

    // A fine edit clears the message.
    QTest::mouseClick(s->slot(Role::Controls)->removeButton("slope_pct"), Qt::LeftButton);
    EXPECT_EQ(o.undo()->count(), undoBefore + 1);
    EXPECT_TRUE(s->message().isEmpty()) << s->message().toStdString();
}

TEST(SpecifyEstimates, CategoricalOutcomeIsRefused) {
    Open o(QStringLiteral("helpdesk-staffing"));
    const Analysis before = o.analysis();
    clickPick(o.specify()->slot(Role::Outcome), "weekday");  // weekday is a control: refused as a second role
    EXPECT_EQ(o.analysis(), before);
    // Free the column first, then try again: refused because it is categorical.
    QTest::mouseClick(o.specify()->slot(Role::Controls)->removeButton("weekday"), Qt::LeftButton);
    const Analysis freed = o.analysis();
    clickPick(o.specify()->slot(Role::Outcome), "weekday");
    EXPECT_EQ(o.analysis(), freed);
    const QString msg = o.specify()->message();
    EXPECT_TRUE(msg.contains(QStringLiteral("Outcome")) && msg.contains(QStringLiteral("'weekday'")) &&
                msg.contains(QStringLiteral("categorical")))
        << msg.toStdString();
}

TEST(SpecifyEstimates, CopyTableGivesTabSeparatedTextWithEveryDigit) {
    Open o(QStringLiteral("orchard-nitrogen"));
    EstimatesSection* e = o.estimates();
    const auto run = o.w.runner()->result(o.id);
    ASSERT_TRUE(run);
    QApplication::clipboard()->clear();
    QTest::mouseClick(e->copyButton(), Qt::LeftButton);
    const QString text = QApplication::clipboard()->text();
    QStringList lines = text.split(QLatin1Char('\n'));
    ASSERT_FALSE(lines.isEmpty());
    EXPECT_TRUE(lines.back().isEmpty());  // ends with a line break
    lines.removeLast();
    ASSERT_EQ(lines.size(), 1 + static_cast<int>(run->fit.coefficients.size()));  // header + one line per coefficient
    EXPECT_EQ(lines[0], QStringLiteral("Term\tEstimate\tSE\tt\tp\tLower 95%\tUpper 95%\tVIF"));
    for (int r = 1; r < lines.size(); ++r) {
        const QStringList f = lines[r].split(QLatin1Char('\t'));
        ASSERT_EQ(f.size(), 8) << lines[r].toStdString();
        const Coefficient& c = run->fit.coefficients[static_cast<std::size_t>(r - 1)];
        EXPECT_EQ(f[0].toStdString(), c.term);
        // every digit: the text reads back as the same double
        EXPECT_EQ(f[1].toDouble(), c.estimate);
        EXPECT_EQ(f[2].toDouble(), c.std_error);
        EXPECT_EQ(f[4].toDouble(), c.p_value);
    }

    // Edit > Copy with the table focused copies the same (no selection: the whole table).
    o.w.show();
    o.w.analysisPage()->showSection(AnalysisPage::Estimates);
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&o.w));
    o.w.activateWindow();
    e->table()->setFocus();
    ASSERT_TRUE(test::waitUntil([&] { return QApplication::focusWidget() == e->table(); }, 3000));
    QApplication::clipboard()->clear();
    QAction* copy = nullptr;
    for (QAction* top : o.w.menuBar()->actions())
        if (top->menu())
            for (QAction* a : top->menu()->actions())
                if (a->shortcut() == QKeySequence(QKeySequence::Copy)) copy = a;
    ASSERT_NE(copy, nullptr);
    copy->trigger();
    EXPECT_EQ(QApplication::clipboard()->text(), text);
}

TEST(SpecifyEstimates, LogisticSampleOffersOnlyItsStandardErrorsAndTestsWithZ) {
    Open o(QStringLiteral("trial-conversion"));
    SpecifySection* s = o.specify();
    auto* items = qobject_cast<QStandardItemModel*>(s->seBox()->model());
    ASSERT_NE(items, nullptr);
    for (SeKind k : {SeKind::HC2, SeKind::HC3, SeKind::HC4}) {
        const int i = s->seBox()->findData(static_cast<int>(k));
        ASSERT_GE(i, 0);
        EXPECT_FALSE(items->item(i)->isEnabled()) << i;
        EXPECT_TRUE(s->seBox()->itemData(i, Qt::ToolTipRole).toString().contains(QStringLiteral("logistic")));
    }
    for (SeKind k : {SeKind::Classical, SeKind::HC0, SeKind::HC1, SeKind::Cluster})
        EXPECT_TRUE(items->item(s->seBox()->findData(static_cast<int>(k)))->isEnabled());
    // z, not t (the logistic model is compared with the normal distribution: common practice).
    EXPECT_EQ(o.estimates()
                  ->coefficients()
                  ->headerData(CoefficientModel::Statistic, Qt::Horizontal, Qt::DisplayRole)
                  .toString(),
              QStringLiteral("z"));
    EXPECT_EQ(o.estimates()->table()->model()->headerData(CoefficientModel::Statistic, Qt::Horizontal).toString(),
              QStringLiteral("z"));
    EXPECT_TRUE(o.estimates()->headerLabel()->text().contains(QStringLiteral("z (standard normal)")));
    EXPECT_TRUE(s->equationLabel()->toolTip().startsWith(QStringLiteral("logit P(converted = 1) = b₀ + ")))
        << s->equationLabel()->toolTip().toStdString();
    // region is categorical: its dummies appear in the equation, labelled like the fit's coefficients.
    const auto run = o.w.runner()->result(o.id);
    ASSERT_TRUE(run);
    int dummies = 0;
    for (const auto& c : run->fit.coefficients) {
        if (c.term.rfind("region=", 0) != 0) continue;
        ++dummies;
        EXPECT_TRUE(s->equationLabel()->toolTip().contains(
            QStringLiteral("[region = %1]").arg(QString::fromStdString(c.term.substr(7)))))
            << c.term;
    }
    EXPECT_GE(dummies, 1);
    // The same fit directly through core (fit_model on the same data).
    expectTableEqualsFit(o.estimates()->coefficients(), fit_model(*o.table(), model_spec(o.analysis())));
    EXPECT_TRUE(o.estimates()->fitLabel()->text().contains(QStringLiteral("McFadden")));

    // Linear with HC3, then back to logistic: HC3 does not exist there, so the
    // switch brings HC0 along, in one undo step.
    QTest::keyClick(s->familyBox(), Qt::Key_Up);
    ASSERT_EQ(o.analysis().family, Family::Linear);
    const int hc3 = s->seBox()->findData(static_cast<int>(SeKind::HC3));
    EXPECT_TRUE(items->item(hc3)->isEnabled());
    s->seBox()->setCurrentIndex(hc3);
    Q_EMIT s->seBox()->activated(hc3);
    ASSERT_EQ(o.analysis().se, SeKind::HC3);
    const int steps = o.undo()->count();
    QTest::keyClick(s->familyBox(), Qt::Key_Down);
    EXPECT_EQ(o.analysis().family, Family::Logistic);
    EXPECT_EQ(o.analysis().se, SeKind::HC0);
    EXPECT_EQ(o.undo()->count(), steps + 1);
    EXPECT_TRUE(s->message().contains(QStringLiteral("HC0"))) << s->message().toStdString();
    o.undo()->undo();
    EXPECT_EQ(o.analysis().family, Family::Linear);
    EXPECT_EQ(o.analysis().se, SeKind::HC3);
    o.undo()->undo();
    o.undo()->undo();
    ASSERT_TRUE(o.waitForRun());
    EXPECT_TRUE(o.estimates()->comparisonLabel()->text().contains(QStringLiteral("Likelihood-ratio test")));
}

TEST(SpecifyEstimates, CentringToggleChangesLowerOrderTermsOnly) {
    Open o(QStringLiteral("orchard-nitrogen"));
    SpecifySection* s = o.specify();
    EstimatesSection* e = o.estimates();
    EXPECT_FALSE(e->centringToggle()->isVisibleTo(e));
    QTest::keyClick(s->centringBox(), Qt::Key_Down);
    ASSERT_EQ(o.analysis().centring, Centring::Mean);
    ASSERT_TRUE(o.waitForRun());
    const auto run = o.w.runner()->result(o.id);
    ASSERT_TRUE(run && run->centred_fit);
    EXPECT_TRUE(e->centringToggle()->isVisibleTo(e));
    const CoefficientModel* m = e->coefficients();
    const double b1 = cell(m, 1, CoefficientModel::Estimate), b2 = cell(m, 2, CoefficientModel::Estimate);
    const double b4 = cell(m, 4, CoefficientModel::Estimate);
    e->show();
    QTest::mouseClick(e->centredButton(), Qt::LeftButton);
    ASSERT_TRUE(e->showingCentred());
    EXPECT_TRUE(m->index(1, 0).data().toString().startsWith(QStringLiteral("(nitrogen_kg_ha − ")));
    // Closed form: with x and z centred at their means, b1' = b1 + b4·mean(z), b2' = b2 + b4·mean(x),
    // and the product coefficient b4 is unchanged.
    const double mx = run->centres.at("nitrogen_kg_ha"), mz = run->centres.at("soil_moisture_pct");
    expectRel(cell(m, 1, CoefficientModel::Estimate), b1 + b4 * mz, 1e-9, "centred focal");
    expectRel(cell(m, 2, CoefficientModel::Estimate), b2 + b4 * mx, 1e-9, "centred moderator");
    expectRel(cell(m, 4, CoefficientModel::Estimate), b4, 1e-9, "product");
    // The sample means (closed form) of the 480 rows.
    double sx = 0, sz = 0;
    const Table& t = *o.table();
    for (std::size_t i = 0; i < t.rows(); ++i) {
        sx += t.at("nitrogen_kg_ha").numbers[i];
        sz += t.at("soil_moisture_pct").numbers[i];
    }
    expectRel(mx, sx / static_cast<double>(t.rows()), 1e-12, "mean x");
    expectRel(mz, sz / static_cast<double>(t.rows()), 1e-12, "mean z");
    QTest::mouseClick(e->asIsButton(), Qt::LeftButton);
    EXPECT_EQ(cell(m, 1, CoefficientModel::Estimate), b1);
}

// One story of inference: a column dropped on Clusters makes the standard
// errors cluster-robust (with a note), one undo step takes both back, and
// clearing Clusters falls back to HC3. The fit then uses CR1 with G − 1 df
// (core's cluster covariance, checked against statsmodels elsewhere).
TEST(SpecifyEstimates, ClustersAndClusterRobustErrorsGoTogether) {
    Open o(QStringLiteral("coffee-discount"));
    SpecifySection* s = o.specify();
    ASSERT_EQ(o.analysis().se, SeKind::HC3);
    const int steps = o.undo()->count();
    std::unique_ptr<QMimeData> shop(columnListMime(s, "shop"));
    ASSERT_TRUE(shop);
    dropOn(s->slot(Role::Clusters), shop.get());
    EXPECT_EQ(o.analysis().roles.clusters, "shop");
    EXPECT_EQ(o.analysis().se, SeKind::Cluster);
    EXPECT_EQ(o.undo()->count(), steps + 1);
    EXPECT_TRUE(s->message().contains(QStringLiteral("Standard errors are now cluster-robust by 'shop'")))
        << s->message().toStdString();
    EXPECT_EQ(s->seBox()->currentData().toInt(), static_cast<int>(SeKind::Cluster));
    ASSERT_TRUE(o.waitForRun());
    ASSERT_TRUE(o.run());
    EXPECT_EQ(o.run()->fit.se, SeKind::Cluster);
    EXPECT_EQ(o.run()->fit.n_clusters, 36);  // the sample has 36 shops (sample-projects/generate.py)
    EXPECT_EQ(o.run()->fit.df_inference, 35);
    const QString cmp = o.estimates()->comparisonLabel()->text();
    EXPECT_GT(cmp.indexOf(QStringLiteral("the test to report")), cmp.indexOf(QStringLiteral("Wald test")))
        << cmp.toStdString();

    // Choosing HC3 with Clusters still set says the clusters go unused.
    test::chooseByKeys(s->seBox(), s->seBox()->findData(static_cast<int>(SeKind::HC3)));
    EXPECT_EQ(o.analysis().se, SeKind::HC3);
    EXPECT_TRUE(s->message().contains(QStringLiteral("do not use the Clusters column 'shop'")))
        << s->message().toStdString();
    o.undo()->undo();
    EXPECT_EQ(o.analysis().se, SeKind::Cluster);

    // Clearing Clusters: back to a sandwich, with a note.
    QTest::mouseClick(s->slot(Role::Clusters)->clearButton(), Qt::LeftButton);
    EXPECT_TRUE(o.analysis().roles.clusters.empty());
    EXPECT_EQ(o.analysis().se, SeKind::HC3);
    EXPECT_TRUE(s->message().contains(QStringLiteral("With no Clusters column the standard errors are now HC3")))
        << s->message().toStdString();
    o.undo()->undo();
    o.undo()->undo();
    EXPECT_TRUE(o.analysis().roles.clusters.empty());
    EXPECT_EQ(o.analysis().se, SeKind::HC3);
    EXPECT_EQ(o.undo()->index(), steps);  // back where it started
}
