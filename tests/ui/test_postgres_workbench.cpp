// PostgreSQL in the workbench, against a throwaway cluster on a Unix socket
// (tests/common/pg_cluster.hpp): the connection dialog typed into as a user
// would, a server that asks for a password, the import dialog on the
// server's table, and a project that records the address and the
// fingerprint but never the password, and asks for it again when opened.
// Expected values are the rows the test inserts.
#include <gtest/gtest.h>

#include <QCheckBox>
#include <QLineEdit>
#include <QPushButton>
#include <QSettings>
#include <QTemporaryDir>
#include <QTest>
#include <algorithm>
#include <limits>

#include "common/file_bytes.hpp"
#include "common/pg_cluster.hpp"
#include "data/import_dialog.hpp"
#include "data/postgres_dialog.hpp"
#include "data/table_model.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project.hpp"
#include "moderato/reading/postgres_source.hpp"
#include "qstring_print.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::shared_cluster;

namespace {

constexpr const char* kSecret = "violet-harbour-moth";

class PostgresWorkbench : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        test::require_password("clerk", kSecret);
        db_ = test::fresh_database("workbench");
        shared_cluster().exec(
            "CREATE TABLE trips (km double precision, stops integer, zone text); GRANT SELECT ON trips TO clerk;"
            "INSERT INTO trips VALUES (1.5, 2, 'north'), (3.25, 4, 'south'), (8, 1, 'north');",
            db_);
    }
    static std::string location() { return shared_cluster().uri(db_, "clerk"); }
    static std::string db_;
};
std::string PostgresWorkbench::db_;

void type(QLineEdit* field, const std::string& text) {
    ASSERT_NE(field, nullptr);
    field->clear();
    QTest::keyClicks(field, QString::fromStdString(text));
}

TEST_F(PostgresWorkbench, ConnectsAsksForThePasswordAndListsTables) {
    PostgresDialog dlg;
    dlg.show();
    type(dlg.hostField(), shared_cluster().socket_dir());
    type(dlg.databaseField(), db_);
    type(dlg.userField(), "clerk");
    dlg.passwordField()->clear();
    QTest::mouseClick(dlg.connectButton(), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return dlg.connectButton()->isEnabled(); }, 30000));
    EXPECT_TRUE(dlg.message().contains(QStringLiteral("asks for a password"))) << dlg.message();
    EXPECT_EQ(dlg.result(), QDialog::Rejected);  // still open
    type(dlg.passwordField(), kSecret);
    EXPECT_EQ(dlg.passwordField()->echoMode(), QLineEdit::Password);
    QTest::mouseClick(dlg.connectButton(), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return dlg.result() == QDialog::Accepted; }, 30000)) << dlg.message();
    EXPECT_EQ(dlg.tables(), (std::vector<std::string>{"trips"}));
    EXPECT_EQ(dlg.location(), location());  // the fields as one address (the socket folder's name is plain)
    // The address parts are remembered, the password nowhere in the settings.
    QSettings settings;
    EXPECT_EQ(settings.value(QStringLiteral("postgres/database")).toString().toStdString(), db_);
    for (const QString& key : settings.allKeys())
        EXPECT_FALSE(settings.value(key).toString().contains(QLatin1String(kSecret))) << key;
}

