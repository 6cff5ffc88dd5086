// The import dialog and the dataset page, driven through their widgets
// (offscreen): preview options, parse errors, cancelling a big load, a
// million-row grid, derived columns with undo/redo, and row selection.
// All data are generated here in temporary folders; expected values come
// from the construction of the data (by hand, closed form) or from sums
// computed in the test.
#include <gtest/gtest.h>

#include <QCheckBox>
#include <QComboBox>
#include <QCryptographicHash>
#include <QFile>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QListWidget>
#include <QProgressBar>
#include <QPushButton>
#include <QScrollBar>
#include <QTableView>
#include <QTemporaryDir>
#include <QTest>
#include <cmath>

#include "data/csv_head.hpp"
#include "data/dataset_page.hpp"
#include "data/derived_column_dialog.hpp"
#include "data/histogram_widget.hpp"
#include "data/import_dialog.hpp"
#include "data/table_model.hpp"
#include "model/project_document.hpp"
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

void chooseText(QComboBox* box, const QString& text) {
    ASSERT_NE(box, nullptr);
    chooseByKeys(box, box->findText(text));
}

void click(QWidget* w) {
    ASSERT_NE(w, nullptr);
    ASSERT_TRUE(w->isEnabled()) << w->objectName().toStdString() << " is disabled";
    QTest::mouseClick(w, Qt::LeftButton);
}

QVariant cell(const TableModel* m, int row, int col, int role = TableModel::ValueRole) {
    return m->data(m->index(row, col), role);
}

// A table built in memory: x = 0.25 i (missing every 1000th row), group = a/b/c in turn;
// row_lines as if read from a file with a header (line i + 2).
std::shared_ptr<const Table> bigTable(std::size_t rows) {
    auto t = std::make_shared<Table>();
    Column x;
    x.name = "x";
    x.numbers.resize(rows);
    Column g;
    g.name = "group";
    g.kind = ColumnKind::Categorical;
    g.levels = {"a", "b", "c"};
    g.codes.resize(rows);
    t->row_lines.resize(rows);
    for (std::size_t i = 0; i < rows; ++i) {
        x.numbers[i] = i % 1000 == 999 ? missing_value() : 0.25 * static_cast<double>(i);
        g.codes[i] = static_cast<std::int32_t>(i % 3);
        t->row_lines[i] = i + 2;
    }
    t->columns = {std::move(x), std::move(g)};
    t->source = "big.csv";
    return t;
}

}  // namespace

// ---------------------------------------------------------------- preview cut

TEST(CsvHead, CutsAtRecordEndsOutsideQuotes) {
    // Records counted by hand: the quoted field holds a line break.
    const std::string text = "a,b\n\"x\ny\",1\n2,3\n";
    EXPECT_EQ(csvHeadLength(text, 1, ','), 4u);   // "a,b\n"
    EXPECT_EQ(csvHeadLength(text, 2, ','), 12u);  // through "\"x\ny\",1\n"
    EXPECT_EQ(csvHeadLength(text, 3, ','), text.size());
    EXPECT_EQ(csvHeadLength(text, 4, ','), kNoCut);
    // A quote inside an unquoted field is text, so the line break after it ends the record.
    EXPECT_EQ(csvHeadLength("a,5\" screen\nb,c\n", 1, ','), 12u);
    // Doubled quotes stay inside the field; an open quote at the end needs more text.
    EXPECT_EQ(csvHeadLength("\"say \"\"hi\"\"\nthere\",1\nz,2\n", 1, ','), 21u);
    EXPECT_EQ(csvHeadLength("a\n\"open\n", 2, ','), kNoCut);
    // Sniffed delimiter: ';' also starts a field.
    EXPECT_EQ(csvHeadLength("a;\"b\nc\"\nd;e\n", 1, 0), 8u);
}

// ---------------------------------------------------------------- import dialog

