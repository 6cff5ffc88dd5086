// Flows that went wrong when the workbench was tried as a user would (under
// Xvfb with real mouse and keys). Each test drives the real widgets
// (offscreen) through one of them and fails on the old behaviour. Expected
// values come from the construction of the data (by hand), the arithmetic
// mean of a column (closed form) or the standard keys of the desktops
// (common practice).
#include <gtest/gtest.h>

#include <qcustomplot.h>
#include <QApplication>
#include <QCheckBox>
#include <QComboBox>
#include <QDoubleSpinBox>
#include <QDropEvent>
#include <QFile>
#include <QFileDialog>
#include <QFontMetricsF>
#include <QLabel>
#include <QLineEdit>
#include <QMimeData>
#include <QPushButton>
#include <QStatusBar>
#include <QTemporaryDir>
#include <QTest>
#include <QTimer>
#include <QToolButton>
#include <QUndoStack>
#include <QXmlStreamReader>
#include <cmath>

#include "data/derived_column_dialog.hpp"
#include "data/import_dialog.hpp"
#include "export/figure_export_dialog.hpp"
#include "export/figure_exporter.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "probe/moderator_slider.hpp"
#include "qt_file_bytes.hpp"
#include "sample_window.hpp"
#include "sections/probe_section.hpp"
#include "sections/specify_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "specify/column_list_model.hpp"
#include "specify/role_slot.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::child;
using moderato::test::chooseByKeys;
using moderato::test::writeFile;

namespace {

// A main window on a copy of a sample project, shown and active (window
// shortcuts need an active window), its first analysis fitted.
struct Session : test::SampleWindow {
    explicit Session(const QString& sample) {
        EXPECT_TRUE(open(copy(sample))) << w.runner()->error(id).toStdString();
        activate();
    }
    ProbeSection* probe() const { return w.analysisPage()->probe(); }
    SpecifySection* specify() const { return w.analysisPage()->specify(); }
    void keys(Qt::Key key, Qt::KeyboardModifiers mods) {
        QTest::keyClick(&w, key, mods);
        QCoreApplication::processEvents();
    }
};

// Types a value into a spin box and presses Enter.
void typeValue(QDoubleSpinBox* box, const QString& text) {
    ASSERT_NE(box, nullptr);
    box->setFocus();
    box->selectAll();
    QTest::keyClicks(box, text);
    QTest::keyClick(box, Qt::Key_Return);
}

// A drag of a column from the Specify list, dropped on a role slot (the
// list model's own drag data; no QDrag event loop).
void dropFromList(SpecifySection* s, const std::string& column, Role target) {
    const int row = s->columnModel()->rowOf(column);
    ASSERT_GE(row, 0) << column;
    std::unique_ptr<QMimeData> mime(s->columnModel()->mimeData({s->columnModel()->index(row, 0)}));
    RoleSlot* slot = s->slot(target);
    const QPoint at = slot->rect().center();
    QDragEnterEvent enter(at, Qt::CopyAction | Qt::MoveAction, mime.get(), Qt::LeftButton, Qt::NoModifier);
    QCoreApplication::sendEvent(slot, &enter);
    ASSERT_TRUE(enter.isAccepted()) << "the slot refused the drag";
    QDropEvent drop(QPointF(at), Qt::CopyAction | Qt::MoveAction, mime.get(), Qt::LeftButton, Qt::NoModifier);
    QCoreApplication::sendEvent(slot, &drop);
}

// The names in a plot's legend.
QStringList legendNames(QCustomPlot* plot) {
    QStringList names;
    for (int i = 0; i < plot->legend->elementCount(); ++i)
        if (auto* item = qobject_cast<QCPPlottableLegendItem*>(plot->legend->item(i)))
            names << item->plottable()->name();
    return names;
}

// Where each text of an SVG written by QSvgGenerator starts and ends
// horizontally, in view-box units (measured with the font the text names).
struct SvgText {
    QString text;
    double left = 0, right = 0;
};
struct SvgLayout {
    double width = 0;
    std::vector<SvgText> texts;
};

SvgLayout svgLayout(const QByteArray& svg) {
    SvgLayout out;
    QXmlStreamReader xml(svg);
    std::vector<std::pair<double, double>> groups{{1.0, 0.0}};  // x scale and shift of each open <g>
    while (!xml.atEnd()) {
        xml.readNext();
        if (xml.isStartElement() && xml.name() == QLatin1String("svg")) {
            const QStringList box = xml.attributes().value(QLatin1String("viewBox")).toString().split(QLatin1Char(' '));
            if (box.size() == 4) out.width = box[2].toDouble();
        } else if (xml.isStartElement() && xml.name() == QLatin1String("g")) {
            auto [scale, shift] = groups.back();
            const QString t = xml.attributes().value(QLatin1String("transform")).toString();
            if (t.startsWith(QLatin1String("matrix("))) {
                const QStringList m = t.mid(7, t.size() - 8).split(QLatin1Char(','));
                if (m.size() == 6) shift = shift + scale * m[4].toDouble(), scale *= m[0].toDouble();
            }
            groups.push_back({scale, shift});
        } else if (xml.isEndElement() && xml.name() == QLatin1String("g")) {
            if (groups.size() > 1) groups.pop_back();
        } else if (xml.isStartElement() && xml.name() == QLatin1String("text")) {
            const auto attrs = xml.attributes();
            QFont font(attrs.value(QLatin1String("font-family")).toString());
            font.setPixelSize(static_cast<int>(std::lround(attrs.value(QLatin1String("font-size")).toDouble())));
            font.setWeight(static_cast<QFont::Weight>(attrs.value(QLatin1String("font-weight")).toInt()));
            const double x = attrs.value(QLatin1String("x")).toDouble();
            const QString text = xml.readElementText(QXmlStreamReader::IncludeChildElements);
            const auto [scale, shift] = groups.back();
            const double left = shift + scale * x;
            out.texts.push_back({text, left, left + scale * QFontMetricsF(font).horizontalAdvance(text)});
        }
    }
    return out;
}

double mean(const std::vector<double>& v) {
    double sum = 0;
    std::size_t n = 0;
    for (double x : v)
        if (!std::isnan(x)) sum += x, ++n;
    return sum / static_cast<double>(n);
}

}  // namespace

