// Honest import, driven through the widgets (offscreen): a numeric column
// turned categorical by a few words is reported in the import preview with
// its lines and texts and a one-click "read as numbers"; the preview names
// the delimiter and decimal mark it found and counts each column's missing
// cells; after import a column's kind is changed on the dataset page as one
// undo step, and the dataset's analyses are fitted again. The data are made
// here; expected values come from their construction (by hand).
#include <gtest/gtest.h>

#include <QComboBox>
#include <QLabel>
#include <QPushButton>
#include <QSignalSpy>
#include <QTableWidget>
#include <QTemporaryDir>
#include <QTest>
#include <cmath>

#include "data/column_kind_box.hpp"
#include "data/dataset_page.hpp"
#include "data/import_dialog.hpp"
#include "data/table_model.hpp"
#include "model/project_document.hpp"
#include "moderato/reading/csv.hpp"
#include "qt_file_bytes.hpp"
#include "screenshot.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::child;
using moderato::test::chooseByKeys;
using moderato::test::fileHash;
using moderato::test::writeFile;

namespace {

void click(QWidget* w) {
    ASSERT_NE(w, nullptr);
    ASSERT_TRUE(w->isVisible()) << w->objectName().toStdString() << " is hidden";
    ASSERT_TRUE(w->isEnabled()) << w->objectName().toStdString() << " is disabled";
    QTest::mouseClick(w, Qt::LeftButton);
}

// 40 trips, semicolon-separated with decimal commas: training hours are
// numbers except "twelve" on line 9 and "lots" on line 30; delay has an NA
// on lines 5 and 25; route is a word.
QByteArray tripsFile() {
    QByteArray bytes = "trip;training_hours;delay;route\n";
    for (int i = 0; i < 40; ++i) {
        const int line = i + 2;
        QByteArray hours = QByteArray::number(10 + i % 7) + ",5";
        if (line == 9) hours = "twelve";
        if (line == 30) hours = "lots";
        const QByteArray delay = line == 5 || line == 25 ? "NA" : QByteArray::number(3 + i % 4) + ",25";
        bytes += "t" + QByteArray::number(i) + ';' + hours + ';' + delay + (i % 2 ? ";harbour\n" : ";island\n");
    }
    return bytes;
}

int rowOf(QTableWidget* list, const QString& name) {
    for (int r = 0; r < list->rowCount(); ++r)
        if (list->item(r, 0) && list->item(r, 0)->text() == name) return r;
    return -1;
}

}  // namespace

