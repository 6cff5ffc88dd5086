// One number reads the same everywhere: the memo's sentences (core's
// memo_findings, as the renderer writes them) and what the Probe section
// shows (its summary, the readout and the pinned values) cite the same
// strings for the same numbers on the sample projects. Each string is also
// checked against the value it stands for (core run_analysis on the same
// data), written by the rule's own route (test::fourDigits: printf). The plot
// axes and the dataset grid follow the same rules.
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QRegularExpression>
#include <QTest>
#include <cmath>
#include <cstdio>

#include "common/sample_run.hpp"
#include "data/table_model.hpp"
#include "model/analysis_runner.hpp"
#include "moderato/reading/csv.hpp"
#include "moderato/reporting/memo.hpp"
#include "plots/cells_view.hpp"
#include "plots/effect_plot.hpp"
#include "probe/pinned_table.hpp"
#include "probe_window.hpp"
#include "sample_window.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

// A number as the house writes it: U+2212 minus, thousands separators in counts, ×10ⁿ powers.
const QString kNum = QStringLiteral("(−?[0-9][0-9,]*(?:\\.[0-9]+)?(?:×10⁻?[⁰¹²³⁴⁵⁶⁷⁸⁹]+)?)");

// What core says, by the renderer's route: the project's first analysis run and its memo sentences.
struct Core : test::SampleRun {
    QString memo;  // the findings, one per line
};

Core core(const QString& name) {
    Core c{test::run_sample(name.toStdString()), {}};
    for (const auto& s : memo_findings(c.analysis, c.run)) c.memo += QString::fromStdString(s) + QLatin1Char('\n');
    return c;
}

// The workbench with the sample open on its Probe section.
struct Workbench : test::ProbeWindow {
    explicit Workbench(const QString& name) : ProbeWindow(test::sampleProject(name)) {}
    // The pinned values table as the user sees it: each row's cells by column.
    QString cell(int row, int column) const {
        const PinnedTableModel* m = section->pinnedTable()->model();
        return m->data(m->index(row, column), Qt::DisplayRole).toString();
    }
};

// Every match of `pattern` in `text` (kNum written as NUM), as its captured groups.
QList<QStringList> matches(const QString& text, QString pattern) {
    pattern.replace(QStringLiteral("NUM"), kNum);
    QList<QStringList> out;
    for (auto it = QRegularExpression(pattern).globalMatch(text); it.hasNext();) {
        const auto m = it.next();
        out << m.capturedTexts().mid(1);
    }
    return out;
}

}  // namespace

TEST(NumberAgreement, HelpdeskCrossoversAndFiellerIntervalsReadTheSameInMemoAndProbe) {
    const Core c = core(QStringLiteral("helpdesk-staffing"));
    Workbench b(QStringLiteral("helpdesk-staffing"));
    const QString summary = b.section->summaryText();
    SCOPED_TRACE(c.memo.toStdString() + "\n" + summary.toStdString());
    ASSERT_TRUE(c.run.probe);
    const auto& crossings = c.run.probe->crossovers;
    ASSERT_EQ(crossings.size(), 3u);  // three shifts, three pairs

    // "cross at x = 10.55 (95% Fieller interval 9.928 to 11.29)" and "the lines cross at x = 10.55 (interval 9.928
    // to 11.29)": the same strings, each the core value at four significant digits.
    const auto memoCross = matches(c.memo, QStringLiteral("cross at agents_on_shift = NUM \\(95% Fieller interval NUM "
                                                          "to NUM\\)"));
    const auto probeCross = matches(summary, QStringLiteral("the lines cross at agents_on_shift = NUM \\(interval NUM "
                                                            "to NUM\\)"));
    ASSERT_EQ(memoCross.size(), 3);
    EXPECT_EQ(probeCross, memoCross);
    for (int k = 0; k < 3; ++k) {
        const Crossover& x = crossings[static_cast<std::size_t>(k)];
        EXPECT_EQ(memoCross[k], (QStringList{test::fourDigits(x.focal_value), test::fourDigits(x.ci_lower),
                                             test::fourDigits(x.ci_upper)}));
    }

    // Where the two predicted lines differ: the same boundaries in both, and (the same quadratic as Fieller's,
    // closed form) the ends of the Fieller interval: "interval 9.928 to 11.29" then "below 9.928 ... above 11.29".
    const auto memoGap =
        matches(c.memo, QStringLiteral("differs for agents_on_shift below NUM and for agents_on_shift above NUM"));
    const auto probeGap = matches(summary, QStringLiteral("for agents_on_shift below NUM and above NUM"));
    ASSERT_EQ(memoGap.size(), 3);
    EXPECT_EQ(probeGap, memoGap);
    for (int k = 0; k < 3; ++k) EXPECT_EQ(memoGap[k], memoCross[k].mid(1));
    EXPECT_EQ(memoCross[2], (QStringList{QStringLiteral("10.55"), QStringLiteral("9.928"), QStringLiteral("11.29")}))
        << "the case the helpdesk memo once wrote as \"9.93 to 11.29\" (Fieller interval from the closed form above)";
}

