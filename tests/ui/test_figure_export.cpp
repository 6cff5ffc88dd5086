// Figure export: PNG at a DPI with the exact pixel size and the DPI in the
// file, SVG and PDF as vectors at the preset size, greyscale, font and
// caption applied only to the export, atomic writes, and the settings stored
// in the analysis as one undoable edit.
#include <gtest/gtest.h>
#include <linux/capability.h>
#include <sys/resource.h>
#include <sys/syscall.h>
#include <unistd.h>

#include <qcustomplot.h>

#include <QAction>
#include <QCheckBox>
#include <QClipboard>
#include <QComboBox>
#include <QDir>
#include <QDoubleSpinBox>
#include <QFile>
#include <QFontComboBox>
#include <QImage>
#include <QImageReader>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QSpinBox>
#include <QSvgRenderer>
#include <QTemporaryDir>
#include <QTest>
#include <QUndoStack>
#include <QVBoxLayout>
#include <QXmlStreamReader>
#include <cmath>
#include <csignal>

#include "export/figure_export_dialog.hpp"
#include "export/figure_exporter.hpp"
#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "moderato/project/project_loader.hpp"
#include "plots/figure_source.hpp"
#include "plots/plot_style.hpp"
#include "probe_window.hpp"
#include "qstring_print.hpp"
#include "qt_file_bytes.hpp"
#include "sample_window.hpp"
#include "shell/analysis_page.hpp"
#include "shell/main_window.hpp"
#include "style/estuary.hpp"
#include "ui_test_util.hpp"

using namespace moderato;
using namespace moderato::ui;
using moderato::test::readAll;

