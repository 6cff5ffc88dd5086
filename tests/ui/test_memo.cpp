// The Memo section of the workbench, driven as a user would (keys, clicks,
// offscreen): its saved memo, tables and figures are the very bytes
// `moderato-cli render` writes for the same project; notes typed in it go to
// the project as one undo step and are escaped in the saved HTML; edits to
// the memo text are saved self-contained and can be thrown away; it never
// writes over the project's data; and its findings state the crossover point
// the Probe section shows, which is the closed-form meeting point of the lines.
#include <gtest/gtest.h>
#include <unistd.h>

#include <QAction>
#include <QCheckBox>
#include <QDateTime>
#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QLabel>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QTemporaryDir>
#include <QTest>
#include <QTextEdit>
#include <QToolButton>
#include <QUndoStack>
#include <cmath>
#include <functional>
#include <nlohmann/json.hpp>

#include "cli/cli_runner.hpp"
#include "common/figure_caption.hpp"
#include "export/figure_exporter.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/reporting/table_export.hpp"
#include "outputs/analysis_outputs.hpp"
#include "plots/figure_source.hpp"
#include "plots/lines_plot.hpp"
#include "qstring_print.hpp"
#include "qt_file_bytes.hpp"
#include "sample_window.hpp"
#include "sections/memo_section.hpp"
#include "sections/probe_section.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "ui_test_util.hpp"
#include "widget_input.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::child;
using moderato::test::readAll;

namespace {

// A main window on a copy of a sample project, shown and active (window
// shortcuts need an active window), its analysis fitted.
struct Session : test::SampleWindow {
    QString project;

    // `edit` may change the copied project's JSON before it is opened.
    explicit Session(const QString& sample, const std::function<void(nlohmann::json&)>& edit = {}) {
        project = copy(sample);
        if (edit) {
            nlohmann::json j = nlohmann::json::parse(test::readAll(project).toStdString());
            edit(j);
            test::writeAll(project, QByteArray::fromStdString(j.dump(2)));
        }
        EXPECT_TRUE(open(project)) << w.runner()->error(id).toStdString();
        activate();
    }
    MemoSection* memo() const { return w.analysisPage()->memo(); }
    ProbeSection* probe() const { return w.analysisPage()->probe(); }
    QString dataPath() const { return w.document()->dataPath(analysis().dataset); }
    void keys(Qt::Key key, Qt::KeyboardModifiers mods = Qt::NoModifier) {
        QTest::keyClick(&w, key, mods);
        QCoreApplication::processEvents();
    }
    // Ctrl+5, the Memo section's shortcut; waits until the memo is in the editor.
    void showMemo() {
        keys(Qt::Key_5, Qt::ControlModifier);
        // A button's shortcut clicks it after its short press animation.
        ASSERT_TRUE(test::waitUntil([&] { return w.analysisPage()->currentSection() == AnalysisPage::Memo; }, 3000))
            << "Ctrl+5 did not show the Memo section";
        ASSERT_TRUE(test::waitUntil([&] { return memo()->isVisible() && memo()->output().has_value(); }));
        ASSERT_TRUE(
            test::waitUntil([&] { return memo()->editor()->toPlainText().contains(QStringLiteral("Findings")); }));
    }
};

// Everything a browser could fetch from elsewhere, or run.
void expectSelfContained(const QByteArray& html, int figures) {
    const QString text = QString::fromUtf8(html).toLower();
    for (const char* bad : {"http://", "https://", "<link", "<script", "@import", "url(", "<iframe", "<object"})
        EXPECT_FALSE(text.contains(QLatin1String(bad))) << "the HTML contains " << bad;
    static const QRegularExpression src(QStringLiteral(R"(src\s*=\s*["']([^"']*)["'])"));
    int images = 0;
    for (auto it = src.globalMatch(text); it.hasNext();) {
        const QString value = it.next().captured(1);
        EXPECT_TRUE(value.startsWith(QLatin1String("data:image/png;base64,"))) << value.left(60);
        ++images;
    }
    EXPECT_EQ(images, figures);
}