TEST_F(PostgresWorkbench, ImportsTheTableAndReopensWithAPasswordAskedFor) {
    ImportDialog dlg(location(), kSecret, {"trips"});
    dlg.show();
    ASSERT_NE(dlg.previewTable(), nullptr) << dlg.message();
    EXPECT_EQ(dlg.previewModel()->rowCount(), 3);
    EXPECT_EQ(dlg.previewModel()->columnCount(), 3);
    QTest::mouseClick(test::child<QPushButton>(&dlg, "import-load"), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return !dlg.isLoading() && dlg.table(); }, 30000)) << dlg.message();
    EXPECT_EQ(dlg.fingerprint().rfind("pg-md5-sum:3:", 0), 0u) << dlg.fingerprint();  // three rows

    QTemporaryDir dir;
    const QString path = dir.filePath(QStringLiteral("trips.moderato"));
    {
        ProjectDocument doc;
        const std::string id = doc.addDataset(QString::fromStdString(location()), dlg.options(), dlg.table(),
                                              dlg.fingerprint(), dlg.source());
        EXPECT_EQ(id, "trips");
        doc.saveAs(path);
    }
    const std::string saved = test::read_file(path.toStdString());
    EXPECT_EQ(saved.find(kSecret), std::string::npos);
    const Project saved_project = read_project_file(path.toStdString());
    const DataSource* d = saved_project.dataset("trips");
    ASSERT_NE(d, nullptr);
    EXPECT_EQ(d->path, location());
    EXPECT_EQ(d->sha256, dlg.fingerprint());

    MainWindow w;
    w.setInteractive(false);
    QStringList asked;
    std::optional<QString> answer;  // first: cancel
    w.setPasswordAsker([&](const QString& where) {
        asked << where;
        return answer;
    });
    EXPECT_FALSE(test::openProject(w, path));
    EXPECT_EQ(asked, QStringList{QString::fromStdString(location())});
    EXPECT_TRUE(w.lastMessage().contains(QStringLiteral("asks for a password"))) << w.lastMessage();
    answer = QString::fromLatin1(kSecret);
    ASSERT_TRUE(test::openProject(w, path)) << w.lastMessage();
    EXPECT_EQ(w.document()->table("trips")->rows(), 3u);
    // Kept for the session: opening again asks nothing.
    asked.clear();
    ASSERT_TRUE(test::openProject(w, path)) << w.lastMessage();
    EXPECT_TRUE(asked.isEmpty());
}

TEST_F(PostgresWorkbench, FitsInTheDatabaseOverEveryRowAndPlotsASample) {
    // 250,000 rows made in the server (more than the 200,000 a sample holds).
    shared_cluster().exec(
        "CREATE TABLE big AS SELECT g AS id, (g * 7919 % 1000) / 100.0 AS x, (g * 104729 % 997) / 100.0 AS m, "
        "1 + 0.5 * ((g * 7919 % 1000) / 100.0) - 0.3 * ((g * 104729 % 997) / 100.0) "
        "+ 0.2 * ((g * 7919 % 1000) / 100.0) * ((g * 104729 % 997) / 100.0) + (g * 31337 % 1001) / 1000.0 AS y "
        "FROM generate_series(1::bigint, 250000) g",
        db_);
    const std::string superuser = shared_cluster().uri(db_);
    ImportDialog dlg(superuser, {}, {"big", "trips"});
    dlg.show();
    ASSERT_NE(dlg.inDatabaseChoice(), nullptr);
    QTest::mouseClick(dlg.inDatabaseChoice(), Qt::LeftButton, {}, QPoint(6, dlg.inDatabaseChoice()->height() / 2));
    ASSERT_TRUE(dlg.inDatabase());
    EXPECT_TRUE(test::waitUntil([&] {
        return dlg.message().contains(QStringLiteral("random sample of at most 200,000"));
    })) << dlg.message();
    QTest::mouseClick(test::child<QPushButton>(&dlg, "import-load"), Qt::LeftButton);
    ASSERT_TRUE(test::waitUntil([&] { return !dlg.isLoading() && dlg.table(); }, 60000)) << dlg.message();
    EXPECT_EQ(dlg.table()->rows(), kPlotSampleRows);

    ProjectDocument doc;
    AnalysisRunner runner(&doc);
    runner.setBackgroundThreshold(std::numeric_limits<double>::infinity());
    const std::string id = doc.addDataset(QString::fromStdString(superuser), dlg.options(), dlg.table(),
                                          dlg.fingerprint(), dlg.source(), dlg.inDatabase());
    ASSERT_TRUE(doc.project().dataset(id)->in_database);
    Analysis a = doc.project().analyses.back();
    a.roles.outcome = "y";
    a.roles.focal = "x";
    a.roles.moderator = "m";
    doc.setAnalysis(a, QStringLiteral("roles"));
    const QString aid = QString::fromStdString(a.id);
    runner.refresh(aid);
    ASSERT_TRUE(test::waitUntil([&] { return runner.result(aid) != nullptr; }, 60000)) << runner.error(aid);
    const auto run = runner.result(aid);
    EXPECT_EQ(run->fit.n, 250000u);  // every row in the server
    ASSERT_TRUE(run->sample_fit);
    EXPECT_EQ(run->sample_fit->n, kPlotSampleRows);
    EXPECT_TRUE(std::any_of(run->cautions.begin(), run->cautions.end(), [](const std::string& c) {
        return c.find("random sample of 200,000") != std::string::npos;
    }));
}

}  // namespace
