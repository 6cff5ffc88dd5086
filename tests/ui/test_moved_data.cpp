// A project whose data file moved: the workbench asks where it is now,
// accepts the chosen file (a different SHA-256 with the loader's warning),
// and records the new place as one undoable edit; cancelling opens nothing.
#include <gtest/gtest.h>

#include <QDir>
#include <QFile>
#include <QTemporaryDir>
#include <QUndoStack>

#include "common/file_bytes.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project.hpp"
#include "moderato/project/project_loader.hpp"
#include "moderato/support/sha256.hpp"
#include "qstring_print.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

class MovedData : public ::testing::Test {
protected:
    void SetUp() override {
        project = test::copySample(QStringLiteral("coffee-discount"), dir);
        oldData = QFileInfo(dir.filePath("spend.csv")).absoluteFilePath();
        ASSERT_TRUE(QDir(dir.path()).mkdir("moved"));
        newData = QFileInfo(dir.filePath("moved/spend.csv")).absoluteFilePath();
        ASSERT_TRUE(QFile::rename(oldData, newData));
        w.setInteractive(false);
        w.setDataLocator([this](const QString& dataset, const QString& recorded, const QString& file) {
            asked << QStringList{dataset, recorded, file};
            return answer;
        });
    }
    // The data path the project file on disk records for dataset spend.
    std::string savedPath() const { return read_project_file(project.toStdString()).dataset("spend")->path; }

    QTemporaryDir dir;
    QString project, oldData, newData, answer;
    QList<QStringList> asked;
    MainWindow w;
};

}  // namespace

TEST_F(MovedData, MatchingFileIsAcceptedAsOneUndoableEdit) {
    answer = newData;
    ASSERT_TRUE(test::openProject(w, project)) << w.lastMessage();
    ASSERT_EQ(asked.size(), 1);
    // What the project records and where that points (sample file: "path": "spend.csv").
    EXPECT_EQ(asked[0], (QStringList{"spend", "spend.csv", oldData}));
    ProjectDocument* doc = w.document();
    EXPECT_EQ(doc->dataPath("spend"), newData);
    EXPECT_TRUE(doc->isModified());  // the new place is an edit, to be saved
    EXPECT_EQ(doc->undoStack()->count(), 1);
    EXPECT_EQ(doc->undoStack()->undoText(), "Locate data file");
    EXPECT_TRUE(w.lastMessage().isEmpty() || !w.lastMessage().contains("changed")) << w.lastMessage();

    doc->undoStack()->undo();
    EXPECT_EQ(doc->dataPath("spend"), oldData);
    EXPECT_FALSE(doc->isModified());
    doc->undoStack()->redo();
    EXPECT_EQ(doc->dataPath("spend"), newData);

    ASSERT_TRUE(w.save());
    // Relative to the project, as saving writes every data path ('/' separators).
    EXPECT_EQ(savedPath(), "moved/spend.csv");
    EXPECT_EQ(read_project_file(project.toStdString()).dataset("spend")->sha256, sha256_file(newData.toStdString()));
    // Reopens without asking.
    asked.clear();
    ASSERT_TRUE(test::openProject(w, project)) << w.lastMessage();
    EXPECT_TRUE(asked.isEmpty());
}

TEST_F(MovedData, UndoingTheMoveThenSavingKeepsTheOldPath) {
    answer = newData;
    ASSERT_TRUE(test::openProject(w, project)) << w.lastMessage();
    Analysis a = w.document()->project().analyses.front();
    a.name = "renamed after locating";
    w.document()->setAnalysis(a, "Rename");  // a settings edit must not undo the move
    w.document()->undoStack()->undo();
    EXPECT_EQ(w.document()->dataPath("spend"), newData);
    w.document()->undoStack()->undo();
    EXPECT_EQ(w.document()->dataPath("spend"), oldData);
    w.document()->undoStack()->redo();
    w.document()->undoStack()->redo();
    ASSERT_TRUE(w.save());
    EXPECT_EQ(savedPath(), "moved/spend.csv");
    w.document()->undoStack()->undo();  // the rename
    w.document()->undoStack()->undo();  // the move
    ASSERT_TRUE(w.save());
    EXPECT_EQ(savedPath(), "spend.csv");
}

TEST_F(MovedData, DifferentFileIsAcceptedWithTheChangedDataWarning) {
    std::string bytes = test::read_file(newData.toStdString());
    const auto first = bytes.find('\n') + 1, second = bytes.find('\n', first) + 1;
    bytes += bytes.substr(first, second - first);  // the first data row twice: other bytes
    test::write_file(newData.toStdString(), bytes);
    const std::string recorded = read_project_file(project.toStdString()).dataset("spend")->sha256;
    answer = newData;
    ASSERT_TRUE(test::openProject(w, project)) << w.lastMessage();
    // The wording the loader and the renderer share (core project_loader changed_data_text).
    const QString expected =
        QString::fromStdString(changed_data_text(newData.toStdString(), "spend", sha256_hex(bytes), recorded));
    EXPECT_TRUE(w.lastMessage().contains(expected)) << w.lastMessage() << "\n" << expected;
    EXPECT_EQ(w.document()->dataPath("spend"), newData);
    EXPECT_EQ(w.document()->undoStack()->count(), 1);
}

TEST_F(MovedData, CancelOpensNothingAndSaysWhatIsMissing) {
    const QString good = test::copySample(QStringLiteral("orchard-nitrogen"), dir);
    ASSERT_TRUE(test::openProject(w, good)) << w.lastMessage();
    const Project before = w.document()->project();
    answer.clear();
    EXPECT_EQ(test::finishLoad(w, [&] { w.openProject(project); }), MainWindow::Failed);
    EXPECT_EQ(asked.size(), 1);
    EXPECT_TRUE(w.lastMessage().contains("'spend'")) << w.lastMessage();
    EXPECT_TRUE(w.lastMessage().contains(oldData)) << w.lastMessage();
    EXPECT_TRUE(w.lastMessage().contains("\"spend.csv\"")) << w.lastMessage();
    EXPECT_TRUE(w.document()->project() == before);  // the open project stays
    EXPECT_EQ(w.document()->filePath(), QFileInfo(good).absoluteFilePath());
}