TEST(NumberAgreement, EffectsAtChosenValuesReadTheSameInMemoPinnedTableAndReadout) {
    for (const QString& name : {QStringLiteral("orchard-nitrogen"), QStringLiteral("helpdesk-staffing"),
                                QStringLiteral("coffee-discount"), QStringLiteral("trial-conversion")}) {
        const Core c = core(name);
        Workbench b(name);
        const QString readout = b.section->readoutText();
        SCOPED_TRACE(name.toStdString() + "\n" + c.memo.toStdString() + "\n" + readout.toStdString());
        ASSERT_TRUE(c.run.probe);
        const auto& effects = c.run.probe->effects;
        const QString mod = QString::fromStdString(c.analysis.roles.moderator);

        // "0.07501 (95% CI 0.07086 to 0.07916) at soil_moisture_pct = 25.26" or "... for shift = day".
        const auto memo =
            matches(c.memo, QStringLiteral("NUM \\(95% CI NUM to NUM\\) (?:at|for) %1 = (NUM|[^ ,.()]+)").arg(mod));
        const PinnedTableModel* table = b.section->pinnedTable()->model();
        ASSERT_EQ(memo.size(), table->rowCount());
        ASSERT_EQ(memo.size(), static_cast<int>(effects.size()));
        for (int k = 0; k < memo.size(); ++k) {
            const QStringList shown{b.cell(k, PinnedTableModel::Effect), b.cell(k, PinnedTableModel::Lower),
                                    b.cell(k, PinnedTableModel::Upper), b.cell(k, PinnedTableModel::Value)};
            EXPECT_EQ(shown, memo[k].mid(0, 4)) << "row " << k;  // (a value that is a number repeats in group 5)
            const EffectPoint& e = effects[static_cast<std::size_t>(k)];
            EXPECT_EQ(memo[k].mid(0, 3), (QStringList{test::fourDigits(e.estimate), test::fourDigits(e.ci_lower),
                                                      test::fourDigits(e.ci_upper)}));
        }

        // The readout at the slider's starting value (the mean, or the first group) repeats that row's strings.
        int row = -1;
        for (int k = 0; k < table->rowCount(); ++k)
            if (readout.startsWith(QStringLiteral("%1 = %2\n").arg(mod, b.cell(k, PinnedTableModel::Value)))) row = k;
        ASSERT_GE(row, 0) << "the readout starts at a value the table lists";
        EXPECT_TRUE(readout.contains(QStringLiteral("effect\t") + b.cell(row, PinnedTableModel::Effect)));
        EXPECT_TRUE(
            readout.contains(QStringLiteral("95% CI\t%1 to %2")
                                 .arg(b.cell(row, PinnedTableModel::Lower), b.cell(row, PinnedTableModel::Upper))));
        EXPECT_TRUE(readout.contains(QStringLiteral("SE\t") + b.cell(row, PinnedTableModel::SE)));
        EXPECT_TRUE(readout.contains(QStringLiteral("\np\t") + b.cell(row, PinnedTableModel::P)));
        // The house order in the readout too: effect, interval, SE, test value, p.
        const auto at = [&](const QString& label) { return readout.indexOf(QLatin1Char('\n') + label); };
        EXPECT_LT(at(QStringLiteral("effect\t")), at(QStringLiteral("95% CI\t")));
        EXPECT_LT(at(QStringLiteral("95% CI\t")), at(QStringLiteral("SE\t")));
        EXPECT_LT(at(QStringLiteral("SE\t")), at(QStringLiteral("p\t")));
    }
}

TEST(NumberAgreement, BoundariesRangesAndTheProbabilityInteractionReadTheSame) {
    // Orchard: both Johnson–Neyman boundaries lie beyond the data; the observed range is cited by both.
    {
        const Core c = core(QStringLiteral("orchard-nitrogen"));
        Workbench b(QStringLiteral("orchard-nitrogen"));
        const QString summary = b.section->summaryText();
        SCOPED_TRACE(c.memo.toStdString() + "\n" + summary.toStdString());
        // The Probe section says it in the memo's own sentence.
        const QString sentence = QStringLiteral(
            "Johnson–Neyman boundaries at NUM and NUM lie beyond the data "
            "\\(soil_moisture_pct observed from NUM to NUM\\)");
        const auto memo = matches(c.memo, sentence);
        const auto shown = matches(summary, sentence);
        ASSERT_EQ(memo.size(), 1);
        ASSERT_EQ(shown.size(), 1);
        EXPECT_EQ(shown[0], memo[0]);
        ASSERT_TRUE(c.run.probe && c.run.probe->johnson_neyman);
        const auto& jn = c.run.probe->johnson_neyman->boundaries;
        ASSERT_EQ(jn.size(), 2u);
        EXPECT_EQ(memo[0].mid(0, 2), (QStringList{test::fourDigits(jn[0]), test::fourDigits(jn[1])}));
    }
    // Trial conversion: the interaction on the probability scale is of order 1e-5, written with a power of ten.
    {
        const Core c = core(QStringLiteral("trial-conversion"));
        Workbench b(QStringLiteral("trial-conversion"));
        const QString summary = b.section->summaryText();
        SCOPED_TRACE(c.memo.toStdString() + "\n" + summary.toStdString());
        const auto memo = matches(c.memo, QStringLiteral("interaction effect \\([^)]*\\) is NUM \\(95% CI NUM to NUM"));
        const auto shown = matches(summary, QStringLiteral("P\\(converted = 1\\): NUM \\(SE NUM, 95% CI NUM to NUM"));
        ASSERT_EQ(memo.size(), 1);
        ASSERT_EQ(shown.size(), 1);
        EXPECT_EQ((QStringList{shown[0][0], shown[0][2], shown[0][3]}), memo[0]);
        ASSERT_TRUE(c.run.probe && c.run.probe->interaction_effect);
        EXPECT_EQ(memo[0][0], test::fourDigits(c.run.probe->interaction_effect->estimate));
        EXPECT_TRUE(memo[0][0].contains(QStringLiteral("×10⁻"))) << memo[0][0].toStdString();
    }
}