// ------------------------------------------------------------------ GUI = CLI

class MemoMatchesRender : public ::testing::TestWithParam<const char*> {};

TEST_P(MemoMatchesRender, SavedMemoTablesAndFiguresAreTheRenderedBytes) {
    Session s(QString::fromLatin1(GetParam()));
    s.showMemo();
    MemoSection* memo = s.memo();
    QTemporaryDir out;
    const QString gui = out.filePath(QStringLiteral("gui"));
    ASSERT_TRUE(QDir().mkpath(gui));
    QString error;
    ASSERT_TRUE(memo->saveHtml(gui + QStringLiteral("/memo.html"), &error)) << error;
    ASSERT_TRUE(memo->saveMarkdown(gui + QStringLiteral("/memo.md"), &error)) << error;
    ASSERT_TRUE(memo->savePdf(gui + QStringLiteral("/memo.pdf"), &error)) << error;
    QStringList tables;
    ASSERT_TRUE(memo->saveTables(gui, TableFormat::Csv, &tables, &error)) << error;

    // The figures as File ▸ Export Figure saves them: the analysis's figure
    // settings and its caption.
    const auto run = s.w.runner()->result(s.id);
    ASSERT_TRUE(run);
    const QString caption = figureCaption(s.analysis(), *run);
    const QList<FigureSource*> figures = s.probe()->reportFigures(*run);
    ASSERT_FALSE(figures.isEmpty());
    for (FigureSource* f : figures)
        for (const FigureFormat fmt : {FigureFormat::Png, FigureFormat::Svg, FigureFormat::Pdf}) {
            const QString path =
                gui + QStringLiteral("/fig-") + figureStem(f) + QLatin1Char('.') + figureFormatSuffix(fmt);
            ASSERT_TRUE(FigureExporter(f, s.analysis().figure, caption).save(path, fmt, &error)) << error;
        }

    // The real command line on the same project.
    const QString cli = out.filePath(QStringLiteral("cli"));
    const auto r = moderato::test::run_cli({"render", s.project.toStdString(), "--out", cli.toStdString()});
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    const QString folder = cli + QLatin1Char('/') + QString::fromStdString(file_slug(s.analysis().id));

    auto same = [&](const QString& guiFile, const QString& cliFile) {
        const QByteArray a = readAll(guiFile), b = readAll(cliFile);
        EXPECT_FALSE(a.isEmpty()) << guiFile;
        EXPECT_TRUE(a == b) << guiFile << " (" << a.size() << " bytes) differs from " << cliFile << " (" << b.size()
                            << " bytes)";
    };
    for (const char* file : {"memo.html", "memo.md", "memo.pdf"})
        same(gui + QLatin1Char('/') + QLatin1String(file), folder + QLatin1Char('/') + QLatin1String(file));
    // The PNGs the Markdown memo names, saved beside it.
    for (const auto& [file, png] : memo->output()->pngs())
        same(gui + QLatin1Char('/') + file, folder + QLatin1Char('/') + file);
    // Tables: "<analysis>-estimates.csv" from the workbench, "estimates.csv" from the render.
    ASSERT_FALSE(tables.isEmpty());
    bool estimates = false;
    const QString prefix = QString::fromStdString(file_slug(s.analysis().id)) + QLatin1Char('-');
    for (const QString& t : tables) {
        const QString name = QFileInfo(t).fileName();
        ASSERT_TRUE(name.startsWith(prefix)) << name;
        estimates |= name == prefix + QStringLiteral("estimates.csv");
        same(t, folder + QLatin1Char('/') + name.mid(prefix.size()));
    }
    EXPECT_TRUE(estimates);
    for (FigureSource* f : figures)
        for (const FigureFormat fmt : {FigureFormat::Png, FigureFormat::Svg, FigureFormat::Pdf})
            same(gui + QStringLiteral("/fig-") + figureStem(f) + QLatin1Char('.') + figureFormatSuffix(fmt),
                 folder + QLatin1Char('/') + figureStem(f) + QLatin1Char('.') + figureFormatSuffix(fmt));
}