namespace {

// A small figure of our own: two lines, axis titles and a legend, so these
// tests do not depend on the sections being finished.
class TestFigure : public QWidget, public FigureSource {
public:
    explicit TestFigure(QString name = QStringLiteral("Test plot"), FigurePlot kind = FigurePlot::Lines)
        : name_(std::move(name)), kind_(kind) {
        plot_ = new QCustomPlot(this);
        auto* layout = new QVBoxLayout(this);
        layout->setContentsMargins(0, 0, 0, 0);
        layout->addWidget(plot_);
        stylePlot(plot_, QFont(QStringLiteral("DejaVu Sans"), 9));
        for (int k = 0; k < 2; ++k) {
            QCPGraph* g = plot_->addGraph();
            g->setName(k == 0 ? QStringLiteral("group A") : QStringLiteral("group B"));
            QVector<double> x, y;
            for (int i = 0; i <= 20; ++i) {
                x << i;
                y << (k == 0 ? 1.0 + 0.5 * i : 9.0 - 0.2 * i);
            }
            g->setData(x, y);
        }
        setGreyscale(false);
        plot_->xAxis->setLabel(QStringLiteral("dose (mg)"));
        plot_->yAxis->setLabel(QStringLiteral("response score"));
        plot_->legend->setVisible(true);
        plot_->rescaleAxes();
        resize(640, 420);
        show();
        plot_->replot();
        QCoreApplication::processEvents();
    }
    QString figureName() const override { return name_; }
    FigurePlot figureKind() const override { return kind_; }
    QCustomPlot* figurePlot() override { return plot_; }
    void setGreyscale(bool on) override {
        for (int k = 0; k < plot_->graphCount(); ++k) plot_->graph(k)->setPen(estuary::seriesPen(k, 2.0, on));
        plot_->replot();
    }

private:
    QString name_;
    FigurePlot kind_;
    QCustomPlot* plot_;
};

FigureSettings memo() {
    FigureSettings s;  // defaults: memo preset 6.5 x 4 in, 300 DPI
    s.preset = SizePreset::Memo;
    s.width_in = 6.5;
    s.height_in = 4.0;
    s.dpi = 300;
    s.caption = false;
    return s;
}

struct SvgSummary {
    bool wellFormed = false;
    QString width, height;
    int paths = 0, images = 0;
    QStringList texts;
    QStringList fontFamilies;
    QStringList colours;  // fill and stroke colours "#rrggbb"
};

SvgSummary readSvg(const QByteArray& data) {
    SvgSummary out;
    QXmlStreamReader xml(data);
    static const QRegularExpression hex(QStringLiteral("^#[0-9a-fA-F]{6}$"));
    while (!xml.atEnd()) {
        if (xml.readNext() != QXmlStreamReader::StartElement) continue;
        const QString name = xml.name().toString();
        const auto attrs = xml.attributes();
        if (name == QLatin1String("svg") && out.width.isEmpty()) {
            out.width = attrs.value(QStringLiteral("width")).toString();
            out.height = attrs.value(QStringLiteral("height")).toString();
        }
        for (const char* a : {"fill", "stroke"}) {
            const QString v = attrs.value(QLatin1String(a)).toString();
            if (hex.match(v).hasMatch()) out.colours << v;
        }
        if (name == QLatin1String("path") || name == QLatin1String("polyline") || name == QLatin1String("line"))
            ++out.paths;
        if (name == QLatin1String("image")) ++out.images;
        if (name == QLatin1String("text")) {
            const QString family = attrs.value(QStringLiteral("font-family")).toString();
            out.fontFamilies << family;
            out.texts << xml.readElementText(QXmlStreamReader::IncludeChildElements);
        }
    }
    out.wellFormed = !xml.hasError();
    return out;
}

// "165.1mm" -> 165.1
double mm(const QString& v) {
    EXPECT_TRUE(v.endsWith(QLatin1String("mm"))) << v.toStdString();
    return v.chopped(2).toDouble();
}

// Width and height of the first page's MediaBox (PDF reference: "/MediaBox [llx lly urx ury]").
std::pair<double, double> mediaBox(const QByteArray& pdf) {
    static const QRegularExpression box(
        QStringLiteral(R"(/MediaBox\s*\[\s*([-\d.]+)\s+([-\d.]+)\s+([-\d.]+)\s+([-\d.]+)\s*\])"));
    const auto m = box.match(QString::fromLatin1(pdf));
    if (!m.hasMatch()) return {-1, -1};
    return {m.captured(3).toDouble() - m.captured(1).toDouble(), m.captured(4).toDouble() - m.captured(2).toDouble()};
}

// What the live plot looks like, to compare before and after an export.
struct PlotState {
    QSize size;
    QRect axisRect;
    QFont tickFont, labelFont, legendFont, legendItemFont;
    int layoutCount = 0, allElements = 0, layerables = 0;
    QColor graphColour, axisColour, labelColour;
    Qt::PenStyle graphStyle = Qt::NoPen;
    bool operator==(const PlotState&) const = default;
};

void PrintTo(const PlotState& s, std::ostream* os) {
    auto rect = [](const QRect& r) {
        return QStringLiteral("%1,%2 %3x%4").arg(r.x()).arg(r.y()).arg(r.width()).arg(r.height());
    };
    *os << "size " << s.size.width() << "x" << s.size.height() << ", axis rect " << rect(s.axisRect).toStdString()
        << ", fonts " << s.tickFont.toString().toStdString() << " | " << s.labelFont.toString().toStdString() << " | "
        << s.legendFont.toString().toStdString() << " | " << s.legendItemFont.toString().toStdString() << ", layout "
        << s.layoutCount << "/" << s.allElements << "/" << s.layerables << ", colours "
        << s.graphColour.name().toStdString() << " " << s.axisColour.name().toStdString() << " "
        << s.labelColour.name().toStdString() << ", style " << int(s.graphStyle);
}

PlotState stateOf(QCustomPlot* plot) {
    PlotState s;
    s.size = plot->size();
    s.axisRect = plot->axisRect()->rect();
    s.tickFont = plot->xAxis->tickLabelFont();
    s.labelFont = plot->yAxis->labelFont();
    s.legendFont = plot->legend->font();
    if (plot->legend->itemCount() > 0) s.legendItemFont = plot->legend->item(0)->font();
    s.layoutCount = plot->plotLayout()->elementCount();
    s.allElements = int(plot->plotLayout()->elements(true).size());
    s.layerables = int(plot->findChildren<QCPLayerable*>().size());
    if (plot->graphCount() > 0) {
        s.graphColour = plot->graph(0)->pen().color();
        s.graphStyle = plot->graph(0)->pen().style();
    }
    s.axisColour = plot->xAxis->basePen().color();
    s.labelColour = plot->xAxis->labelColor();
    return s;
}

// Root ignores folder permissions; for the read-only-folder test, drop the
// capabilities that let it (this thread only) and restore them afterwards.
class WithoutDacOverride {
public:
    WithoutDacOverride() {
        if (geteuid() != 0) return;
        if (syscall(SYS_capget, &header_, saved_) != 0) return;
        __user_cap_data_struct reduced[2] = {saved_[0], saved_[1]};
        reduced[0].effective &= ~((1u << CAP_DAC_OVERRIDE) | (1u << CAP_DAC_READ_SEARCH));
        __user_cap_header_struct h = header_;
        dropped_ = syscall(SYS_capset, &h, reduced) == 0;
    }
    ~WithoutDacOverride() {
        if (!dropped_) return;
        __user_cap_header_struct h = header_;
        syscall(SYS_capset, &h, saved_);
    }

private:
    __user_cap_header_struct header_{_LINUX_CAPABILITY_VERSION_3, 0};
    __user_cap_data_struct saved_[2]{};
    bool dropped_ = false;
};

bool folderWritable(const QString& dir) {
    QFile probe(QDir(dir).filePath(QStringLiteral(".probe")));
    if (!probe.open(QIODevice::WriteOnly)) return false;
    probe.close();
    probe.remove();
    return true;
}

}  // namespace

TEST(FigureExport, PresetsAreTheSizesOfTheLookGuide) {
    // LOOK.md, "Figures for memos".
    const struct {
        SizePreset key;
        double w, h;
    } expected[] = {{SizePreset::Memo, 6.5, 4.0},
                    {SizePreset::SingleColumn, 3.5, 2.6},
                    {SizePreset::TwoColumn, 7.0, 4.3},
                    {SizePreset::Slide, 10.0, 5.63}};
    ASSERT_EQ(figurePresets().size(), 4);
    for (const auto& e : expected) {
        const FigurePreset* p = findFigurePreset(e.key);
        ASSERT_NE(p, nullptr) << to_string(e.key);
        EXPECT_DOUBLE_EQ(p->widthIn, e.w);
        EXPECT_DOUBLE_EQ(p->heightIn, e.h);
    }
    EXPECT_EQ(findFigurePreset(SizePreset::Custom), nullptr);
}