// Redo answered only Ctrl+Shift+Z and Save As had no key at all where the
// desktop names none (a plain X11 session): Ctrl+Y and Ctrl+Shift+S did nothing.
TEST(UserFlows, RedoAndSaveAsAnswerTheirUsualKeys) {
    Session s(QStringLiteral("orchard-nitrogen"));
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    QTest::mouseClick(s.probe()->moderatorSlider()->pinButton(), Qt::LeftButton);
    ASSERT_EQ(s.analysis().probe.pinned.size(), 1u);

    // Ctrl+Z, Ctrl+Y, and Ctrl+Z, Ctrl+Shift+Z (common practice: both redo keys).
    s.keys(Qt::Key_Z, Qt::ControlModifier);
    EXPECT_TRUE(s.analysis().probe.pinned.empty()) << "Ctrl+Z undoes the pin";
    s.keys(Qt::Key_Y, Qt::ControlModifier);
    EXPECT_EQ(s.analysis().probe.pinned.size(), 1u) << "Ctrl+Y redoes it";
    s.keys(Qt::Key_Z, Qt::ControlModifier);
    s.keys(Qt::Key_Z, Qt::ControlModifier | Qt::ShiftModifier);
    EXPECT_EQ(s.analysis().probe.pinned.size(), 1u) << "Ctrl+Shift+Z redoes it too";

    // Ctrl+Shift+S asks where to save (common practice); the user types a path and accepts.
    const QString target = s.dir.filePath(QStringLiteral("saved-as.moderato"));
    bool asked = false;
    QTimer answer;
    QObject::connect(&answer, &QTimer::timeout, [&] {
        auto* dialog = qobject_cast<QFileDialog*>(QApplication::activeModalWidget());
        auto* name = dialog ? dialog->findChild<QLineEdit*>(QStringLiteral("fileNameEdit")) : nullptr;
        if (!name) return;
        asked = true;
        answer.stop();
        // Typed into the file name box and confirmed with Enter, after this timer's slot returns.
        QTimer::singleShot(0, name, [name, target] {
            name->selectAll();
            QTest::keyClicks(name, target);
            QTest::keyClick(name, Qt::Key_Return);
        });
    });
    answer.start(20);
    QTimer::singleShot(5000, &answer, [&] { answer.stop(); });  // no dialog: the test fails below, it does not hang
    s.keys(Qt::Key_S, Qt::ControlModifier | Qt::ShiftModifier);
    EXPECT_TRUE(test::waitUntil([&] { return asked; }, 6000)) << "Ctrl+Shift+S opened no dialog";
    EXPECT_TRUE(test::waitUntil([&] { return QFile::exists(target); }, 6000));
    EXPECT_EQ(QFileInfo(s.w.document()->filePath()).absoluteFilePath(), QFileInfo(target).absoluteFilePath());
    EXPECT_FALSE(s.w.document()->isModified());
}