INSTANTIATE_TEST_SUITE_P(Samples, MemoMatchesRender,
                         ::testing::Values("coffee-discount", "orchard-nitrogen", "volunteer-onboarding",
                                           "helpdesk-staffing", "trial-conversion", "turbine-repairs"),
                         [](const ::testing::TestParamInfo<const char*>& info) {
                             std::string n = info.param;
                             for (char& c : n)
                                 if (c == '-') c = '_';
                             return n;
                         });

// ------------------------------------------------------------------ notes

TEST(MemoNotes, TypedNotesGoToTheProjectAsOneUndoStepAndIntoTheMemo) {
    const QString earlier = QStringLiteral("Earlier note.");
    Session s(QStringLiteral("coffee-discount"),
              [&](nlohmann::json& j) { j["analyses"][0]["memo_notes"] = earlier.toStdString(); });
    s.showMemo();
    auto* notes = child<QPlainTextEdit>(s.memo(), "memo-notes");
    ASSERT_NE(notes, nullptr);
    EXPECT_EQ(notes->toPlainText(), earlier) << "the notes saved in the project";
    EXPECT_TRUE(s.memo()->editor()->toPlainText().contains(earlier));

    notes->setFocus();
    QTest::keyClick(notes, Qt::Key_End, Qt::ControlModifier);
    const QString added = QStringLiteral(" Asked by the shop owners; check again in May.");
    QTest::keyClicks(notes, added);
    const QString typed = earlier + added;
    EXPECT_EQ(QString::fromStdString(s.analysis().memo_notes), typed);
    // After the pause the memo shows them.
    EXPECT_TRUE(test::waitUntil([&] { return s.memo()->editor()->toPlainText().contains(typed); }))
        << s.memo()->editor()->toPlainText().left(400);
    EXPECT_TRUE(s.w.document()->isModified());

    // Undo from the window (the focus off the text boxes, which keep their own undo).
    auto* memoButton = child<QToolButton>(&s.w, "section-memo");
    ASSERT_NE(memoButton, nullptr);
    memoButton->setFocus();
    s.keys(Qt::Key_Z, Qt::ControlModifier);
    EXPECT_EQ(QString::fromStdString(s.analysis().memo_notes), earlier) << "one undo step for the burst of typing";
    EXPECT_EQ(notes->toPlainText(), earlier);
    EXPECT_TRUE(test::waitUntil([&] {
        const QString t = s.memo()->editor()->toPlainText();
        return t.contains(earlier) && !t.contains(QStringLiteral("shop owners"));
    }));
    // Redo brings them back.
    s.keys(Qt::Key_Z, Qt::ControlModifier | Qt::ShiftModifier);
    EXPECT_EQ(QString::fromStdString(s.analysis().memo_notes), typed);
    EXPECT_EQ(notes->toPlainText(), typed);
}

TEST(MemoNotes, NotesAreEscapedInTheSavedHtmlAndMarkdown) {
    Session s(QStringLiteral("coffee-discount"));
    s.showMemo();
    auto* notes = child<QPlainTextEdit>(s.memo(), "memo-notes");
    ASSERT_NE(notes, nullptr);
    notes->setFocus();
    QTest::keyClicks(notes, QStringLiteral("<i>x</i> & y"));
    EXPECT_EQ(s.analysis().memo_notes, "<i>x</i> & y");
    ASSERT_TRUE(test::waitUntil([&] {
        return s.memo()->editor()->toPlainText().contains(QStringLiteral("<i>x</i> & y"));
    })) << "the editor shows the notes as typed, tags as text";

    QTemporaryDir out;
    QString error;
    ASSERT_TRUE(s.memo()->saveHtml(out.filePath(QStringLiteral("m.html")), &error)) << error;
    const QByteArray html = readAll(out.filePath(QStringLiteral("m.html")));
    // HTML: & < > as character references (HTML Living Standard, "Serializing HTML fragments").
    EXPECT_TRUE(html.contains("&lt;i&gt;x&lt;/i&gt; &amp; y")) << html.left(2000).toStdString();
    EXPECT_FALSE(html.contains("<i>x</i>"));
    ASSERT_TRUE(s.memo()->saveMarkdown(out.filePath(QStringLiteral("m.md")), &error)) << error;
    const QByteArray md = readAll(out.filePath(QStringLiteral("m.md")));
    // Markdown: a '<' that would open a tag is backslash-escapes (CommonMark, "Backslash escapes").
    EXPECT_TRUE(md.contains("\\<i>x\\</i> & y")) << md.left(600).toStdString();
}