TEST(ImportDialog, SemicolonFileWithDecimalCommasPreviewsNumbers) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QByteArray bytes =
        "shop;price;discount_pct;region\n"
        "north-1;3,5;12,25;north\n"
        "north-2;NA;0,5;north\n"
        "south-1;12,75;.;south\n"
        "south-2;-0,125;7;\n";
    const QString path = writeFile(dir, QStringLiteral("shops.csv"), bytes);
    const QByteArray hash = fileHash(path);

    ImportDialog dlg(path);
    dlg.show();
    auto* model = dlg.previewModel();
    // Defaults: the delimiter is detected and the decimal mark follows the file, so "3,5" is a number.
    ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
    ASSERT_EQ(model->columnCount(), 4);
    EXPECT_EQ(dlg.previewTable()->columns[1].kind, ColumnKind::Numeric);
    EXPECT_TRUE(child<QComboBox>(&dlg, "import-decimal")->currentData().toBool());

    chooseByKeys(child<QComboBox>(&dlg, "import-delimiter"), 2);  // Semicolon
    chooseByKeys(child<QComboBox>(&dlg, "import-decimal"), 1);    // Comma (3,14)
    ASSERT_TRUE(test::waitUntil([&] {
        return dlg.previewTable() && dlg.previewTable()->columns[1].kind == ColumnKind::Numeric;
    })) << dlg.message().toStdString();
    EXPECT_FALSE(dlg.messageIsError()) << dlg.message().toStdString();
    ASSERT_EQ(model->rowCount(), 4);
    EXPECT_EQ(model->headerData(1, Qt::Horizontal).toString(), QStringLiteral("price"));
    // The file's numbers with the comma read as the decimal mark (by hand).
    EXPECT_DOUBLE_EQ(cell(model, 0, 1).toDouble(), 3.5);
    EXPECT_DOUBLE_EQ(cell(model, 2, 1).toDouble(), 12.75);
    EXPECT_DOUBLE_EQ(cell(model, 3, 1).toDouble(), -0.125);
    EXPECT_DOUBLE_EQ(cell(model, 0, 2).toDouble(), 12.25);
    EXPECT_DOUBLE_EQ(cell(model, 1, 2).toDouble(), 0.5);
    // "NA", "." and an empty cell are missing by default, shown as a dash.
    EXPECT_TRUE(cell(model, 1, 1, TableModel::MissingRole).toBool());
    EXPECT_EQ(cell(model, 1, 1, Qt::DisplayRole).toString(), QStringLiteral("—"));
    EXPECT_TRUE(cell(model, 2, 2, TableModel::MissingRole).toBool());
    EXPECT_TRUE(cell(model, 3, 3, TableModel::MissingRole).toBool());
    // Row numbers are line numbers of the file (the header is line 1).
    EXPECT_EQ(model->headerData(0, Qt::Vertical).toString(), QStringLiteral("2"));
    EXPECT_EQ(model->headerData(3, Qt::Vertical).toString(), QStringLiteral("5"));

    // Per-column type: discount_pct read as categorical keeps the file's text.
    chooseByKeys(child<QComboBox>(&dlg, "import-kind-discount_pct"), 2);
    ASSERT_TRUE(test::waitUntil([&] {
        return dlg.previewTable() && dlg.previewTable()->columns[2].kind == ColumnKind::Categorical;
    })) << dlg.message().toStdString();
    EXPECT_EQ(cell(model, 0, 2).toString(), QStringLiteral("12,25"));

    // Without "NA" among the missing tokens, price holds text and turns categorical.
    auto* missing = child<QListWidget>(&dlg, "import-missing");
    const auto na = missing->findItems(QStringLiteral("NA"), Qt::MatchExactly);
    ASSERT_EQ(na.size(), 1);
    QTest::mouseClick(missing->viewport(), Qt::LeftButton, {}, missing->visualItemRect(na[0]).center());
    click(child<QPushButton>(&dlg, "import-missing-remove"));
    ASSERT_TRUE(test::waitUntil(
        [&] { return dlg.previewTable() && dlg.previewTable()->columns[1].kind == ColumnKind::Categorical; }));
    EXPECT_EQ(cell(model, 1, 1).toString(), QStringLiteral("NA"));
    EXPECT_EQ(missing->count(), 3);
    test::saveScreenshot(&dlg, QStringLiteral("import-dialog.png"));

    // Header off: the names become data and the columns V1..V4.
    click(child<QCheckBox>(&dlg, "import-header"));
    ASSERT_TRUE(test::waitUntil([&] { return dlg.previewTable() || dlg.messageIsError(); }));
    // discount_pct's override no longer names a column; the first row is data now.
    ASSERT_TRUE(test::waitUntil([&] { return dlg.previewTable() && dlg.previewTable()->rows() == 5; }))
        << dlg.message().toStdString();
    EXPECT_EQ(model->headerData(0, Qt::Horizontal).toString(), QStringLiteral("V1"));
    EXPECT_EQ(model->headerData(0, Qt::Vertical).toString(), QStringLiteral("1"));
    click(child<QCheckBox>(&dlg, "import-header"));  // back on
    ASSERT_TRUE(test::waitUntil([&] { return dlg.previewTable() && dlg.previewTable()->rows() == 4; }));

    // A new token typed into the list: "north" cells become missing.
    click(child<QPushButton>(&dlg, "import-missing-add"));
    auto* editor = missing->findChild<QLineEdit*>();
    ASSERT_NE(editor, nullptr);
    QTest::keyClicks(editor, QStringLiteral("north"));
    QTest::keyClick(editor, Qt::Key_Return);
    ASSERT_TRUE(test::waitUntil([&] {
        return dlg.previewTable() && cell(model, 0, 3, TableModel::MissingRole).toBool();
    })) << dlg.message().toStdString();
    EXPECT_EQ(missing->count(), 4);
    EXPECT_EQ(cell(model, 2, 3).toString(), QStringLiteral("south"));

    // Load reads the whole file with these options and closes the dialog.
    click(child<QPushButton>(&dlg, "import-load"));
    ASSERT_TRUE(test::waitUntil([&] { return dlg.result() == QDialog::Accepted; }, 20000))
        << dlg.message().toStdString();
    ASSERT_NE(dlg.table(), nullptr);
    EXPECT_EQ(dlg.table()->rows(), 4u);
    EXPECT_EQ(dlg.options().delimiter, ';');
    EXPECT_TRUE(dlg.options().decimal_comma);
    EXPECT_EQ(dlg.options().column_kinds.at("discount_pct"), ColumnKind::Categorical);
    EXPECT_EQ(dlg.table()->at("region").kind, ColumnKind::Categorical);
    EXPECT_EQ(dlg.table()->at("region").levels, std::vector<std::string>{"south"});  // "north" is missing now
    EXPECT_EQ(dlg.table()->at("region").missing_count(), 3u);                        // 2 north + 1 empty
    EXPECT_EQ(fileHash(path), hash);                                                 // the file was only read
}