TEST(HonestImport, AFewWordsAmongNumbersAreShownWithAOneClickFix) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = writeFile(dir, QStringLiteral("trips.csv"), tripsFile());
    const QByteArray hash = fileHash(path);
    ImportDialog dlg(path);
    dlg.resize(1000, 700);
    dlg.show();
    ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
    EXPECT_EQ(dlg.previewTable()->at("training_hours").kind, ColumnKind::Categorical);

    // What Detect found, and the decimal mark taken from the file.
    auto* delimiter = child<QComboBox>(&dlg, "import-delimiter");
    EXPECT_EQ(delimiter->itemText(0), QStringLiteral("Detect (found: semicolon)"));
    EXPECT_EQ(child<QLabel>(&dlg, "import-decimal-note")->text(), QStringLiteral("found in the file"));
    EXPECT_TRUE(child<QComboBox>(&dlg, "import-decimal")->currentData().toBool());

    // Missing cells per column in the preview: delay has two NA (lines 5 and 25).
    auto* kinds = child<QTableWidget>(&dlg, "import-column-types");
    const int delayRow = rowOf(kinds, QStringLiteral("delay"));
    ASSERT_GE(delayRow, 0);
    EXPECT_EQ(kinds->item(delayRow, 1)->text(), QStringLiteral("2"));
    EXPECT_EQ(kinds->item(rowOf(kinds, QStringLiteral("route")), 1)->text(), QStringLiteral("0"));

    // The note names the column, the count and the first offending lines with their text.
    auto* note = dlg.textNotes()->findChild<QWidget*>(QStringLiteral("import-text-note-training_hours"));
    ASSERT_NE(note, nullptr);
    const QString text = note->findChild<QLabel*>()->text();
    EXPECT_TRUE(text.contains(QStringLiteral("because 2 of its 40 non-missing cells are not numbers")))
        << text.toStdString();
    EXPECT_TRUE(text.contains(QStringLiteral("line 9 “twelve”"))) << text.toStdString();
    EXPECT_TRUE(text.contains(QStringLiteral("line 30 “lots”"))) << text.toStdString();
    // route is words only: no note.
    EXPECT_EQ(dlg.textNotes()->findChild<QWidget*>(QStringLiteral("import-text-note-route")), nullptr);
    test::saveScreenshot(&dlg, QStringLiteral("import-preview-text-cells.png"));

    // One click: read as numbers with those cells missing.
    click(dlg.textNotes()->findChild<QPushButton*>(QStringLiteral("import-text-missing-training_hours")));
    ASSERT_TRUE(test::waitUntil([&] {
        return dlg.previewTable() && dlg.previewTable()->at("training_hours").kind == ColumnKind::Numeric;
    })) << dlg.message().toStdString();
    const Column& hours = dlg.previewTable()->at("training_hours");
    EXPECT_EQ(hours.numbers[0], 10.5);           // line 2: 10 + 0 % 7, ",5"
    EXPECT_TRUE(std::isnan(hours.numbers[7]));   // line 9
    EXPECT_TRUE(std::isnan(hours.numbers[28]));  // line 30
    EXPECT_EQ(hours.text_as_missing, 2u);
    auto* kindBox = child<QComboBox>(&dlg, "import-kind-training_hours");
    EXPECT_EQ(kindBox->currentText(), QStringLiteral("numeric, text as missing"));
    const int hoursRow = rowOf(kinds, QStringLiteral("training_hours"));
    EXPECT_EQ(kinds->item(hoursRow, 1)->text(), QStringLiteral("2"));
    auto* readMissing = dlg.textNotes()->findChild<QLabel*>(QStringLiteral("import-text-read-missing-training_hours"));
    ASSERT_NE(readMissing, nullptr);
    EXPECT_TRUE(readMissing->text().contains(QStringLiteral("2 cells of text read as missing")))
        << readMissing->text().toStdString();
    EXPECT_EQ(dlg.textNotes()->findChild<QWidget*>(QStringLiteral("import-text-note-training_hours")), nullptr);
    test::saveScreenshot(&dlg, QStringLiteral("import-preview-read-as-numbers.png"));

    // Back to automatic: categorical again, and the note returns; then the one click once more.
    chooseByKeys(kindBox, 0);
    ASSERT_TRUE(test::waitUntil([&] {
        return dlg.previewTable() && dlg.previewTable()->at("training_hours").kind == ColumnKind::Categorical;
    }));
    auto* again = dlg.textNotes()->findChild<QPushButton*>(QStringLiteral("import-text-missing-training_hours"));
    ASSERT_NE(again, nullptr);
    EXPECT_TRUE(again->isVisible()) << "shown as soon as the preview is read";
    click(again);
    ASSERT_TRUE(test::waitUntil(
        [&] { return dlg.previewTable() && dlg.previewTable()->at("training_hours").kind == ColumnKind::Numeric; }));

    // The whole file is read the same way; the option is kept with the dataset.
    click(child<QPushButton>(&dlg, "import-load"));
    ASSERT_TRUE(test::waitUntil([&] { return dlg.result() == QDialog::Accepted; }, 20000))
        << dlg.message().toStdString();
    EXPECT_EQ(dlg.options().text_as_missing, std::set<std::string>{"training_hours"});
    EXPECT_EQ(dlg.table()->at("training_hours").text_as_missing, 2u);
    EXPECT_EQ(fileHash(path), hash);  // the file was only read
}