// ------------------------------------------------------------------ editing the memo text

TEST(MemoEditing, EditedTextIsSavedSelfContainedAndRestoreBringsBackTheGeneratedBytes) {
    Session s(QStringLiteral("coffee-discount"));
    s.showMemo();
    MemoSection* memo = s.memo();
    QTemporaryDir out;
    QString error;
    ASSERT_TRUE(memo->saveHtml(out.filePath(QStringLiteral("generated.html")), &error)) << error;
    const QByteArray generated = readAll(out.filePath(QStringLiteral("generated.html")));
    ASSERT_FALSE(generated.isEmpty());
    auto* state = child<QLabel>(memo, "memo-state");
    ASSERT_NE(state, nullptr);
    EXPECT_FALSE(memo->edited());
    EXPECT_FALSE(state->text().contains(QStringLiteral("Edited")));

    QTextEdit* editor = child<QTextEdit>(memo, "memo-editor");
    ASSERT_NE(editor, nullptr);
    QTest::mouseClick(editor->viewport(), Qt::LeftButton, Qt::NoModifier, QPoint(40, 40));
    QTest::keyClick(editor, Qt::Key_End, Qt::ControlModifier);
    const QString sentence = QStringLiteral("Checked with the shop managers on Friday.");
    QTest::keyClick(editor, Qt::Key_Return);
    QTest::keyClicks(editor, sentence);
    EXPECT_TRUE(memo->edited());
    EXPECT_TRUE(state->text().contains(QStringLiteral("Edited"))) << state->text();
    auto* restore = child<QPushButton>(memo, "memo-restore");
    ASSERT_NE(restore, nullptr);
    EXPECT_TRUE(restore->isEnabled());

    ASSERT_TRUE(memo->saveHtml(out.filePath(QStringLiteral("edited.html")), &error)) << error;
    const QByteArray edited = readAll(out.filePath(QStringLiteral("edited.html")));
    EXPECT_TRUE(edited.contains(sentence.toUtf8()));
    EXPECT_TRUE(edited.contains("Findings")) << "the rest of the memo is still there";
    expectSelfContained(edited, static_cast<int>(memo->output()->pngs().size()));
    // The embedded figures are the memo's own PNGs.
    for (const auto& [file, png] : memo->output()->pngs())
        EXPECT_TRUE(edited.contains("data:image/png;base64," + png.toBase64())) << file;
    // The generated memo is self-contained too (the same checks).
    expectSelfContained(generated, static_cast<int>(memo->output()->pngs().size()));

    // Restore the generated text: not edited, and the same bytes as before.
    QTest::mouseClick(restore, Qt::LeftButton);
    EXPECT_FALSE(memo->edited());
    EXPECT_FALSE(state->text().contains(QStringLiteral("Edited")));
    EXPECT_FALSE(editor->toPlainText().contains(sentence));
    ASSERT_TRUE(memo->saveHtml(out.filePath(QStringLiteral("restored.html")), &error)) << error;
    EXPECT_TRUE(readAll(out.filePath(QStringLiteral("restored.html"))) == generated);
}

// ------------------------------------------------------------------ data files are never written