// The legend row keeps the wrapping made for the plot on screen; at a
// narrow figure size (Single column, 3.5 in) its last entries ran off the
// figure's right edge ("at the slider's valu…").
TEST(UserFlows, ExportedLegendFitsANarrowFigure) {
    Session s(QStringLiteral("orchard-nitrogen"));
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    QCoreApplication::processEvents();
    FigureSettings narrow;
    const FigurePreset* preset = findFigurePreset(SizePreset::SingleColumn);
    ASSERT_NE(preset, nullptr);
    narrow.preset = preset->key;
    narrow.width_in = preset->widthIn;
    narrow.height_in = preset->heightIn;
    for (FigureSource* source : QList<FigureSource*>{s.probe()->linesPlot(), s.probe()->effectPlot()}) {
        SCOPED_TRACE(source->figureName().toStdString());
        QCustomPlot* plot = source->figurePlot();
        const QStringList names = legendNames(plot);
        ASSERT_GE(names.size(), 3) << "a legend with several entries";
        const int wrapBefore = plot->legend->wrap();
        const int columnsBefore = plot->legend->columnCount();

        const SvgLayout svg = svgLayout(FigureExporter(source, narrow).renderSvg());
        ASSERT_GT(svg.width, 0);
        for (const QString& name : names) {
            // An export shows no slider's line unless asked (test_figure_slider_mark.cpp).
            if (name == QStringLiteral("at the slider's value")) continue;
            int found = 0;
            for (const SvgText& t : svg.texts)
                if (t.text == name) {
                    ++found;
                    EXPECT_GE(t.left, -0.5) << name.toStdString();
                    EXPECT_LE(t.right, svg.width + 0.5) << name.toStdString() << " runs off the figure's right edge";
                }
            // The Effect plot's note on boundaries beyond the data may break into a line that reads
            // the same as the legend's "beyond the data".
            int notes = 0;
            if (source == s.probe()->effectPlot())
                for (const QString& note : s.probe()->effectPlot()->boundaryNotes()) notes += note.contains(name);
            EXPECT_GE(found, 1) << name.toStdString();
            EXPECT_LE(found, 1 + notes) << name.toStdString();
        }
        // The plot on screen keeps its own wrapping.
        EXPECT_EQ(plot->legend->wrap(), wrapBefore);
        EXPECT_EQ(plot->legend->columnCount(), columnsBefore);
    }
}

