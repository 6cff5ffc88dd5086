// The import dialog on a workbook and an SQLite database, driven with real
// widgets: the sheets or tables are offered, a query can be typed, the
// preview follows the choice, Load reads the chosen table, and the dataset
// added to the project records where it came from. The workbook is
// tests/data/workbooks/mixed.xlsx (written by openpyxl 3.0.9; its values are
// in expected.json); the database is built here through SQLite's C API.
#include <gtest/gtest.h>
#include <sqlite3.h>

#include <QComboBox>
#include <QFile>
#include <QGroupBox>
#include <QLabel>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRadioButton>
#include <QTableWidget>
#include <QTemporaryDir>
#include <QTest>

#include "data/import_dialog.hpp"
#include "data/source_choice.hpp"
#include "data/table_model.hpp"
#include "model/project_document.hpp"
#include "qt_file_bytes.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::child;
using moderato::test::chooseByKeys;
using moderato::test::fileHash;

namespace {

void click(QWidget* w) {
    ASSERT_NE(w, nullptr);
    ASSERT_TRUE(w->isEnabled()) << w->objectName().toStdString() << " is disabled";
    QTest::mouseClick(w, Qt::LeftButton);
}

void loadAndWait(ImportDialog& dlg) {
    click(child<QPushButton>(&dlg, "import-load"));
    ASSERT_TRUE(test::waitUntil([&] { return !dlg.isLoading() && dlg.table(); }, 20000)) << dlg.message().toStdString();
}

TEST(ImportSources, WorkbookOffersItsSheets) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = dir.filePath(QStringLiteral("mixed.xlsx"));
    ASSERT_TRUE(QFile::copy(QStringLiteral(MODERATO_TEST_DATA_DIR "/workbooks/mixed.xlsx"), path));
    const QByteArray hash = fileHash(path);
    ImportDialog dlg(path);
    dlg.show();
    auto* sheets = child<QComboBox>(&dlg, "import-sheet");
    ASSERT_NE(sheets, nullptr);
    // The worksheets in order; the chart sheet "Chart1" holds no cells and is not offered (make_workbooks.py).
    ASSERT_EQ(sheets->count(), 3);
    EXPECT_EQ(sheets->itemText(0), QStringLiteral("Data"));
    EXPECT_EQ(sheets->itemText(1), QStringLiteral("Other rows"));
    EXPECT_EQ(sheets->itemText(2), QStringLiteral("Hidden (hidden)"));
    EXPECT_FALSE(child<QComboBox>(&dlg, "import-delimiter")->isVisible());  // no delimiter in a workbook
    ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
    EXPECT_EQ(dlg.previewModel()->columnCount(), 6);  // id, x, group, flag, when, stamp
    EXPECT_EQ(dlg.previewModel()->rowCount(), 40);
    EXPECT_TRUE(dlg.message().contains(QStringLiteral("sheet's rows"))) << dlg.message().toStdString();
    EXPECT_TRUE(dlg.message().contains(QStringLiteral("dates as days since 1970-01-01: when, stamp")))
        << dlg.message().toStdString();
    // "group" is text from its first data row on, sheet row 2 (the header is row 1).
    auto* kinds = child<QTableWidget>(&dlg, "import-column-types");
    ASSERT_NE(kinds->item(2, 0), nullptr);
    EXPECT_TRUE(kinds->item(2, 0)->toolTip().endsWith(QStringLiteral(" in row 2")))
        << kinds->item(2, 0)->toolTip().toStdString();

    chooseByKeys(sheets, 1);
    ASSERT_TRUE(test::waitUntil([&] { return dlg.previewTable() && dlg.previewTable()->rows() == 2; }))
        << dlg.message().toStdString();
    EXPECT_EQ(dlg.previewModel()->headerData(1, Qt::Horizontal).toString(), QStringLiteral("b"));
    loadAndWait(dlg);
    EXPECT_EQ(dlg.table()->at("b").levels, (std::vector<std::string>{"one", "two"}));  // make_workbooks.py
    EXPECT_EQ(dlg.source().kind, SourceKind::Workbook);
    EXPECT_EQ(dlg.source().sheet, "Other rows");
    EXPECT_EQ(fileHash(path), hash);  // only read