TEST(FigureExport, PngHasThePresetPixelSizeAndCarriesItsDpi) {
    TestFigure fig;
    QTemporaryDir dir;
    const QString path = dir.filePath(QStringLiteral("memo.png"));
    QString error;
    ASSERT_TRUE(FigureExporter(&fig, memo()).save(path, FigureFormat::Png, &error)) << error.toStdString();
    QImageReader reader(path);
    EXPECT_EQ(reader.format(), QByteArray("png"));
    const QImage image = reader.read();
    ASSERT_FALSE(image.isNull());
    // closed form: 6.5 in x 300 DPI = 1950 px, 4 in x 300 DPI = 1200 px
    EXPECT_EQ(image.width(), 1950);
    EXPECT_EQ(image.height(), 1200);
    // closed form: 300 dots per inch / 0.0254 m per inch = 11811.02 dots per metre (PNG pHYs is whole dots per metre)
    EXPECT_NEAR(image.dotsPerMeterX(), 11811, 1);
    EXPECT_NEAR(image.dotsPerMeterY(), 11811, 1);
    // The first series is drawn in its Estuary colour (LOOK.md: #1F6F8B).
    const QColor series1 = estuary::series(0);
    int seriesPixels = 0;
    for (int y = 0; y < image.height(); y += 2)
        for (int x = 0; x < image.width(); x += 2) {
            const QColor c = image.pixelColor(x, y);
            if (std::abs(c.red() - series1.red()) <= 8 && std::abs(c.green() - series1.green()) <= 8 &&
                std::abs(c.blue() - series1.blue()) <= 8)
                ++seriesPixels;
        }
    EXPECT_GT(seriesPixels, 200);

    // Another preset and DPI. closed form: 3.5 x 150 = 525, 2.6 x 150 = 390; 150 / 0.0254 = 5905.5
    FigureSettings single = memo();
    single.preset = SizePreset::SingleColumn;
    single.width_in = 3.5;
    single.height_in = 2.6;
    single.dpi = 150;
    const QString path2 = dir.filePath(QStringLiteral("single.png"));
    ASSERT_TRUE(FigureExporter(&fig, single).save(path2, FigureFormat::Png, &error)) << error.toStdString();
    const QImage small(path2);
    EXPECT_EQ(small.size(), QSize(525, 390));
    EXPECT_NEAR(small.dotsPerMeterX(), 5905.5, 1);
}

TEST(FigureExport, GreyscaleLeavesNoColourInPngOrSvg) {
    TestFigure fig;
    QTemporaryDir dir;
    FigureSettings s = memo();
    s.greyscale = true;
    s.caption = true;
    const QString png = dir.filePath(QStringLiteral("grey.png"));
    QString error;
    ASSERT_TRUE(FigureExporter(&fig, s, QStringLiteral("Linear model · caption")).save(png, FigureFormat::Png, &error))
        << error.toStdString();
    const QImage image = QImage(png).convertToFormat(QImage::Format_RGB32);
    ASSERT_EQ(image.size(), QSize(1950, 1200));
    int coloured = 0, dark = 0;
    for (int y = 0; y < image.height(); ++y)
        for (int x = 0; x < image.width(); ++x) {
            const QRgb p = image.pixel(x, y);
            const int r = qRed(p), g = qGreen(p), b = qBlue(p);
            if (std::max({std::abs(r - g), std::abs(g - b), std::abs(r - b)}) > 2) ++coloured;
            if (r < 128) ++dark;
        }
    EXPECT_EQ(coloured, 0);
    EXPECT_GT(dark, 1000);  // something was drawn

    // SVG: every fill and stroke colour is a grey (r = g = b), the axes and text too.
    const SvgSummary svg = readSvg(FigureExporter(&fig, s).renderSvg());
    ASSERT_TRUE(svg.wellFormed);
    ASSERT_FALSE(svg.colours.isEmpty());
    for (const QString& c : svg.colours) {
        const QColor q(c);
        EXPECT_TRUE(q.red() == q.green() && q.green() == q.blue()) << c.toStdString();
    }
    // Colour export of the same figure does have colours (so the check above can fail).
    const SvgSummary colourSvg = readSvg(FigureExporter(&fig, memo()).renderSvg());
    EXPECT_TRUE(colourSvg.colours.contains(estuary::series(0).name(), Qt::CaseInsensitive));
}