TEST(MemoSaving, RefusesToWriteOverTheProjectsDataFile) {
    Session s(QStringLiteral("coffee-discount"));
    s.showMemo();
    const QString data = s.dataPath();
    ASSERT_TRUE(QFileInfo(data).isFile()) << data;
    const QByteArray before = readAll(data);
    const QDateTime mtime = QFileInfo(data).lastModified();
    const QString name = QFileInfo(data).fileName();

    QString error;
    EXPECT_FALSE(s.memo()->saveHtml(data, &error));
    EXPECT_TRUE(error.contains(name)) << error;
    error.clear();
    EXPECT_FALSE(s.memo()->savePdf(data, &error));
    EXPECT_TRUE(error.contains(name)) << error;
    error.clear();
    EXPECT_FALSE(s.memo()->saveMarkdown(data, &error));
    EXPECT_TRUE(error.contains(name)) << error;

    // The same file reached through a symbolic link to its folder.
    const QString alias = s.dir.filePath(QStringLiteral("alias"));
    ASSERT_EQ(::symlink(s.dir.path().toLocal8Bit().constData(), alias.toLocal8Bit().constData()), 0);
    error.clear();
    EXPECT_FALSE(s.memo()->saveHtml(alias + QLatin1Char('/') + name, &error));
    EXPECT_TRUE(error.contains(name)) << error;
    // And through a relative path with "..".
    error.clear();
    EXPECT_FALSE(s.memo()->saveHtml(s.dir.filePath(QStringLiteral("alias/../")) + name, &error));

    EXPECT_TRUE(readAll(data) == before) << "the data file changed";
    EXPECT_EQ(QFileInfo(data).lastModified(), mtime);
    // No temporary file was left beside it.
    const QStringList entries = QDir(s.dir.path()).entryList(QDir::Files | QDir::Hidden | QDir::NoDotAndDotDot);
    for (const QString& e : entries)
        EXPECT_TRUE(e == name || e.endsWith(QLatin1String(".moderato"))) << "stray file " << e;
}

// ------------------------------------------------------------------ the crossover sentence

// "1.234" / "−1.234" / "1.2e+03" as written by the memo and the Probe section.
double parseShown(QString s) {
    s.replace(QChar(0x2212), QLatin1Char('-'));
    bool ok = false;
    const double v = s.toDouble(&ok);
    EXPECT_TRUE(ok) << s;
    return v;
}

TEST(MemoFindings, CrossoverSentenceStatesTheProbeSectionsValueAndTheClosedForm) {
    Session s(QStringLiteral("coffee-discount"));
    const auto run = s.w.runner()->result(s.id);
    ASSERT_TRUE(run);
    const std::string focal = s.analysis().roles.focal, moderator = s.analysis().roles.moderator;
    // Closed form: with E[y] = b0 + b1·x + b2·m + b3·x·m (+ controls), the lines
    // for m = 0 and m = 1 differ by b2 + b3·x, zero at x = −b2/b3.
    double b2 = NAN, b3 = NAN;
    for (const auto& c : run->fit.coefficients) {
        const bool hasFocal = c.term.find(focal) != std::string::npos;
        const bool hasModerator = c.term.find(moderator) != std::string::npos;
        if (hasModerator && !hasFocal) b2 = c.estimate;
        if (hasModerator && hasFocal) b3 = c.estimate;
    }
    ASSERT_TRUE(std::isfinite(b2) && std::isfinite(b3) && b3 != 0);
    const double crossing = -b2 / b3;
    // Shown to 4 significant digits: within half a unit of the 4th digit.
    const double halfUlp = 0.5 * std::pow(10.0, std::floor(std::log10(std::fabs(crossing))) - 3) * 1.0001;

    // The Probe section's summary.
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    ASSERT_TRUE(test::waitUntil([&] { return s.probe()->summaryText().contains(QStringLiteral("cross at")); }))
        << s.probe()->summaryText();
    const QRegularExpression shown(QStringLiteral("cross at %1 = ([−\\-]?[0-9.]+(?:e[+−\\-]?[0-9]+)?)")
                                       .arg(QRegularExpression::escape(QString::fromStdString(focal))));
    const auto inProbe = shown.match(s.probe()->summaryText());
    ASSERT_TRUE(inProbe.hasMatch()) << s.probe()->summaryText();
    EXPECT_NEAR(parseShown(inProbe.captured(1)), crossing, halfUlp);

    // The memo in the editor.
    s.showMemo();
    const QString memoText = s.memo()->editor()->toPlainText();
    const auto inMemo = shown.match(memoText);
    ASSERT_TRUE(inMemo.hasMatch()) << memoText.left(1500);
    EXPECT_NEAR(parseShown(inMemo.captured(1)), crossing, halfUlp);
    EXPECT_EQ(inMemo.captured(1), inProbe.captured(1)) << "the memo and the Probe section state the same number";
    // The sentence is in the Findings list, before the Model heading.
    const int findings = memoText.indexOf(QStringLiteral("\nFindings\n")),
              model = memoText.indexOf(QStringLiteral("\nModel\n"));
    ASSERT_GE(findings, 0);
    EXPECT_LT(findings, inMemo.capturedStart());
    EXPECT_LT(inMemo.capturedStart(), model);
}

}  // namespace