// A file with ';' between fields and decimal commas previewed every number
// as text (categorical) until the user found the decimal-mark setting.
TEST(UserFlows, ImportReadsDecimalCommasTheWayTheFileWritesThem) {
    QTemporaryDir dir;
    const QString commas =
        writeFile(dir, QStringLiteral("commas.csv"), "site;yield;rain\nA;3,5;12,25\nB;4,75;0,5\nC;-1,25;7\n");
    {
        ImportDialog dlg(commas);
        dlg.show();
        ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
        EXPECT_TRUE(child<QComboBox>(&dlg, "import-decimal")->currentData().toBool()) << "the comma is taken";
        const Table& t = *dlg.previewTable();
        ASSERT_EQ(t.cols(), 3u);
        EXPECT_EQ(t.at("site").kind, ColumnKind::Categorical);
        ASSERT_EQ(t.at("yield").kind, ColumnKind::Numeric);
        ASSERT_EQ(t.at("rain").kind, ColumnKind::Numeric);
        // by hand: "3,5" = 3.5, "-1,25" = -1.25, "0,5" = 0.5
        EXPECT_DOUBLE_EQ(t.at("yield").numbers[0], 3.5);
        EXPECT_DOUBLE_EQ(t.at("yield").numbers[2], -1.25);
        EXPECT_DOUBLE_EQ(t.at("rain").numbers[1], 0.5);
        QTest::mouseClick(child<QPushButton>(&dlg, "import-load"), Qt::LeftButton);
        ASSERT_TRUE(test::waitUntil([&] { return dlg.result() == QDialog::Accepted; })) << dlg.message().toStdString();
        EXPECT_TRUE(dlg.options().decimal_comma);
        EXPECT_EQ(dlg.options().delimiter, 0) << "still detected";
        EXPECT_DOUBLE_EQ(dlg.table()->at("rain").numbers[0], 12.25);
    }
    {
        // The user's choice stands, through other changes of the options.
        ImportDialog dlg(commas);
        dlg.show();
        chooseByKeys(child<QComboBox>(&dlg, "import-decimal"), 0);  // Point (3.14)
        ASSERT_TRUE(test::waitUntil([&] {
            return dlg.previewTable() && dlg.previewTable()->at("yield").kind == ColumnKind::Categorical;
        })) << dlg.message().toStdString();
        auto* header = child<QCheckBox>(&dlg, "import-header");
        QTest::mouseClick(header, Qt::LeftButton, {}, QPoint(4, header->height() / 2));
        QTest::mouseClick(header, Qt::LeftButton, {}, QPoint(4, header->height() / 2));
        ASSERT_TRUE(test::waitUntil(
            [&] { return dlg.previewTable() && dlg.previewTable()->cols() == 3 && header->isChecked(); }));
        EXPECT_FALSE(child<QComboBox>(&dlg, "import-decimal")->currentData().toBool());
        EXPECT_EQ(dlg.previewTable()->at("yield").kind, ColumnKind::Categorical);
    }
    {
        // Decimal points between semicolons, and a comma-separated file with a
        // quoted "3,5": the point stays.
        const QString points = writeFile(dir, QStringLiteral("points.csv"), "site;yield\nA;3.5\nB;4\n");
        ImportDialog dlg(points);
        ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
        EXPECT_FALSE(child<QComboBox>(&dlg, "import-decimal")->currentData().toBool());
        EXPECT_DOUBLE_EQ(dlg.previewTable()->at("yield").numbers[0], 3.5);
        const QString quoted = writeFile(dir, QStringLiteral("quoted.csv"), "a,b\n\"3,5\",1\n\"4,5\",2\n");
        ImportDialog dlg2(quoted);
        ASSERT_NE(dlg2.previewTable(), nullptr) << dlg2.message().toStdString();
        EXPECT_FALSE(child<QComboBox>(&dlg2, "import-decimal")->currentData().toBool());
        EXPECT_FALSE(dlg2.messageIsError()) << dlg2.message().toStdString();
        EXPECT_EQ(dlg2.previewTable()->at("a").kind, ColumnKind::Categorical);
        EXPECT_EQ(dlg2.previewTable()->at("b").kind, ColumnKind::Numeric);
    }
}