TEST(FigureExport, SvgIsVectorAtThePresetSize) {
    TestFigure fig;
    QTemporaryDir dir;
    const QString path = dir.filePath(QStringLiteral("memo.svg"));
    QString error;
    ASSERT_TRUE(FigureExporter(&fig, memo()).save(path, FigureFormat::Svg, &error)) << error.toStdString();
    const SvgSummary svg = readSvg(readAll(path));
    ASSERT_TRUE(svg.wellFormed);
    EXPECT_TRUE(QSvgRenderer(path).isValid());  // Qt's own SVG reader takes it
    // closed form: 6.5 in x 25.4 = 165.1 mm, 4 in x 25.4 = 101.6 mm
    EXPECT_NEAR(mm(svg.width), 165.1, 1e-6);
    EXPECT_NEAR(mm(svg.height), 101.6, 1e-6);
    EXPECT_GT(svg.paths, 5);   // lines and axes as paths
    EXPECT_EQ(svg.images, 0);  // no embedded bitmap
    EXPECT_TRUE(svg.texts.contains(QStringLiteral("dose (mg)")));
    EXPECT_TRUE(svg.texts.contains(QStringLiteral("response score")));
    EXPECT_TRUE(svg.texts.contains(QStringLiteral("group A")));

    // Slide preset: closed form 10 x 25.4 = 254 mm, 5.63 x 25.4 = 143.002 mm
    FigureSettings slide = memo();
    slide.preset = SizePreset::Slide;
    slide.width_in = 10;
    slide.height_in = 5.63;
    const SvgSummary wide = readSvg(FigureExporter(&fig, slide).renderSvg());
    EXPECT_NEAR(mm(wide.width), 254.0, 1e-6);
    EXPECT_NEAR(mm(wide.height), 143.002, 1e-6);
}

TEST(FigureExport, PdfPageIsThePresetSizeInPoints) {
    TestFigure fig;
    QTemporaryDir dir;
    const QString path = dir.filePath(QStringLiteral("memo.pdf"));
    QString error;
    ASSERT_TRUE(FigureExporter(&fig, memo()).save(path, FigureFormat::Pdf, &error)) << error.toStdString();
    const QByteArray pdf = readAll(path);
    EXPECT_TRUE(pdf.startsWith("%PDF-"));
    const auto [w, h] = mediaBox(pdf);
    // closed form: 6.5 in x 72 pt = 468 pt, 4 in x 72 pt = 288 pt
    EXPECT_NEAR(w, 468.0, 0.01);
    EXPECT_NEAR(h, 288.0, 0.01);
    EXPECT_FALSE(pdf.contains("/Subtype /Image"));  // vector: no bitmap
    EXPECT_TRUE(pdf.contains("/Font"));             // text as text

    // Two column: closed form 7 x 72 = 504 pt, 4.3 x 72 = 309.6 pt (PDF page sizes in whole points: 310)
    FigureSettings two = memo();
    two.preset = SizePreset::TwoColumn;
    two.width_in = 7;
    two.height_in = 4.3;
    const auto [w2, h2] = mediaBox(FigureExporter(&fig, two).renderPdf());
    EXPECT_NEAR(w2, 504.0, 0.01);
    EXPECT_NEAR(h2, 309.6, 0.5);
}

TEST(FigureExport, LivePlotIsUnchangedAfterwardsAndTheExportUsedItsOwnFontAndCaption) {
    TestFigure fig;
    QCustomPlot* plot = fig.figurePlot();
    const PlotState before = stateOf(plot);
    FigureSettings s = memo();
    s.font_family = "DejaVu Serif";
    s.font_pt = 14;
    s.greyscale = true;
    s.caption = true;
    const QString caption =
        QStringLiteral("Linear model of score on dose × group · classical SEs · 95% intervals · n = 21");
    FigureExporter exporter(&fig, s, caption);
    EXPECT_FALSE(exporter.renderImage().isNull());
    EXPECT_EQ(stateOf(plot), before);
    const SvgSummary svg = readSvg(exporter.renderSvg());
    EXPECT_EQ(stateOf(plot), before);
    EXPECT_FALSE(exporter.renderPdf().isEmpty());
    EXPECT_EQ(stateOf(plot), before);
    // The export itself used the chosen font and drew the caption...
    ASSERT_TRUE(svg.wellFormed);
    ASSERT_FALSE(svg.fontFamilies.isEmpty());
    for (const QString& f : svg.fontFamilies) EXPECT_TRUE(f.contains(QLatin1String("DejaVu Serif"))) << f.toStdString();
    EXPECT_TRUE(svg.texts.join(QLatin1Char(' ')).contains(QStringLiteral("n = 21")));
    // ...which the live plot never had.
    EXPECT_NE(before.tickFont.family(), QStringLiteral("DejaVu Serif"));
    // Caption off: no caption text.
    s.caption = false;
    const SvgSummary plain = readSvg(FigureExporter(&fig, s, caption).renderSvg());
    EXPECT_FALSE(plain.texts.join(QLatin1Char(' ')).contains(QStringLiteral("n = 21")));
    EXPECT_EQ(stateOf(plot), before);
}