TEST(ImportDialog, MalformedFilesShowTheLineInTheDialogAndStayUnchanged) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    struct Case {
        const char* name;
        QByteArray bytes;
        const char* expect;  // the line at fault, by construction of the file
    };
    const Case cases[] = {
        {"quote.csv", "id,name,score\n1,alpha,3\n2,\"beta,4\n3,gamma,5\n", "line 3"},
        {"fields.csv", "a,b\n1,2\n3,4,5\n6,7\n", "line 3"},
        {"header.csv", "a,,c\n1,2,3\n", "line 1, column 2"},
    };
    for (const Case& c : cases) {
        SCOPED_TRACE(c.name);
        const QString path = writeFile(dir, QString::fromLatin1(c.name), c.bytes);
        const QByteArray hash = fileHash(path);
        ImportDialog dlg(path);
        dlg.show();
        EXPECT_EQ(dlg.previewTable(), nullptr);
        EXPECT_TRUE(dlg.messageIsError());
        auto* label = child<QLabel>(&dlg, "import-message");
        EXPECT_TRUE(label->text().contains(QLatin1String(c.expect))) << label->text().toStdString();
        EXPECT_TRUE(label->text().contains(QLatin1String(c.name))) << label->text().toStdString();
        // Load tries the whole file: the same message, and the dialog stays open.
        click(child<QPushButton>(&dlg, "import-load"));
        ASSERT_TRUE(test::waitUntil([&] { return !dlg.isLoading(); }, 20000));
        EXPECT_TRUE(dlg.isVisible());
        EXPECT_NE(dlg.result(), QDialog::Accepted);
        EXPECT_EQ(dlg.table(), nullptr);
        EXPECT_TRUE(dlg.messageIsError());
        EXPECT_TRUE(label->text().contains(QLatin1String(c.expect))) << label->text().toStdString();
        EXPECT_EQ(fileHash(path), hash);
    }
}