// After the Moderator was changed, the Probe section kept the old column's
// slider value and pinned values: the readout said "slope_pct = 35.48
// (beyond the data)" while the slider sat at the end of its range.
TEST(UserFlows, ANewModeratorStartsTheProbeAtItsMean) {
    Session s(QStringLiteral("orchard-nitrogen"));
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    typeValue(s.probe()->moderatorSlider()->valueBox(), QStringLiteral("35.48"));
    QTest::mouseClick(s.probe()->moderatorSlider()->pinButton(), Qt::LeftButton);
    ASSERT_EQ(s.analysis().probe.pinned, std::vector<double>{35.48});
    ASSERT_DOUBLE_EQ(s.analysis().probe.current, 35.48);

    // Specify: slope_pct out of Controls, then dragged from the list onto Moderator.
    s.w.analysisPage()->showSection(AnalysisPage::Specify);
    QToolButton* remove = s.specify()->slot(Role::Controls)->removeButton("slope_pct");
    ASSERT_NE(remove, nullptr);
    QTest::mouseClick(remove, Qt::LeftButton);
    dropFromList(s.specify(), "slope_pct", Role::Moderator);
    ASSERT_EQ(s.analysis().roles.moderator, "slope_pct");
    EXPECT_TRUE(s.analysis().probe.pinned.empty());
    EXPECT_TRUE(std::isnan(s.analysis().probe.current));
    EXPECT_TRUE(s.specify()->message().contains(QStringLiteral("pinned values of 'soil_moisture_pct' were cleared")))
        << s.specify()->message().toStdString();

    // Probe: the slider, the box and the readout agree, at slope_pct's mean (closed form: the column's mean).
    ASSERT_TRUE(s.waitForRun());
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    QCoreApplication::processEvents();
    const double slopeMean = mean(s.w.document()->table(s.analysis().dataset)->at("slope_pct").numbers);
    EXPECT_NEAR(s.probe()->currentModeratorValue(), slopeMean, 1e-9);
    EXPECT_NEAR(s.probe()->moderatorSlider()->value(), slopeMean, 1e-9);
    EXPECT_NEAR(s.probe()->moderatorSlider()->valueBox()->value(), slopeMean, 0.01);
    EXPECT_TRUE(s.probe()->readoutText().startsWith(QStringLiteral("slope_pct = ")))
        << s.probe()->readoutText().toStdString();
    EXPECT_FALSE(s.probe()->currentEffect().beyond_data);

    // One undo brings back the old moderator with its values.
    s.w.document()->undoStack()->undo();
    EXPECT_EQ(s.analysis().roles.moderator, "soil_moisture_pct");
    EXPECT_EQ(s.analysis().probe.pinned, std::vector<double>{35.48});
    EXPECT_DOUBLE_EQ(s.analysis().probe.current, 35.48);
}

// Data imported into a project that already had an analysis showed up as a
// dataset only; the one way to analyse it was a context menu in the sidebar.
TEST(UserFlows, ImportingIntoAProjectStartsAnAnalysisOfTheNewData) {
    Session s(QStringLiteral("orchard-nitrogen"));
    const QString tickets = s.dir.filePath(QStringLiteral("tickets.csv"));
    ASSERT_TRUE(QFile::copy(test::samplesDir() + QStringLiteral("/helpdesk-staffing/tickets.csv"), tickets));
    const int undoBefore = s.w.document()->undoStack()->count();
    ASSERT_TRUE(test::importData(s.w, tickets)) << s.w.lastMessage().toStdString();

    const Project& p = s.w.document()->project();
    ASSERT_EQ(p.datasets.size(), 2u);
    ASSERT_EQ(p.analyses.size(), 2u);
    const Analysis& added = p.analyses.back();
    EXPECT_EQ(added.dataset, p.datasets.back().id);
    EXPECT_EQ(s.w.analysisPage()->analysisId(), QString::fromStdString(added.id)) << "the new analysis is on screen";
    // tickets.csv holds one numeric outcome-like column first (by construction of the sample).
    EXPECT_EQ(added.roles.outcome, "resolution_hours");
    EXPECT_FALSE(added.roles.focal.empty());
    const QString newId = QString::fromStdString(added.id);
    EXPECT_TRUE(test::waitUntil([&] { return s.w.runner()->result(newId) || !s.w.runner()->error(newId).isEmpty(); }));
    EXPECT_TRUE(s.w.runner()->error(newId).isEmpty()) << s.w.runner()->error(newId).toStdString();

    // One step: undo removes the dataset and its analysis together.
    EXPECT_EQ(s.w.document()->undoStack()->count(), undoBefore + 1);
    s.w.document()->undoStack()->undo();
    EXPECT_EQ(s.w.document()->project().datasets.size(), 1u);
    EXPECT_EQ(s.w.document()->project().analyses.size(), 1u);
}