TEST(FigureExport, ReadOnlyFolderGivesAClearErrorAndKeepsTheExistingFile) {
    TestFigure fig;
    QTemporaryDir dir;
    const QString folder = dir.filePath(QStringLiteral("locked"));
    ASSERT_TRUE(QDir().mkpath(folder));
    const QString target = QDir(folder).filePath(QStringLiteral("figure.png"));
    {
        QFile f(target);
        ASSERT_TRUE(f.open(QIODevice::WriteOnly));
        f.write("an older figure");
    }
    ASSERT_TRUE(QFile::setPermissions(folder, QFileDevice::ReadOwner | QFileDevice::ExeOwner | QFileDevice::ReadGroup |
                                                  QFileDevice::ExeGroup | QFileDevice::ReadOther |
                                                  QFileDevice::ExeOther));
    {
        WithoutDacOverride asUser;
        if (folderWritable(folder)) {
            QFile::setPermissions(folder, QFileDevice::ReadOwner | QFileDevice::WriteOwner | QFileDevice::ExeOwner);
            GTEST_SKIP() << "cannot make a folder read-only here";
        }
        for (FigureFormat format : {FigureFormat::Png, FigureFormat::Svg, FigureFormat::Pdf}) {
            QString error;
            const QString path = QDir(folder).filePath(QStringLiteral("figure.") + figureFormatSuffix(format));
            EXPECT_FALSE(FigureExporter(&fig, memo()).save(path, format, &error));
            EXPECT_TRUE(error.contains(QDir::toNativeSeparators(path))) << error.toStdString();
            EXPECT_TRUE(error.startsWith(QStringLiteral("Could not write"))) << error.toStdString();
        }
    }
    QFile::setPermissions(folder, QFileDevice::ReadOwner | QFileDevice::WriteOwner | QFileDevice::ExeOwner);
    EXPECT_EQ(readAll(target), QByteArray("an older figure"));
    EXPECT_EQ(QDir(folder).entryList(QDir::AllEntries | QDir::Hidden | QDir::NoDotAndDotDot),
              QStringList{QStringLiteral("figure.png")});
}

TEST(FigureExport, WriteFailingHalfwayKeepsTheExistingFileAndLeavesNoTemporary) {
    // A file-size limit makes the write itself fail after the temporary file
    // was created (the disk-full case), even for root.
    TestFigure fig;
    QTemporaryDir dir;
    const QString target = dir.filePath(QStringLiteral("figure.png"));
    {
        QFile f(target);
        ASSERT_TRUE(f.open(QIODevice::WriteOnly));
        f.write("an older figure");
    }
    rlimit old{};
    ASSERT_EQ(getrlimit(RLIMIT_FSIZE, &old), 0);
    auto* previous = std::signal(SIGXFSZ, SIG_IGN);
    rlimit small = old;
    small.rlim_cur = 4096;
    ASSERT_EQ(setrlimit(RLIMIT_FSIZE, &small), 0);
    QString error;
    const bool ok = FigureExporter(&fig, memo()).save(target, FigureFormat::Png, &error);
    setrlimit(RLIMIT_FSIZE, &old);
    std::signal(SIGXFSZ, previous);
    EXPECT_FALSE(ok);
    EXPECT_TRUE(error.contains(QDir::toNativeSeparators(target))) << error.toStdString();
    EXPECT_EQ(readAll(target), QByteArray("an older figure"));
    EXPECT_EQ(QDir(dir.path()).entryList(QDir::AllEntries | QDir::Hidden | QDir::NoDotAndDotDot),
              QStringList{QStringLiteral("figure.png")});
}

TEST(FigureExport, BadSettingsAreRefusedWithTheReason) {
    TestFigure fig;
    QTemporaryDir dir;
    FigureSettings s = memo();
    s.dpi = 5;
    QString error;
    const QString path = dir.filePath(QStringLiteral("x.png"));
    EXPECT_FALSE(FigureExporter(&fig, s).save(path, FigureFormat::Png, &error));
    EXPECT_TRUE(error.contains(QStringLiteral("5 DPI"))) << error.toStdString();
    EXPECT_FALSE(QFile::exists(path));
}