TEST(ImportDialog, PreviewReadsOnWhenTheCutFallsInsideAQuotedField) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    // 400 data rows; row 200 (line 201) holds a note with three line breaks,
    // so the 201st record ends on line 204.
    QByteArray bytes = "id,note\n";
    for (int i = 1; i <= 400; ++i)
        bytes += i == 200 ? QByteArray("200,\"one\ntwo\nthree\nfour\"\n") : QByteArray::number(i) + ",plain\n";
    const QString path = writeFile(dir, QStringLiteral("notes.csv"), bytes);
    ImportDialog dlg(path);
    ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
    EXPECT_FALSE(dlg.messageIsError());
    const Table& t = *dlg.previewTable();
    ASSERT_EQ(t.rows(), ImportDialog::kPreviewRecords - 1);
    const Column& note = t.at("note");
    EXPECT_EQ(note.levels[static_cast<std::size_t>(note.codes[199])], "one\ntwo\nthree\nfour");
    EXPECT_EQ(t.row_lines[199], 201u);
}

TEST(ImportDialog, OtherDelimiterNeedsOneCharacter) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = writeFile(dir, QStringLiteral("pipes.txt"), "a|b\n1|2\n3|4\n");
    ImportDialog dlg(path);
    dlg.show();
    chooseByKeys(child<QComboBox>(&dlg, "import-delimiter"), 4);  // Other character
    ASSERT_TRUE(test::waitUntil([&] { return dlg.messageIsError(); }));
    EXPECT_FALSE(child<QPushButton>(&dlg, "import-load")->isEnabled());
    auto* other = child<QWidget>(&dlg, "import-delimiter-other");
    ASSERT_TRUE(other->isEnabled());
    QTest::keyClicks(other, QStringLiteral("|"));
    ASSERT_TRUE(test::waitUntil([&] { return dlg.previewTable() && dlg.previewTable()->cols() == 2; }))
        << dlg.message().toStdString();
    EXPECT_DOUBLE_EQ(cell(dlg.previewModel(), 1, 1).toDouble(), 4.0);
}