TEST(NumberAgreement, AxisTicksAndTheDatasetGridFollowTheSameRules) {
    // The Effect plot's axes (helpdesk: negative effects): every tick label has the decimals its step needs, the
    // same on each tick, and the minus sign U+2212 (worked here with printf "%.*f" from the ticks' own values).
    Workbench b(QStringLiteral("helpdesk-staffing"));
    QCPAxis* y = b.section->effectPlot()->figurePlot()->yAxis;
    b.section->effectPlot()->figurePlot()->replot();
    const QVector<double> ticks = y->tickVector();
    const QVector<QString> labels = y->tickVectorLabels();
    ASSERT_GE(ticks.size(), 3);
    ASSERT_EQ(labels.size(), ticks.size());
    const double step = ticks[1] - ticks[0];
    int decimals = 0;
    while (std::fabs(step * std::pow(10.0, decimals) - std::round(step * std::pow(10.0, decimals))) > 1e-6) ++decimals;
    bool negative = false;
    for (int k = 0; k < ticks.size(); ++k) {
        char buf[64];
        std::snprintf(buf, sizeof buf, "%.*f", decimals, std::fabs(ticks[k]) < 1e-9 * step ? 0.0 : ticks[k]);
        QString expected = QString::fromLatin1(buf);
        if (expected.startsWith(QLatin1Char('-'))) {
            expected.replace(0, 1, QChar(0x2212));
            negative = true;
        }
        EXPECT_EQ(labels[k], expected) << "tick " << ticks[k];
    }
    EXPECT_TRUE(negative) << "the helpdesk effects are negative, so some ticks are";

    // The dataset grid shows every digit a value has (the shortest text that reads back as it, IEEE 754), with the
    // minus sign: 0.1 + 0.2 is 0.30000000000000004 in binary, and −2.5 is written with U+2212.
    const auto table = std::make_shared<const Table>(read_csv_text("v\n-2.5\n0.30000000000000004\n41\n", "v.csv"));
    TableModel model;
    model.setTable(table);
    const auto shown = [&](int row) { return model.data(model.index(row, 0), Qt::DisplayRole).toString(); };
    EXPECT_EQ(shown(0), QStringLiteral("−2.5"));
    EXPECT_EQ(shown(1), QStringLiteral("0.30000000000000004"));
    EXPECT_EQ(shown(2), QStringLiteral("41"));
}

// Issue 12: the cell table and the dataset grid wrote "-" where the rest
// writes "−". The Cells table of the volunteer sample (negative simple
// effects: onboarding online lowers hours) as the user copies it: every
// negative number with U+2212, never a hyphen, and each one the core value
// at four significant digits (printf "%#.4g", test::fourDigits).
TEST(NumberAgreement, TheCellTableWritesTheMinusSign) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("volunteer-onboarding")));
    const auto run = win.run();
    ASSERT_TRUE(run && run->cells.has_value());
    CellsView view;
    view.setRun(win.analysis(), *run);
    const QString text = view.tableText();
    const auto hyphen = QRegularExpression(QStringLiteral("(^|[\\t (])-[0-9]")).match(text);
    EXPECT_FALSE(hyphen.hasMatch()) << "a hyphen for minus: " << hyphen.captured(0).toStdString();
    int negatives = 0;
    for (const auto* effects : {&run->cells->row_effects, &run->cells->column_effects})
        for (const SimpleEffect& s : *effects) {
            if (!(s.estimate < 0)) continue;
            ++negatives;
            EXPECT_TRUE(text.contains(test::fourDigits(s.estimate)))
                << test::fourDigits(s.estimate).toStdString() << " not in\n"
                << text.toStdString();
        }
    EXPECT_GE(negatives, 1) << "the volunteer sample's simple effects include negative ones";
}