TEST(FigureExportDialog, SettingsAreStoredInTheAnalysisAsOneUndoableEdit) {
    ProjectDocument doc;
    doc.adopt(load_project(test::sampleProject(QStringLiteral("orchard-nitrogen")).toStdString()));
    ASSERT_FALSE(doc.project().analyses.empty());
    const QString id = QString::fromStdString(doc.project().analyses.front().id);
    const FigureSettings original = doc.analysis(id)->figure;
    ASSERT_EQ(original.preset, SizePreset::Memo);
    TestFigure lines(QStringLiteral("Lines plot"), FigurePlot::Lines);
    TestFigure effect(QStringLiteral("Effect plot"), FigurePlot::Effect);
    QTemporaryDir dir;
    const int steps = doc.undoStack()->count();
    {
        FigureExportDialog dialog({&lines, &effect}, &doc, id, QStringLiteral("caption text"));
        dialog.show();
        auto* figure = dialog.findChild<QComboBox*>(QStringLiteral("figure-choice"));
        auto* preset = dialog.findChild<QComboBox*>(QStringLiteral("figure-preset"));
        auto* width = dialog.findChild<QDoubleSpinBox*>(QStringLiteral("figure-width"));
        auto* grey = dialog.findChild<QCheckBox*>(QStringLiteral("figure-greyscale"));
        ASSERT_TRUE(figure && preset && width && grey);
        // The dialog starts from the stored settings.
        EXPECT_EQ(dialog.settings(), original);
        // Pick the second figure and the next preset with the keyboard, tick greyscale with the mouse.
        QTest::keyClick(figure, Qt::Key_Down);
        EXPECT_EQ(dialog.currentSource(), &effect);
        preset->setFocus();
        const int before = preset->currentIndex();
        QTest::keyClick(preset, Qt::Key_Down);
        ASSERT_EQ(preset->currentIndex(), before + 1);
        const FigurePreset& chosen = figurePresets()[before + 1];
        EXPECT_DOUBLE_EQ(width->value(), chosen.widthIn);
        QTest::mouseClick(grey, Qt::LeftButton, {}, QPoint(4, grey->height() / 2));
        EXPECT_TRUE(grey->isChecked());
        // Nothing is stored until the user exports.
        EXPECT_EQ(doc.undoStack()->count(), steps);
        const QString path = dir.filePath(QStringLiteral("effect.svg"));
        ASSERT_TRUE(dialog.exportTo(path)) << dialog.statusText().toStdString();
        const SvgSummary svg = readSvg(readAll(path));
        // closed form: the chosen preset's width in inches x 25.4 mm
        EXPECT_NEAR(mm(svg.width), chosen.widthIn * 25.4, 1e-6);
        EXPECT_EQ(dialog.format(), FigureFormat::Svg);
    }
    ASSERT_EQ(doc.undoStack()->count(), steps + 1);
    const FigureSettings stored = doc.analysis(id)->figure;
    EXPECT_TRUE(stored.greyscale);
    EXPECT_EQ(stored.preset, SizePreset::SingleColumn);  // the preset after Memo in LOOK.md's list
    EXPECT_EQ(doc.undoStack()->undoText(), QStringLiteral("Figure settings"));
    doc.undoStack()->undo();
    EXPECT_EQ(doc.analysis(id)->figure, original);
    doc.undoStack()->redo();
    EXPECT_EQ(doc.analysis(id)->figure, stored);
    // A new dialog starts from what was stored.
    FigureExportDialog again(&lines, &doc, id, QString());
    EXPECT_EQ(again.settings(), stored);
    EXPECT_TRUE(again.findChild<QCheckBox*>(QStringLiteral("figure-greyscale"))->isChecked());
    // Exporting again with the same settings adds no step.
    ASSERT_TRUE(again.exportTo(dir.filePath(QStringLiteral("again.png"))));
    EXPECT_EQ(doc.undoStack()->count(), steps + 1);
}

// Each plot has its own caption: the box follows the figure choice (by
// keyboard) until the user edits it, and then keeps the user's words.
TEST(FigureExportDialog, CaptionFollowsTheChosenFigureUntilEdited) {
    TestFigure lines(QStringLiteral("Lines plot"), FigurePlot::Lines);
    TestFigure effect(QStringLiteral("Effect plot"), FigurePlot::Effect);
    FigureExportDialog dialog({&lines, &effect}, nullptr, QString(), QStringLiteral("general"));
    dialog.setFigureCaptions({QStringLiteral("lines caption"), QStringLiteral("effect caption")});
    dialog.show();
    auto* figure = dialog.findChild<QComboBox*>(QStringLiteral("figure-choice"));
    auto* text = dialog.findChild<QLineEdit*>(QStringLiteral("figure-caption-text"));
    ASSERT_TRUE(figure && text);
    EXPECT_EQ(dialog.captionText(), QStringLiteral("lines caption"));
    QTest::keyClick(figure, Qt::Key_Down);
    EXPECT_EQ(dialog.captionText(), QStringLiteral("effect caption"));
    text->setFocus();
    text->selectAll();
    QTest::keyClicks(text, QStringLiteral("my words"));
    QTest::keyClick(figure, Qt::Key_Up);
    EXPECT_EQ(dialog.currentSource(), &lines);
    EXPECT_EQ(dialog.captionText(), QStringLiteral("my words"));
}

// Opened from the workbench on the turbine sample's wind analysis, the
// Effect plot's caption names the straight-line check saved in the project.
TEST(FigureExportDialog, EffectPlotCaptionNamesTheStraightLineCheck) {
    test::SampleWindow win(test::sampleProject(QStringLiteral("turbine-repairs")));
    win.w.showAnalysis(QStringLiteral("experience-wind"));
    win.id = QStringLiteral("experience-wind");
    ASSERT_TRUE(win.waitForRun());
    win.showSection(AnalysisPage::Probe);
    QAction* exportAction = nullptr;
    for (QAction* action : win.w.findChildren<QAction*>())
        if (action->text() == QStringLiteral("&Export Figure…")) exportAction = action;
    ASSERT_NE(exportAction, nullptr);
    exportAction->trigger();
    for (int i = 0; i < 5; ++i) QCoreApplication::processEvents();
    auto* dialog = win.w.findChild<FigureExportDialog*>();
    ASSERT_NE(dialog, nullptr);
    auto* figure = dialog->findChild<QComboBox*>(QStringLiteral("figure-choice"));
    ASSERT_NE(figure, nullptr);
    for (int i = 0; i < figure->count(); ++i)
        if (figure->itemText(i).startsWith(QStringLiteral("Effect"))) figure->setCurrentIndex(i);
    EXPECT_TRUE(dialog->captionText().contains(QStringLiteral("straight-line check: binned estimates (3 bins)")))
        << dialog->captionText();
    for (int i = 0; i < figure->count(); ++i)
        if (figure->itemText(i).startsWith(QStringLiteral("Lines"))) figure->setCurrentIndex(i);
    EXPECT_FALSE(dialog->captionText().contains(QStringLiteral("straight-line"))) << dialog->captionText();
    dialog->close();
}