    ProjectDocument doc;
    const std::string id = doc.addDataset(path, dlg.options(), dlg.table(), {}, dlg.source());
    EXPECT_EQ(doc.project().dataset(id)->kind, SourceKind::Workbook);
    EXPECT_EQ(doc.project().dataset(id)->sheet, "Other rows");
}

TEST(ImportSources, DatabaseOffersTablesAndAQuery) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    // No telling extension: the file is known by SQLite's header.
    const QString path = dir.filePath(QStringLiteral("shop.data"));
    sqlite3* db = nullptr;
    ASSERT_EQ(sqlite3_open(path.toUtf8().constData(), &db), SQLITE_OK);
    ASSERT_EQ(sqlite3_exec(db,
                           "CREATE TABLE sales(region TEXT, amount REAL); INSERT INTO sales VALUES ('north', 2), "
                           "('south', 3), ('north', 5); CREATE TABLE staff(name TEXT);",
                           nullptr, nullptr, nullptr),
              SQLITE_OK);
    sqlite3_close(db);
    const QByteArray hash = fileHash(path);
    ImportDialog dlg(path);
    dlg.show();
    auto* tables = child<QComboBox>(&dlg, "import-table");
    ASSERT_NE(tables, nullptr);
    ASSERT_EQ(tables->count(), 2);
    EXPECT_EQ(tables->itemText(0), QStringLiteral("sales"));
    ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message().toStdString();
    EXPECT_EQ(dlg.previewTable()->rows(), 3u);  // the three INSERTed rows

    click(child<QRadioButton>(&dlg, "import-use-query"));
    auto* query = child<QPlainTextEdit>(&dlg, "import-query");
    ASSERT_TRUE(query->isEnabled());
    ASSERT_TRUE(test::waitUntil([&] { return dlg.messageIsError(); }));  // no query yet
    EXPECT_TRUE(dlg.message().contains(QStringLiteral("write a query"))) << dlg.message().toStdString();
    EXPECT_FALSE(child<QPushButton>(&dlg, "import-load")->isEnabled());
    query->setFocus();
    QTest::keyClicks(query, QStringLiteral("SELECT region, sum(amount) AS total FROM sales GROUP BY region"));
    ASSERT_TRUE(test::waitUntil([&] { return dlg.previewTable() && dlg.previewTable()->find("total"); }))
        << dlg.message().toStdString();
    loadAndWait(dlg);
    EXPECT_EQ(dlg.table()->at("total").numbers, (std::vector<double>{7, 3}));  // north 2 + 5, south 3
    EXPECT_EQ(dlg.source().kind, SourceKind::SQLite);
    EXPECT_EQ(dlg.source().query, "SELECT region, sum(amount) AS total FROM sales GROUP BY region");
    EXPECT_EQ(fileHash(path), hash);
}

TEST(ImportSources, AWriteQueryIsShownAsAnError) {
    QTemporaryDir dir;
    ASSERT_TRUE(dir.isValid());
    const QString path = dir.filePath(QStringLiteral("t.sqlite"));
    sqlite3* db = nullptr;
    ASSERT_EQ(sqlite3_open(path.toUtf8().constData(), &db), SQLITE_OK);
    ASSERT_EQ(sqlite3_exec(db, "CREATE TABLE t(v REAL); INSERT INTO t VALUES (1);", nullptr, nullptr, nullptr),
              SQLITE_OK);
    sqlite3_close(db);
    ImportDialog dlg(path);
    dlg.show();
    click(child<QRadioButton>(&dlg, "import-use-query"));
    auto* query = child<QPlainTextEdit>(&dlg, "import-query");
    query->setFocus();
    QTest::keyClicks(query, QStringLiteral("DELETE FROM t"));
    ASSERT_TRUE(test::waitUntil([&] { return dlg.messageIsError(); }));
    EXPECT_TRUE(dlg.message().contains(QStringLiteral("would change the database"))) << dlg.message().toStdString();
    EXPECT_FALSE(child<QPushButton>(&dlg, "import-load")->isEnabled());
}

}  // namespace
