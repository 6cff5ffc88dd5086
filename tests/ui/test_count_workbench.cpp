// Count models in the workbench, driven through its widgets on the
// desk-complaints sample (a negative binomial model of weekly complaints with
// the desks' opening hours as the exposure): the family choice and the
// Exposure slot with their refusals (core's own words) and undo, the model
// equation in each family's form, the Estimates section's dispersion and
// overdispersion lines, and the Probe section's rate ratios and scale words.
// Rate ratios are checked against their definition re-derived here from the
// fitted coefficients and covariance: exp(b1 + b3 m), with the interval
// exp(b1 + b3 m -+ z SE), SE² = V11 + 2m V13 + m² V33 (the delta method is
// exact for a linear combination) and z the normal 97.5% quantile.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QComboBox>
#include <QLabel>
#include <QTableView>
#include <QTest>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>

#include "probe/pinned_table.hpp"
#include "probe/straight_line_panel.hpp"
#include "probe_window.hpp"
#include "screenshot.hpp"
#include "sections/estimates_section.hpp"
#include "sections/specify_section.hpp"
#include "specify/role_slot.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

const QString kSample = QStringLiteral("desk-complaints");

// Picks a family in the Specify section's box, as a click on its entry does.
void chooseFamily(SpecifySection* s, Family f) {
    const int i = s->familyBox()->findData(static_cast<int>(f));
    ASSERT_GE(i, 0);
    s->familyBox()->setCurrentIndex(i);
    Q_EMIT s->familyBox()->activated(i);
}

void pick(RoleSlot* slot, const std::string& column) {
    QAction* a = slot->pickAction(column);
    ASSERT_NE(a, nullptr) << "no picker entry for " << column;
    a->trigger();
}

// The design column whose factors are exactly these numeric columns.
int columnOf(const Design& d, std::vector<std::string> columns) {
    std::vector<Atom> atoms;
    for (auto& c : columns) atoms.push_back({c, "", 1});
    return d.column_of(atoms);
}

}  // namespace

TEST(CountWorkbench, FamilyChoiceAndExposureSlotAreUndoableEditsWithCoresRefusals) {
    test::SampleWindow win(test::sampleProject(kSample));
    win.showSection(AnalysisPage::Specify);
    SpecifySection* s = win.w.analysisPage()->specify();
    RoleSlot* exposure = s->slot(Role::Exposure);
    ASSERT_EQ(win.analysis().family, Family::NegativeBinomial);
    for (Family f : {Family::Linear, Family::Logistic, Family::Probit, Family::Poisson, Family::NegativeBinomial})
        EXPECT_GE(s->familyBox()->findData(static_cast<int>(f)), 0);
    EXPECT_TRUE(exposure->isVisibleTo(s));
    EXPECT_EQ(roleColumns(win.analysis(), Role::Exposure), std::vector<std::string>{"open_hrs"});
    // The count model's equation: log E[y] = ... + log(exposure) (its offset, coefficient 1).
    const QString eq = s->equationLabel()->toolTip();
    EXPECT_TRUE(eq.startsWith(QStringLiteral("log E[complaints] = b₀ + "))) << eq.toStdString();
    EXPECT_TRUE(eq.endsWith(QStringLiteral(" + log(open_hrs)"))) << eq.toStdString();
    test::saveScreenshot(&win.w, QStringLiteral("count-specify.png"));

    // A linear model cannot use an exposure: refused in core's words, nothing changes.
    const Analysis before = win.analysis();
    const int steps = win.undo()->count();
    chooseFamily(s, Family::Linear);
    EXPECT_EQ(win.analysis(), before);
    EXPECT_EQ(win.undo()->count(), steps);
    EXPECT_TRUE(s->message().contains(QStringLiteral("applies to poisson and negative-binomial models only")))
        << s->message().toStdString();
    EXPECT_EQ(s->familyBox()->currentData().toInt(), static_cast<int>(Family::NegativeBinomial));

    // Poisson keeps the exposure: one step.
    chooseFamily(s, Family::Poisson);
    ASSERT_EQ(win.analysis().family, Family::Poisson) << s->message().toStdString();
    EXPECT_EQ(win.analysis().roles.exposure, "open_hrs");
    EXPECT_EQ(win.undo()->count(), steps + 1);
    // Clearing the Exposure: one step, and the offset leaves the equation.
    QTest::mouseClick(exposure->clearButton(), Qt::LeftButton);
    EXPECT_TRUE(win.analysis().roles.exposure.empty());
    EXPECT_EQ(win.undo()->count(), steps + 2);
    EXPECT_FALSE(s->equationLabel()->toolTip().contains(QStringLiteral("log(open_hrs)")));
    // A probit model needs a 0/1 outcome: refused in core's words, naming the line and its value.
    const Analysis counts = win.analysis();
    chooseFamily(s, Family::Probit);
    EXPECT_EQ(win.analysis(), counts);
    EXPECT_TRUE(s->message().contains(QStringLiteral("probit outcome 'complaints' must be 0 or 1: line ")))
        << s->message().toStdString();
    // Now linear is fine, and the Exposure slot is not offered to it.
    chooseFamily(s, Family::Linear);
    EXPECT_EQ(win.analysis().family, Family::Linear);
    EXPECT_FALSE(exposure->isVisibleTo(s));
    EXPECT_TRUE(s->equationLabel()->toolTip().startsWith(QStringLiteral("ŷ = ")));
    // Back to the negative binomial, the slot returns; the exposure picked again.
    chooseFamily(s, Family::NegativeBinomial);
    EXPECT_TRUE(exposure->isVisibleTo(s));
    pick(exposure, "open_hrs");
    EXPECT_EQ(win.analysis().roles.exposure, "open_hrs");
    EXPECT_EQ(win.undo()->count(), steps + 5);

    // Undo walks back one edit at a time to the project as opened.
    win.undo()->undo();
    EXPECT_TRUE(win.analysis().roles.exposure.empty());
    for (int i = 0; i < 4; ++i) win.undo()->undo();
    EXPECT_EQ(win.analysis(), before);
    EXPECT_TRUE(exposure->isVisibleTo(s));
    ASSERT_TRUE(win.waitForRun());
}