TEST(FigureExportDialog, KeepInProjectAddsAFigureEntryThatCanBeUndone) {
    ProjectDocument doc;
    doc.adopt(load_project(test::sampleProject(QStringLiteral("coffee-discount")).toStdString()));
    const QString id = QString::fromStdString(doc.project().analyses.front().id);
    const std::size_t figuresBefore = doc.project().figures.size();
    TestFigure effect(QStringLiteral("Effect plot"), FigurePlot::Effect);
    FigureExportDialog dialog(&effect, &doc, id, QString());
    dialog.show();
    auto* keep = dialog.findChild<QPushButton*>(QStringLiteral("figure-keep"));
    ASSERT_TRUE(keep);
    QTest::mouseClick(keep, Qt::LeftButton);
    ASSERT_EQ(doc.project().figures.size(), figuresBefore + 1);
    const FigureEntry& entry = doc.project().figures.back();
    EXPECT_EQ(entry.plot, FigurePlot::Effect);
    EXPECT_EQ(entry.analysis, id.toStdString());
    EXPECT_TRUE(QString::fromStdString(entry.name).endsWith(QStringLiteral(": Effect plot")));
    // Keeping the same plot twice adds nothing.
    EXPECT_FALSE(dialog.keepInProject());
    EXPECT_EQ(doc.project().figures.size(), figuresBefore + 1);
    doc.undoStack()->undo();
    EXPECT_EQ(doc.project().figures.size(), figuresBefore);
}

TEST(FigureExportDialog, CopyPutsTheImageAtTheChosenSizeOnTheClipboard) {
    TestFigure fig;
    FigureExportDialog dialog(&fig, nullptr, QString(), QString());
    auto* dpi = dialog.findChild<QSpinBox*>(QStringLiteral("figure-dpi"));
    ASSERT_TRUE(dpi);
    dpi->setValue(100);
    ASSERT_TRUE(dialog.copyToClipboard()) << dialog.statusText().toStdString();
    const QImage image = QGuiApplication::clipboard()->image();
    if (image.isNull()) GTEST_SKIP() << "this platform's clipboard keeps no image";
    // closed form: memo 6.5 x 100 = 650 px, 4 x 100 = 400 px
    EXPECT_EQ(image.size(), QSize(650, 400));
}

TEST(FigureExport, ProbeSectionFiguresOfASampleProjectExport) {
    // The orchard-nitrogen sample open in a shown window, on its Probe section.
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    MainWindow& w = win.w;
    const QList<FigureSource*> figures = w.analysisPage()->currentFigures();
    if (figures.isEmpty()) GTEST_SKIP() << "the Probe section offers no figures yet";
    QTemporaryDir dir;
    for (FigureSource* source : figures) {
        SCOPED_TRACE(source->figureName().toStdString());
        const PlotState before = stateOf(source->figurePlot());
        FigureSettings s = memo();
        s.caption = true;
        FigureExporter exporter(source, s, QStringLiteral("caption"));
        QString error;
        const QString png = dir.filePath(source->figureKey() + QStringLiteral(".png"));
        ASSERT_TRUE(exporter.save(png, FigureFormat::Png, &error)) << error.toStdString();
        EXPECT_EQ(QImage(png).size(), QSize(1950, 1200));  // closed form, as above
        const SvgSummary svg = readSvg(exporter.renderSvg());
        EXPECT_TRUE(svg.wellFormed);
        EXPECT_GT(svg.paths, 5);
        EXPECT_NEAR(mm(svg.width), 165.1, 1e-6);
        const auto [pw, ph] = mediaBox(exporter.renderPdf());
        EXPECT_NEAR(pw, 468.0, 0.01);
        EXPECT_NEAR(ph, 288.0, 0.01);
        EXPECT_EQ(stateOf(source->figurePlot()), before);
    }
}

