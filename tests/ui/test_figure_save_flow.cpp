// Saving several figures from Export Figure: the dialog stays open after a
// save, Save… starts beside the project with a name made of the analysis
// and the plot, and the dialog starts on the plot chosen last.
#include <gtest/gtest.h>

#include <QApplication>
#include <QComboBox>
#include <QFileDialog>
#include <QFileInfo>
#include <QLineEdit>
#include <QPushButton>
#include <QSignalSpy>
#include <QTest>
#include <QTimer>

#include "export/figure_export_dialog.hpp"
#include "plots/figure_source.hpp"
#include "sample_window.hpp"

using namespace moderato;
using namespace moderato::ui;

namespace {

struct FileDialogSeen {
    QString folder, name;
};

// Clicks Save… and, in the file dialog it opens, notes where it starts and
// the name it offers, then accepts that name with Enter.
FileDialogSeen saveWithTheOfferedName(FigureExportDialog& dialog) {
    FileDialogSeen seen;
    bool answered = false;
    QTimer answer;
    QObject::connect(&answer, &QTimer::timeout, [&] {
        auto* files = qobject_cast<QFileDialog*>(QApplication::activeModalWidget());
        auto* name = files ? files->findChild<QLineEdit*>(QStringLiteral("fileNameEdit")) : nullptr;
        if (!name) return;
        answer.stop();
        answered = true;
        seen.folder = files->directory().absolutePath();
        seen.name = name->text();
        QTimer::singleShot(0, name, [name] { QTest::keyClick(name, Qt::Key_Return); });
    });
    answer.start(20);
    QTimer::singleShot(5000, &answer, [&] { answer.stop(); });  // no file dialog: fail below, do not hang
    QSignalSpy saved(&dialog, &FigureExportDialog::figureSaved);
    auto* save = dialog.findChild<QPushButton*>(QStringLiteral("figure-save"));
    QTimer::singleShot(0, save, [save] { QTest::mouseClick(save, Qt::LeftButton); });
    EXPECT_TRUE(test::waitUntil([&] { return answered && !saved.isEmpty(); }, 8000)) << "nothing was saved";
    return seen;
}

}  // namespace

TEST(FigureSaveFlow, SaveStartsBesideTheProjectWithANameAndTheDialogStaysOpen) {
    test::SampleWindow win;
    const QString project = win.copy(QStringLiteral("orchard-nitrogen"));  // analysis "nitrogen × soil moisture"
    ASSERT_TRUE(win.open(project));
    win.showSection(AnalysisPage::Probe);
    const QList<FigureSource*> figures = win.w.analysisPage()->currentFigures();
    const QString folder = QFileInfo(project).absolutePath();
    int effect = -1;
    for (int i = 0; i < figures.size(); ++i)
        if (figures[i]->figureKind() == FigurePlot::Effect) effect = i;
    ASSERT_GT(effect, 0) << "the Effect plot is not the first figure";
    {
        FigureExportDialog dialog(figures, win.w.document(), win.id, QString());
        dialog.show();
        auto* choice = dialog.findChild<QComboBox*>(QStringLiteral("figure-choice"));
        auto* format = dialog.findChild<QComboBox*>(QStringLiteral("figure-format"));
        ASSERT_TRUE(choice && format);
        EXPECT_EQ(choice->currentIndex(), 0);
        choice->setCurrentIndex(effect);

        const FileDialogSeen first = saveWithTheOfferedName(dialog);
        EXPECT_EQ(first.folder, folder);
        EXPECT_EQ(first.name, QStringLiteral("nitrogen-soil-moisture-effect.png"));
        EXPECT_TRUE(QFile::exists(QDir(folder).filePath(first.name)));
        EXPECT_TRUE(dialog.isVisible()) << "the dialog closed after the save";

        // A second file from the same dialog, as SVG.
        format->setCurrentIndex(format->findData(int(FigureFormat::Svg)));
        const FileDialogSeen second = saveWithTheOfferedName(dialog);
        EXPECT_EQ(second.folder, folder);
        EXPECT_EQ(second.name, QStringLiteral("nitrogen-soil-moisture-effect.svg"));
        EXPECT_TRUE(QFile::exists(QDir(folder).filePath(second.name)));
        EXPECT_TRUE(dialog.isVisible());
        dialog.close();
    }
    // The next Export Figure starts on the Effect plot again.
    FigureExportDialog again(figures, win.w.document(), win.id, QString());
    ASSERT_TRUE(again.currentSource());
    EXPECT_EQ(again.currentSource()->figureKind(), FigurePlot::Effect);
}