TEST(CountWorkbench, EstimatesShowDispersionAndPoissonOverdispersion) {
    test::SampleWindow win(test::sampleProject(kSample));
    win.showSection(AnalysisPage::Estimates);
    EstimatesSection* e = win.w.analysisPage()->estimates();
    const auto run = win.run();
    ASSERT_TRUE(run && run->fit.dispersion);
    // Each coefficient is tested with z (compared with the standard normal: common practice for these models).
    EXPECT_TRUE(e->headerLabel()->text().contains(QStringLiteral("z (standard normal)")));
    EXPECT_TRUE(
        e->headerLabel()->text().contains(QStringLiteral("negative binomial model (log rate, per unit of "
                                                         "open_hrs)")))
        << e->headerLabel()->text().toStdString();
    // The fit's alpha and its interval as core computed them (core's NB fit is checked against statsmodels in
    // test_count_models.cpp).
    const QString fit = e->fitLabel()->text();
    EXPECT_TRUE(fit.contains(QStringLiteral("Dispersion α"))) << fit.toStdString();
    for (double v : {run->fit.dispersion->alpha, run->fit.dispersion->ci_lower, run->fit.dispersion->ci_upper})
        EXPECT_TRUE(fit.contains(test::fourDigits(v))) << test::fourDigits(v).toStdString();
    EXPECT_FALSE(fit.contains(QStringLiteral("Overdispersion")));
    test::saveScreenshot(&win.w, QStringLiteral("count-estimates.png"));

    // As a Poisson model the counts (drawn with alpha 0.35 by sample-projects/generate.py) are overdispersed:
    // Pearson χ²/df well above 1, and the fit points to the negative binomial.
    SpecifySection* s = win.w.analysisPage()->specify();
    chooseFamily(s, Family::Poisson);
    ASSERT_TRUE(win.waitForRun());
    const auto poisson = win.run();
    ASSERT_TRUE(poisson && poisson->fit.overdispersion);
    // Pearson χ² / df by its definition, from the data and the fitted means.
    double chi2 = 0;
    for (Eigen::Index i = 0; i < poisson->design.y.size(); ++i) {
        const double mu = poisson->fit.fitted[i];
        chi2 += (poisson->design.y[i] - mu) * (poisson->design.y[i] - mu) / mu;
    }
    const double ratio = chi2 / (static_cast<double>(poisson->fit.n) - static_cast<double>(poisson->design.X.cols()));
    EXPECT_GT(ratio, 1.5);
    const QString pf = e->fitLabel()->text();
    EXPECT_TRUE(pf.contains(QStringLiteral("Overdispersion"))) << pf.toStdString();
    EXPECT_TRUE(pf.contains(test::fourDigits(ratio))) << test::fourDigits(ratio).toStdString();
    EXPECT_TRUE(pf.contains(QStringLiteral("try the negative binomial")));
    EXPECT_TRUE(e->warningsLabel()->text().contains(QStringLiteral("fit the negative binomial family instead")));
}