TEST(FigureExport, SingleColumnFigureWrapsALongAxisTitleAndShrinksTheLegend) {
    // The orchard-nitrogen sample open in a shown window, on its Probe section.
    test::SampleWindow win(test::sampleProject(QStringLiteral("orchard-nitrogen")));
    win.showSection(AnalysisPage::Probe);
    MainWindow& w = win.w;
    FigureSource* effect = nullptr;
    for (FigureSource* f : w.analysisPage()->currentFigures())
        if (f->figureKey() == QStringLiteral("effect")) effect = f;
    ASSERT_TRUE(effect);
    const QString title = effect->figurePlot()->yAxis->label();
    ASSERT_FALSE(title.contains(QLatin1Char('\n')));
    const PlotState before = stateOf(effect->figurePlot());
    FigureSettings s = memo();
    s.preset = SizePreset::SingleColumn;
    s.width_in = 3.5;  // LOOK.md: Single column 3.5 × 2.6 in
    s.height_in = 2.6;
    const QByteArray svg = FigureExporter(effect, s, QStringLiteral("caption")).renderSvg();
    // The long "Effect of … on …" title no longer fits the 2.6 in axis: broken at spaces into lines,
    // each written as its own text run; the first line is the title's start up to a space.
    bool broken = false;
    for (int at = title.indexOf(QLatin1Char(' ')); at > 0; at = title.indexOf(QLatin1Char(' '), at + 1))
        broken = broken || svg.contains(QStringLiteral(">%1<").arg(title.left(at)).toUtf8());
    EXPECT_TRUE(broken) << "no line break in the axis title";
    EXPECT_FALSE(svg.contains(QStringLiteral(">%1<").arg(title).toUtf8()));
    // The Memo preset keeps the title on one line.
    const QByteArray wide = FigureExporter(effect, memo(), QStringLiteral("caption")).renderSvg();
    EXPECT_TRUE(wide.contains(QStringLiteral(">%1<").arg(title).toUtf8()));
    // And the live plot is as it was (title, legend font and layout).
    EXPECT_EQ(effect->figurePlot()->yAxis->label(), title);
    EXPECT_EQ(stateOf(effect->figurePlot()), before);
}

// ------------------------------------------- the pixel limit (FigureLimits)

// Types `text` into a spin box as a user would (select all, type, Enter).
void typeInto(QAbstractSpinBox* box, const QString& text) {
    box->setFocus();
    box->selectAll();
    QTest::keyClicks(box, text);
    // Not Return: that would press the dialog's default button (Save) and
    // open a file chooser. interpretText() commits the typed text as leaving
    // the box does.
    box->interpretText();
}

TEST(FigureExport, AnImageOverThePixelLimitIsRefusedWithoutDrawingIt) {
    TestFigure fig;
    QTemporaryDir dir;
    FigureSettings s = memo();
    s.width_in = s.height_in = 40;
    s.dpi = 1200;  // 48,000 × 48,000 px: a 9 GB image (closed form)
    const FigureExporter exporter(&fig, s);
    EXPECT_TRUE(exporter.renderImage().isNull());
    EXPECT_TRUE(exporter.render(FigureFormat::Png).isEmpty());
    QString error;
    const QString path = dir.filePath(QStringLiteral("x.png"));
    EXPECT_FALSE(exporter.save(path, FigureFormat::Png, &error));
    // closed form: √(2·10⁸ / 1,600 in²) = 353.6 DPI
    EXPECT_TRUE(error.contains(QStringLiteral("48000 × 48000 pixels is over the limit of 200 megapixels")))
        << error.toStdString();
    EXPECT_TRUE(error.contains(QStringLiteral("at most 353 DPI"))) << error.toStdString();
    EXPECT_FALSE(QFile::exists(path));
}

TEST(FigureExportDialog, OffersNoResolutionOverThePixelLimitAndSaysWhy) {
    TestFigure fig;
    FigureExportDialog dialog(&fig, nullptr, QString(), QString());
    dialog.show();
    auto* width = dialog.findChild<QDoubleSpinBox*>(QStringLiteral("figure-width"));
    auto* height = dialog.findChild<QDoubleSpinBox*>(QStringLiteral("figure-height"));
    auto* dpi = dialog.findChild<QSpinBox*>(QStringLiteral("figure-dpi"));
    auto* pixels = dialog.findChild<QLabel*>(QStringLiteral("figure-pixels"));
    ASSERT_TRUE(width && height && dpi && pixels);
    typeInto(dpi, QStringLiteral("1200"));
    EXPECT_EQ(dpi->value(), 1200);  // the memo size at 1200 DPI fits: 7,800 × 4,800 px (closed form)
    typeInto(width, QStringLiteral("40"));
    typeInto(height, QStringLiteral("40"));
    ASSERT_DOUBLE_EQ(width->value(), 40.0);
    ASSERT_DOUBLE_EQ(height->value(), 40.0);
    // closed form: at 40 × 40 in the limit allows 353 DPI, 14,120 × 14,120 px
    EXPECT_EQ(dpi->maximum(), 353);
    EXPECT_EQ(dpi->value(), 353);
    EXPECT_EQ(pixels->text(), QStringLiteral("14,120 × 14,120 px (at most 200 megapixels: 353 DPI at this size)"));
    typeInto(dpi, QStringLiteral("1000"));
    // The box does not take a value over its maximum: its validator refuses
    // the last digit, leaving "100" (Qt's QSpinBox validation).
    EXPECT_LE(dpi->value(), 353);
    EXPECT_TRUE(
        FigureLimits::pixels_fit(dialog.settings().width_in, dialog.settings().height_in, dialog.settings().dpi));
    // A smaller size gives the range back.
    typeInto(width, QStringLiteral("6.5"));
    typeInto(height, QStringLiteral("4"));
    EXPECT_EQ(dpi->maximum(), 1200);
}