// ------------------------------------------------------------------ settings the render reads

TEST(MemoMatchesRenderSettings, WhereGroupsDifferIsKeptInTheProjectAndTheRenderFollowsIt) {
    Session s(QStringLiteral("coffee-discount"));
    s.w.analysisPage()->showSection(AnalysisPage::Probe);
    QCheckBox* differ = child<QCheckBox>(s.probe(), "differ-toggle");
    ASSERT_TRUE(differ);
    ASSERT_TRUE(differ->isChecked());
    ASSERT_TRUE(s.analysis().probe.show_gaps);
    // Unticked by a click: one undoable edit of the analysis.
    QTest::mouseClick(differ, Qt::LeftButton, {}, QPoint(8, differ->height() / 2));
    EXPECT_FALSE(differ->isChecked());
    EXPECT_FALSE(s.analysis().probe.show_gaps);
    s.w.document()->undoStack()->undo();
    EXPECT_TRUE(s.analysis().probe.show_gaps);
    EXPECT_TRUE(differ->isChecked());
    s.w.document()->undoStack()->redo();
    EXPECT_FALSE(s.analysis().probe.show_gaps);
    EXPECT_FALSE(differ->isChecked());

    // Saved, then rendered headless: the Lines plot is the one the workbench exports (no "groups differ" strip).
    s.w.document()->saveAs(s.project);
    const auto run = s.w.runner()->result(s.id);
    ASSERT_TRUE(run);
    QTemporaryDir out;
    QString error;
    const QString gui = out.filePath(QStringLiteral("gui-lines.png"));
    ASSERT_TRUE(FigureExporter(s.probe()->linesPlot(), s.analysis().figure, figureCaption(s.analysis(), *run))
                    .save(gui, FigureFormat::Png, &error))
        << error.toStdString();
    const QString cli = out.filePath(QStringLiteral("cli"));
    const auto r = moderato::test::run_cli({"render", s.project.toStdString(), "--out", cli.toStdString()});
    ASSERT_TRUE(r.exited && r.exit_code == 0) << r.describe();
    const QByteArray rendered = readAll(cli + QLatin1Char('/') + QString::fromStdString(file_slug(s.analysis().id)) +
                                        QStringLiteral("/lines-plot.png"));
    EXPECT_FALSE(rendered.isEmpty());
    EXPECT_TRUE(readAll(gui) == rendered);
    // And the strip really is a difference: ticked again, the export changes.
    differ->click();
    ASSERT_TRUE(s.analysis().probe.show_gaps);
    const QByteArray withStrip =
        FigureExporter(s.probe()->linesPlot(), s.analysis().figure, figureCaption(s.analysis(), *run))
            .render(FigureFormat::Png);
    EXPECT_FALSE(withStrip == rendered);
}
