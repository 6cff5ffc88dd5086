// Which scale the Probe section shows for a logistic model: on the
// probability scale the readout, the axis titles and the cautions say so and
// the interaction on that scale is stated; on the log-odds scale the product
// coefficient is named as the interaction on that scale only. Numbers are
// checked against the closed form (Ai & Norton 2003) and core called directly.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QComboBox>
#include <QTest>
#include <cmath>

#include "common/direct_fit.hpp"
#include "common/tolerance.hpp"
#include "moderato/probing/response_scale.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "probe_window.hpp"
#include "screenshot.hpp"
#include "sections/probe_section.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::rel;

TEST(ProbeScale, LogisticProbeSaysWhichScaleAndShowsTheProbabilityInteraction) {
    const QString path = test::sampleProject(QStringLiteral("trial-conversion"));
    test::ProbeWindow win(path);
    ProbeSection* s = win.section;
    ASSERT_EQ(win.analysis().probe.scale, ProbeScale::Outcome);
    const test::DirectProbe core = test::direct_probe(path.toStdString());
    const std::string fx = core.analysis.roles.focal, mz = core.analysis.roles.moderator;

    // Probability scale: readout, axis titles and cautions say so.
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Effect of setup_sessions on P(converted = 1)")))
        << s->readoutText().toStdString();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Probability scale")));
    EXPECT_EQ(s->linesPlot()->figurePlot()->yAxis->label(), QStringLiteral("P(converted = 1)"));
    EXPECT_TRUE(s->effectPlot()->figurePlot()->yAxis->label().contains(QStringLiteral("P(converted = 1)")));
    EXPECT_TRUE(s->summaryText().contains(QStringLiteral("On the probability scale an effect depends")));

    // The interaction on the probability scale. Closed form (Ai & Norton 2003, both continuous):
    // d2P/dx dz = b12 L'(eta) + (b1 + b12 z)(b2 + b12 x) L''(eta), L' = P(1 - P), L'' = P(1 - P)(1 - 2P),
    // averaged over the rows the model uses.
    const int b1 = test::coefficient_index(core.fit, {fx}), b2 = test::coefficient_index(core.fit, {mz}),
              b12 = test::coefficient_index(core.fit, {fx, mz});
    ASSERT_TRUE(b1 >= 0 && b2 >= 0 && b12 >= 0);
    const Eigen::VectorXd& b = core.fit.beta;
    const Eigen::VectorXd eta = core.design.X * b;
    const Table& t = *core.loaded.tables.at(core.analysis.dataset);
    double sum = 0;
    for (std::size_t i = 0; i < core.design.n(); ++i) {
        const std::size_t row = core.design.rows[i];
        const double x = t.at(fx).numbers[row], z = t.at(mz).numbers[row];
        const double P = 1 / (1 + std::exp(-eta[static_cast<Eigen::Index>(i)]));
        sum += b[b12] * P * (1 - P) + (b[b1] + b[b12] * z) * (b[b2] + b[b12] * x) * P * (1 - P) * (1 - 2 * P);
    }
    const double closed = sum / static_cast<double>(core.design.n());
    ASSERT_TRUE(s->engine().probe().interaction_effect);
    const InteractionEffect& ie = *s->engine().probe().interaction_effect;
    EXPECT_LE(rel(ie.estimate, closed), 1e-6);
    // Source for the SE and interval: core probability_interaction on the same data.
    ScaleRequest req;
    req.focal = fx;
    req.moderator = mz;
    req.averaging = Averaging::Sample;
    const InteractionEffect fromCore = probability_interaction(core.design, core.fit, req);
    const QString summary = s->summaryText();
    for (double v : {fromCore.estimate, fromCore.std_error, fromCore.ci_lower, fromCore.ci_upper})
        EXPECT_TRUE(summary.contains(test::fourDigits(v))) << test::fourDigits(v).toStdString() << "\n"
                                                           << summary.toStdString();
    EXPECT_TRUE(summary.contains(QStringLiteral("Interaction on the probability scale")));
    EXPECT_TRUE(
        summary.contains(QStringLiteral("The product coefficient on the log-odds scale (setup_sessions×employees = %1) "
                                        "is not this")
                             .arg(test::fourDigits(b[b12]))))
        << summary.toStdString();
    // It sits in the side panel, above the region of significance.
    EXPECT_LT(summary.indexOf(QStringLiteral("Interaction on the probability scale")),
              summary.indexOf(QStringLiteral("Region of significance")));
    test::saveScreenshot(&win.w, QStringLiteral("logistic-probability.png"));

    // The log-odds scale: everything says log-odds, and the product coefficient is only that.
    QComboBox* scale = s->scaleChoice();
    scale->setFocus();
    QTest::keyClick(scale, Qt::Key_Up);
    ASSERT_TRUE(
        test::waitUntil([&] { return win.analysis().probe.scale == ProbeScale::Model && !s->engine().probability(); }));
    win.settle();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Effect of setup_sessions on the log-odds of converted")))
        << s->readoutText().toStdString();
    EXPECT_TRUE(s->readoutText().contains(QStringLiteral("Log-odds scale")));
    EXPECT_EQ(s->linesPlot()->figurePlot()->yAxis->label(), QStringLiteral("log-odds of converted"));
    EXPECT_TRUE(s->effectPlot()->figurePlot()->yAxis->label().contains(QStringLiteral("log-odds of converted")));
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("On the log-odds scale a product coefficient is not the "
                                                 "interaction on the probability scale")));
    EXPECT_TRUE(
        s->summaryText().contains(QStringLiteral("The product coefficient (setup_sessions×employees = %1) is the "
                                                 "interaction on the log-odds scale only")
                                      .arg(test::fourDigits(b[b12]))))
        << s->summaryText().toStdString();
    test::saveScreenshot(&win.w, QStringLiteral("logistic-log-odds.png"));
}