TEST(ImportDialog, CancelDuringABigLoadEndsWithoutATable) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = dir.filePath(QStringLiteral("big.csv"));
    {
        QFile f(path);
        ASSERT_TRUE(f.open(QIODevice::WriteOnly));
        f.write("id,amount,group,share\n");
        QByteArray chunk;
        for (int i = 0; i < 1800000; ++i) {
            chunk += QByteArray::number(i) + ',' + QByteArray::number(i * 0.001 + 12.5, 'f', 4) + ",group_" +
                     QByteArray::number(i % 7) + ",0." + QByteArray::number(i % 1000) + '\n';
            if (chunk.size() > (1 << 20)) {
                f.write(chunk);
                chunk.clear();
            }
        }
        f.write(chunk);
    }
    ASSERT_GT(QFileInfo(path).size(), 50'000'000);
    const QByteArray hash = fileHash(path);
    {
        ImportDialog dlg(path);
        dlg.show();
        ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
        click(child<QPushButton>(&dlg, "import-load"));
        ASSERT_TRUE(dlg.isLoading());
        EXPECT_TRUE(child<QProgressBar>(&dlg, "import-progress")->isVisible());
        EXPECT_FALSE(child<QWidget>(&dlg, "import-delimiter")->isEnabled());
        click(child<QPushButton>(&dlg, "import-cancel"));
        ASSERT_TRUE(test::waitUntil([&] { return !dlg.isLoading(); }, 60000));
        EXPECT_EQ(dlg.table(), nullptr);
        EXPECT_TRUE(dlg.isVisible());  // Cancel stopped the load, not the dialog
        EXPECT_NE(dlg.result(), QDialog::Accepted);
        EXPECT_TRUE(dlg.message().contains(QLatin1String("cancelled"))) << dlg.message().toStdString();
        EXPECT_FALSE(child<QProgressBar>(&dlg, "import-progress")->isVisible());
        EXPECT_TRUE(child<QWidget>(&dlg, "import-delimiter")->isEnabled());
        // A second Cancel closes the dialog.
        click(child<QPushButton>(&dlg, "import-cancel"));
        EXPECT_FALSE(dlg.isVisible());
        EXPECT_EQ(dlg.result(), QDialog::Rejected);
    }
    {
        // Closing the dialog while it reads stops the worker before the dialog goes.
        auto dlg = std::make_unique<ImportDialog>(path);
        dlg->startLoad();
        ASSERT_TRUE(dlg->isLoading());
        dlg.reset();
    }
    EXPECT_EQ(fileHash(path), hash);
}

// ---------------------------------------------------------------- dataset page