// Saving a figure said nothing of that (or where) the file had been
// written; the export dialog stays open after a save.
TEST(UserFlows, SavingAFigureSaysWhereItWent) {
    Session s(QStringLiteral("orchard-nitrogen"));
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    const QString target = s.dir.filePath(QStringLiteral("effect.png"));
    // Ctrl+E, then Save… in the export dialog, then the path typed into the file dialog.
    enum { Export, FileName, Done } stage = Export;
    QTimer driver;
    QObject::connect(&driver, &QTimer::timeout, [&] {
        QWidget* modal = QApplication::activeModalWidget();
        auto* save = qobject_cast<FigureExportDialog*>(modal)
                         ? modal->findChild<QPushButton*>(QStringLiteral("figure-save"))
                         : nullptr;
        if (stage == Export && save) {
            stage = FileName;
            QTimer::singleShot(0, save, [save] { QTest::mouseClick(save, Qt::LeftButton); });
        } else if (stage == FileName && qobject_cast<QFileDialog*>(modal)) {
            auto* name = modal->findChild<QLineEdit*>(QStringLiteral("fileNameEdit"));
            if (!name) return;
            stage = Done;
            driver.stop();
            QTimer::singleShot(0, name, [name, target] {
                name->selectAll();
                QTest::keyClicks(name, target);
                QTest::keyClick(name, Qt::Key_Return);
            });
        }
    });
    driver.start(20);
    QTimer::singleShot(8000, &driver, [&] { driver.stop(); });
    s.keys(Qt::Key_E, Qt::ControlModifier);
    // The export dialog stays open after the save (for the next file).
    ASSERT_TRUE(test::waitUntil(
        [&] {
            return stage == Done && QFile::exists(target) &&
                   qobject_cast<FigureExportDialog*>(QApplication::activeModalWidget());
        },
        9000));
    const QString shown = s.w.statusBar()->currentMessage();
    EXPECT_TRUE(shown.contains(QDir::toNativeSeparators(QFileInfo(target).absoluteFilePath()))) << shown.toStdString();
    QApplication::activeModalWidget()->close();
}

// A recipe refused with a long message (log of a column holding 0) squeezed
// the dialog's fields over each other and cut the message off: the dialog
// kept its height while the wrapped text needed more.
TEST(UserFlows, DerivedColumnDialogShowsAWholeRefusal) {
    auto table = std::make_shared<Table>();
    table->source = "/some/where/rather/long/folder/name/plots.csv";
    Column c;
    c.name = "nitrogen_kg_ha";
    c.kind = ColumnKind::Numeric;
    c.numbers = {12, 0, 7, 3};  // the 0 makes log impossible (by construction)
    table->columns.push_back(c);
    DerivedColumnDialog dialog(table, {"nitrogen_kg_ha"}, QStringLiteral("plots"));
    dialog.setKind(RecipeKind::Log);
    dialog.setSource(QStringLiteral("nitrogen_kg_ha"));
    dialog.show();
    ASSERT_TRUE(QTest::qWaitForWindowExposed(&dialog));
    const int heightBefore = dialog.height();
    QTest::mouseClick(child<QPushButton>(&dialog, "derived-ok"), Qt::LeftButton);
    ASSERT_EQ(dialog.result(), QDialog::Rejected) << "the recipe is refused";
    auto* message = child<QLabel>(&dialog, "derived-message");
    ASSERT_TRUE(message->text().contains(QStringLiteral("nitrogen_kg_ha"))) << message->text().toStdString();
    QCoreApplication::processEvents();

    // Every line of the message is shown, and nothing overlaps: each row of the
    // form ends above the next, the message above the buttons.
    EXPECT_GE(message->height(), message->heightForWidth(message->width()));
    EXPECT_GT(dialog.height(), heightBefore);
    const QWidget* name = child<QLineEdit>(&dialog, "derived-name");
    const QWidget* hint = child<QLabel>(&dialog, "derived-hint");
    const QWidget* ok = child<QPushButton>(&dialog, "derived-ok");
    EXPECT_LE(name->geometry().bottom(), hint->geometry().top());
    EXPECT_LE(hint->geometry().bottom(), message->geometry().top());
    EXPECT_LE(message->geometry().bottom(), ok->mapTo(&dialog, QPoint(0, 0)).y());
    EXPECT_GE(child<QComboBox>(&dialog, "derived-kind")->height(),
              child<QComboBox>(&dialog, "derived-kind")->minimumSizeHint().height());
}