TEST(CountWorkbench, ProbeShowsRateRatiosAndTheOutcomesOwnWordsOnEitherScale) {
    test::ProbeWindow win(test::sampleProject(kSample));
    ProbeSection* s = win.section;
    const auto run = win.run();
    ASSERT_TRUE(run);
    ASSERT_TRUE(s->engine().probability());
    // The scale switch is offered, in the count model's words.
    QComboBox* scale = s->scaleChoice();
    EXPECT_TRUE(scale->isVisibleTo(s));
    EXPECT_EQ(scale->itemText(0), QStringLiteral("log rate"));
    EXPECT_EQ(scale->itemText(1), QStringLiteral("rate"));
    EXPECT_TRUE(scale->itemData(1, Qt::ToolTipRole).toString().contains(QStringLiteral("complaints per open_hrs")));
    // Axes on the outcome scale: complaints per hour open.
    EXPECT_EQ(s->linesPlot()->figurePlot()->yAxis->label(), QStringLiteral("complaints per open_hrs"));
    EXPECT_TRUE(s->effectPlot()->figurePlot()->yAxis->label().contains(QStringLiteral("complaints per open_hrs")))
        << s->effectPlot()->figurePlot()->yAxis->label().toStdString();
    EXPECT_GE(s->linesPlot()->figurePlot()->yAxis->range().lower, 0.0);          // a rate is never negative
    EXPECT_GE(s->scaleChoice()->width(), s->scaleChoice()->sizeHint().width());  // its words are not cut
    // The straight-line check serves linear and logistic models only (core refuses the others): not offered.
    EXPECT_FALSE(s->straightLinePanel()->isVisibleTo(s));

    // The rate-ratio columns beside the effects, each against its definition.
    PinnedTableModel* m = s->pinnedTable()->model();
    ASSERT_TRUE(m->hasRatios());
    const int rr = m->sectionOf(PinnedTableModel::Ratio), lo = m->sectionOf(PinnedTableModel::RatioLower),
              hi = m->sectionOf(PinnedTableModel::RatioUpper);
    EXPECT_EQ(m->headerData(rr, Qt::Horizontal, Qt::DisplayRole).toString(), QStringLiteral("rate ratio"));
    EXPECT_FALSE(s->pinnedTable()->view()->isColumnHidden(rr));
    const Design& d = run->design;
    const int b1 = columnOf(d, {"training_hours"}), b3 = columnOf(d, {"training_hours", "queue_minutes"});
    ASSERT_GE(b1, 0);
    ASSERT_GE(b3, 0);
    const Eigen::VectorXd& b = run->fit.beta;
    const Eigen::MatrixXd& V = run->fit.covariance;
    const double z = 1.959963984540054;  // the standard normal's 97.5% quantile (closed form, tables)
    ASSERT_GT(m->rowCount(), 0);
    for (int r = 0; r < m->rowCount(); ++r) {
        const double at = m->rows()[static_cast<std::size_t>(r)].point.moderator_value;
        const double eta = b[b1] + b[b3] * at;
        const double se = std::sqrt(V(b1, b1) + 2 * at * V(b1, b3) + at * at * V(b3, b3));
        EXPECT_EQ(m->index(r, rr).data().toString(), test::fourDigits(std::exp(eta))) << at;
        EXPECT_EQ(m->index(r, lo).data().toString(), test::fourDigits(std::exp(eta - z * se))) << at;
        EXPECT_EQ(m->index(r, hi).data().toString(), test::fourDigits(std::exp(eta + z * se))) << at;
    }
    EXPECT_TRUE(s->pinnedTable()->tsv().contains(QStringLiteral("rate ratio")));
    test::saveScreenshot(&win.w, QStringLiteral("count-probe.png"));

    // The log scale: one step, its own words on the axes, and the ratios stay.
    const int steps = win.undo()->count();
    scale->setFocus();
    QTest::keyClick(scale, Qt::Key_Up);
    ASSERT_TRUE(test::waitUntil([&] { return test::runEnded(win.w, win.id) && !s->engine().probability(); }));
    win.settle();
    EXPECT_EQ(win.undo()->count(), steps + 1);
    EXPECT_EQ(s->linesPlot()->figurePlot()->yAxis->label(), QStringLiteral("log rate of complaints"));
    EXPECT_TRUE(s->effectPlot()->figurePlot()->yAxis->label().contains(QStringLiteral("log rate of complaints")));
    EXPECT_TRUE(s->pinnedTable()->model()->hasRatios());
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("Interaction on the log rate scale")))
        << s->summaryText().toStdString();
}