TEST(HonestImport, AColumnsKindChangesOnTheDatasetPageAsOneUndoStep) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = writeFile(dir, QStringLiteral("trips.csv"), tripsFile());
    CsvOptions options;
    options.delimiter = ';';
    options.decimal_comma = true;
    const auto table = std::make_shared<const Table>(read_csv(path.toStdString(), options));
    ProjectDocument doc;
    const std::string id = doc.addDataset(path, options, table);
    DatasetPage page(&doc);
    page.resize(1100, 700);
    page.show();
    page.showDataset(QString::fromStdString(id));
    const int hoursColumn = 1;
    page.showSummary(hoursColumn);
    ColumnKindBox* box = page.kindBox();
    ASSERT_TRUE(box->isVisible());
    EXPECT_EQ(box->kindChoice()->currentText(), QStringLiteral("categories"));
    ASSERT_TRUE(box->note()->isVisible());
    EXPECT_TRUE(box->note()->text().contains(QStringLiteral("line 9 “twelve”"))) << box->note()->text().toStdString();
    const int steps = doc.undoStack()->count();
    QSignalSpy refits(&doc, &ProjectDocument::analysisChanged);

    click(box->readAsNumbers());
    const auto now = doc.table(id);
    ASSERT_EQ(now->at("training_hours").kind, ColumnKind::Numeric);
    EXPECT_EQ(now->at("training_hours").numbers[1], 11.5);  // line 3: 10 + 1 % 7, ",5"
    EXPECT_EQ(now->at("training_hours").text_as_missing, 2u);
    EXPECT_EQ(doc.undoStack()->count(), steps + 1);
    EXPECT_EQ(doc.undoStack()->undoText(), QStringLiteral("Read “training_hours” as numbers"));
    EXPECT_EQ(doc.project().dataset(id)->retyped.at("training_hours"), ColumnKind::Numeric);
    EXPECT_GE(refits.count(), 1);  // the dataset's analysis is fitted again
    EXPECT_EQ(page.summaryColumn(), hoursColumn);
    EXPECT_EQ(page.kindBox()->kindChoice()->currentText(), QStringLiteral("numbers"));
    EXPECT_TRUE(box->note()->text().contains(QStringLiteral("2 cells of text read as missing")))
        << box->note()->text().toStdString();
    test::saveScreenshot(&page, QStringLiteral("dataset-page-read-as-numbers.png"));

    doc.undoStack()->undo();
    EXPECT_EQ(doc.table(id)->at("training_hours").kind, ColumnKind::Categorical);
    EXPECT_TRUE(doc.project().dataset(id)->retyped.empty());
    doc.undoStack()->redo();
    EXPECT_EQ(doc.table(id)->at("training_hours").kind, ColumnKind::Numeric);

    // A numeric column read as categories by the choice box: levels in order of appearance.
    page.showSummary(2);  // delay
    QComboBox* choice = page.kindBox()->kindChoice();
    chooseByKeys(choice, choice->findText(QStringLiteral("categories")));
    const Column& delay = doc.table(id)->at("delay");
    ASSERT_EQ(delay.kind, ColumnKind::Categorical);
    EXPECT_EQ(delay.levels.front(), "3.25");  // line 2: 3 + 0 % 4, ",25"
    EXPECT_EQ(delay.levels.size(), 4u);
    EXPECT_EQ(doc.undoStack()->undoText(), QStringLiteral("Read “delay” as categories"));
    // Choosing the kind it was read with drops the change.
    chooseByKeys(page.kindBox()->kindChoice(), 0);
    EXPECT_EQ(doc.table(id)->at("delay").kind, ColumnKind::Numeric);
    EXPECT_EQ(doc.project().dataset(id)->retyped.count("delay"), 0u);
}