TEST(DatasetPage, MillionRowGridReadsTheCoreTable) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    constexpr std::size_t kRows = 1'000'000;
    ProjectDocument doc;
    const std::string id = doc.addDataset(dir.filePath(QStringLiteral("big.csv")), CsvOptions{}, bigTable(kRows));
    DatasetPage page(&doc);
    page.resize(1100, 700);
    page.show();
    page.showDataset(QString::fromStdString(id));
    TableModel* model = page.model();
    ASSERT_EQ(model->rowCount(), 1'000'000);
    ASSERT_EQ(model->columnCount(), 2);
    // The last rows, by construction: x of row 999999 is missing (every 1000th), group
    // code 999999 % 3 = 0 -> "a", line 1000001; row 999998 has x = 0.25 * 999998.
    EXPECT_TRUE(cell(model, 999'999, 0, TableModel::MissingRole).toBool());
    EXPECT_EQ(cell(model, 999'999, 0, Qt::DisplayRole).toString(), QStringLiteral("—"));
    EXPECT_TRUE(cell(model, 999'999, 0, Qt::ForegroundRole).isValid());  // dimmed
    EXPECT_EQ(cell(model, 999'999, 1).toString(), QStringLiteral("a"));
    EXPECT_EQ(model->headerData(999'999, Qt::Vertical).toString(), QStringLiteral("1000001"));
    EXPECT_DOUBLE_EQ(cell(model, 999'998, 0).toDouble(), 249'999.5);
    EXPECT_EQ(cell(model, 999'998, 0, Qt::DisplayRole).toString(), QStringLiteral("249999.5"));
    EXPECT_EQ(cell(model, 999'998, 1).toString(), QStringLiteral("c"));  // 999998 % 3 = 2
    EXPECT_FALSE(cell(model, 999'998, 0, Qt::ForegroundRole).isValid());

    // Scroll to the bottom with the keyboard: the last row is on screen.
    QTableView* grid = page.grid();
    grid->setFocus();
    grid->setCurrentIndex(model->index(0, 0));
    QTest::keyClick(grid, Qt::Key_End, Qt::ControlModifier);
    QCoreApplication::processEvents();
    EXPECT_EQ(grid->currentIndex().row(), 999'999);
    EXPECT_EQ(grid->verticalScrollBar()->value(), grid->verticalScrollBar()->maximum());
    const int lastVisible = grid->rowAt(grid->viewport()->height() - 2);
    EXPECT_EQ(lastVisible, 999'999);
    const QImage shot = page.grab().toImage();  // paints the bottom of a million rows
    EXPECT_FALSE(shot.isNull());
    // Page-down steps move through the middle of the table.
    QTest::keyClick(grid, Qt::Key_Home, Qt::ControlModifier);
    for (int i = 0; i < 5; ++i) QTest::keyClick(grid, Qt::Key_PageDown);
    EXPECT_GT(grid->currentIndex().row(), 50);
    EXPECT_LT(grid->currentIndex().row(), 999'999);

    // The summary of x, computed by core, against sums taken here.
    page.showSummary(0);
    const ColumnSummary* s = page.currentSummary();
    ASSERT_NE(s, nullptr);
    double sum = 0;
    std::size_t n = 0;
    for (std::size_t i = 0; i < kRows; ++i)
        if (i % 1000 != 999) sum += 0.25 * static_cast<double>(i), ++n;
    EXPECT_EQ(s->n, n);
    EXPECT_EQ(s->missing, kRows / 1000);
    EXPECT_NEAR(s->mean, sum / static_cast<double>(n), 1e-9);
    EXPECT_EQ(s->max, 0.25 * 999'998);  // row 999999 is missing, 999998 is the largest present
    auto* histogram = child<HistogramWidget>(&page, "column-histogram");
    EXPECT_EQ(histogram->counts(), s->histogram.counts);
    // Written as every number is: four significant digits (the whole part kept), counts with thousands
    // separators (English grouping).
    EXPECT_EQ(child<QLabel>(&page, "summary-mean")->text(), test::fourDigits(sum / static_cast<double>(n)));
    EXPECT_EQ(child<QLabel>(&page, "summary-values")->text(),
              QLocale(QLocale::English).toString(static_cast<qulonglong>(n)));
    // The categorical column: a, b, c in turn (by construction: 333334, 333333, 333333).
    page.showSummary(1);
    ASSERT_NE(page.currentSummary(), nullptr);
    EXPECT_EQ(page.currentSummary()->level_counts, (std::vector<std::size_t>{333'334, 333'333, 333'333}));
    EXPECT_EQ(histogram->counts(), page.currentSummary()->level_counts);
    EXPECT_TRUE(child<QWidget>(&page, "summary-levels")->isVisible());
}

TEST(DatasetPage, CentreAtTheMeanFromTheDialogWithUndoAndRedo) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    QByteArray bytes = "spend,discount_pct,tier\n";
    for (int i = 0; i < 60; ++i) {
        bytes += QByteArray::number(20 + (i * 37) % 23) + ',';
        if (i % 11 != 4) bytes += QByteArray::number(((i * 13) % 17) * 0.5 - 1.5);  // 0 and negatives occur
        bytes += i % 3 ? ",gold\n" : ",basic\n";
    }
    const QString path = writeFile(dir, QStringLiteral("orders.csv"), bytes);
    const auto table = std::make_shared<const Table>(read_csv(path.toStdString()));
    ProjectDocument doc;
    const std::string id = doc.addDataset(path, CsvOptions{}, table);
    DatasetPage page(&doc);
    page.resize(1100, 700);
    page.show();
    page.showDataset(QString::fromStdString(id));
    TableModel* model = page.model();
    ASSERT_EQ(model->columnCount(), 3);
    const int steps = doc.undoStack()->count();

    click(child<QPushButton>(&page, "add-derived"));
    auto* dialog = page.findChild<DerivedColumnDialog*>(QStringLiteral("derived-dialog"));
    ASSERT_NE(dialog, nullptr);
    ASSERT_TRUE(dialog->isVisible());
    chooseByKeys(child<QComboBox>(dialog, "derived-kind"), 0);  // Centre at the mean
    chooseText(child<QComboBox>(dialog, "derived-source"), QStringLiteral("discount_pct"));
    auto* name = child<QLineEdit>(dialog, "derived-name");
    EXPECT_EQ(name->text(), QStringLiteral("discount_pct_c"));
    test::saveScreenshot(dialog, QStringLiteral("derived-dialog.png"));
    click(child<QPushButton>(dialog, "derived-ok"));
    ASSERT_TRUE(test::waitUntil([&] { return model->columnCount() == 4; }));
    EXPECT_EQ(doc.undoStack()->count(), steps + 1);

    // Mean of the present values, summed here.
    const Column& x = table->at("discount_pct");
    double sum = 0;
    int n = 0;
    for (const double v : x.numbers)
        if (!std::isnan(v)) sum += v, ++n;
    const double mean = sum / n;
    EXPECT_EQ(model->headerData(3, Qt::Horizontal).toString(), QStringLiteral("discount_pct_c"));
    EXPECT_TRUE(model->headerData(3, Qt::Horizontal, TableModel::DerivedRole).toBool());
    EXPECT_FALSE(model->headerData(1, Qt::Horizontal, TableModel::DerivedRole).toBool());
    for (int r = 0; r < model->rowCount(); ++r) {
        const double v = x.numbers[static_cast<std::size_t>(r)];
        if (std::isnan(v)) EXPECT_TRUE(cell(model, r, 3, TableModel::MissingRole).toBool()) << "row " << r;
        else EXPECT_NEAR(cell(model, r, 3).toDouble(), v - mean, 1e-12) << "row " << r;
    }
    auto* list = child<QListWidget>(&page, "derived-list");
    EXPECT_EQ(list->count(), 1);
    test::saveScreenshot(&page, QStringLiteral("dataset-page.png"));
    page.showSummary(2);  // tier: basic on every third row (i % 3 == 0), gold otherwise (construction)
    ASSERT_NE(page.currentSummary(), nullptr);
    EXPECT_EQ(page.currentSummary()->level_counts, (std::vector<std::size_t>{20, 40}));
    test::saveScreenshot(&page, QStringLiteral("dataset-page-levels.png"));

    doc.undoStack()->undo();
    EXPECT_EQ(model->columnCount(), 3);
    EXPECT_EQ(list->count(), 0);
    EXPECT_TRUE(doc.project().recipes_for(id).empty());
    doc.undoStack()->redo();
    ASSERT_EQ(model->columnCount(), 4);
    EXPECT_EQ(list->count(), 1);
    EXPECT_NEAR(cell(model, 0, 3).toDouble(), x.numbers[0] - mean, 1e-12);

    // Remove it from the list: one more undoable step.
    QTest::mouseClick(list->viewport(), Qt::LeftButton, {}, list->visualItemRect(list->item(0)).center());
    click(child<QPushButton>(&page, "remove-derived"));
    EXPECT_EQ(model->columnCount(), 3);
    doc.undoStack()->undo();
    EXPECT_EQ(model->columnCount(), 4);
}

TEST(DatasetPage, RecipesThatCannotBeComputedAreExplained) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    // amount is 0 on line 3 (the second data row), by construction.
    const QString path = writeFile(dir, QStringLiteral("amounts.csv"), "amount,size\n4,1\n0,2\n9,3\n");
    const auto table = std::make_shared<const Table>(read_csv(path.toStdString()));
    ProjectDocument doc;
    const std::string id = doc.addDataset(path, CsvOptions{}, table);
    DatasetPage page(&doc);
    page.show();
    page.showDataset(QString::fromStdString(id));
    const int steps = doc.undoStack()->count();

    // In the dialog: the log of a column with a 0 is refused with the line, and nothing is added.
    DerivedColumnDialog* dialog = page.openDerivedDialog();
    ASSERT_NE(dialog, nullptr);
    chooseText(child<QComboBox>(dialog, "derived-kind"), QStringLiteral("Natural log"));
    chooseText(child<QComboBox>(dialog, "derived-source"), QStringLiteral("amount"));
    EXPECT_EQ(child<QLineEdit>(dialog, "derived-name")->text(), QStringLiteral("log_amount"));
    click(child<QPushButton>(dialog, "derived-ok"));
    EXPECT_TRUE(dialog->isVisible());
    EXPECT_TRUE(dialog->message().contains(QLatin1String("line 3"))) << dialog->message().toStdString();
    EXPECT_EQ(doc.undoStack()->count(), steps);
    // A name already in use is refused too.
    chooseText(child<QComboBox>(dialog, "derived-kind"), QStringLiteral("Square"));
    QLineEdit* name = child<QLineEdit>(dialog, "derived-name");
    name->selectAll();
    QTest::keyClicks(name, QStringLiteral("size"));
    click(child<QPushButton>(dialog, "derived-ok"));
    EXPECT_TRUE(dialog->message().contains(QLatin1String("already has a column named")))
        << dialog->message().toStdString();
    click(child<QPushButton>(dialog, "derived-cancel"));
    EXPECT_EQ(doc.undoStack()->count(), steps);

    // A recipe that fails on the data (as from a project file) is shown on the page.
    Project p = doc.project();
    DerivedRecipe bad;
    bad.dataset = id;
    bad.name = "log_amount";
    bad.kind = RecipeKind::Log;
    bad.source = "amount";
    p.derived.push_back(bad);
    doc.setProject(p, QStringLiteral("test"));
    auto* error = child<QLabel>(&page, "dataset-error");
    EXPECT_TRUE(error->isVisible());
    EXPECT_TRUE(error->text().contains(QLatin1String("line 3"))) << error->text().toStdString();
    EXPECT_TRUE(error->text().contains(QLatin1String("log_amount"))) << error->text().toStdString();
    EXPECT_EQ(page.model()->columnCount(), 2);  // the table without derived columns
    doc.undoStack()->undo();
    EXPECT_FALSE(error->isVisible());
}

TEST(DatasetPage, SelectRowsSelectsThemAndScrollsToTheFirst) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    ProjectDocument doc;
    const std::string id = doc.addDataset(dir.filePath(QStringLiteral("big.csv")), CsvOptions{}, bigTable(200'000));
    DatasetPage page(&doc);
    page.resize(900, 600);
    page.show();
    page.showDataset(QString::fromStdString(id));
    const std::vector<std::size_t> rows{150'000, 7, 8, 9, 42, 150'001};
    page.selectRows(rows);
    QCoreApplication::processEvents();
    QItemSelectionModel* sel = page.grid()->selectionModel();
    for (const std::size_t r : rows) EXPECT_TRUE(sel->isRowSelected(static_cast<int>(r), {})) << r;
    for (const int r : {0, 6, 10, 41, 43, 149'999, 150'002}) EXPECT_FALSE(sel->isRowSelected(r, {})) << r;
    EXPECT_EQ(sel->selectedRows().size(), 6);
    // Scrolled to the first row given.
    EXPECT_EQ(page.grid()->currentIndex().row(), 150'000);
    const QRect visible = page.grid()->viewport()->rect();
    EXPECT_TRUE(visible.intersects(page.grid()->visualRect(page.model()->index(150'000, 0))));
    // Rows outside the table are ignored.
    page.selectRows({5'000'000, 3});
    EXPECT_EQ(sel->selectedRows().size(), 1);
    EXPECT_TRUE(sel->isRowSelected(3, {}));
}

TEST(GuessAnalysis, PassesOverColumnsThatNameRows) {
    // Common practice: a row number, an "..._id" and a label per row are not
    // measurements, so the first guess starts at the first real measure.
    std::string csv = "row,store_id,label,minutes,distance,remote\n";
    for (int i = 1; i <= 30; ++i)
        csv += std::to_string(i) + "," + std::to_string(100 + 7 * i) + ",trip" + std::to_string(i) + "," +
               std::to_string(20 + i % 9) + "." + std::to_string(i % 10) + "," + std::to_string(i % 13) + "," +
               std::to_string(i % 2) + "\n";
    const Table t = read_csv_text(csv, "trips.csv");
    const Analysis a = guess_analysis(t, "trips", "analysis");
    EXPECT_EQ(a.roles.outcome, "minutes");
    EXPECT_EQ(a.roles.focal, "distance");
    EXPECT_EQ(a.roles.moderator, "remote");
}
