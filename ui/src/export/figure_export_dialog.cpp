#include "export/figure_export_dialog.hpp"

#include <QCheckBox>
#include <QComboBox>
#include <QDialogButtonBox>
#include <QDir>
#include <QDoubleSpinBox>
#include <QFileDialog>
#include <QFileInfo>
#include <QFontComboBox>
#include <QFormLayout>
#include <QGroupBox>
#include <QHBoxLayout>
#include <QHash>
#include <QLabel>
#include <QLineEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QSettings>
#include <QSpinBox>
#include <QStandardPaths>
#include <QTimer>
#include <QVBoxLayout>
#include <cmath>

#include "common/number_text.hpp"
#include "model/project_document.hpp"
#include "plots/figure_source.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

// A row whose field is a layout needs its label's buddy set by hand.
QLabel* buddyLabel(QWidget* parent, const QString& text, QWidget* buddy) {
    auto* label = new QLabel(text, parent);
    label->setBuddy(buddy);
    return label;
}

constexpr int kPreviewWidth = 420, kPreviewHeight = 300;

// "Effect plot" -> "effect-plot"
QString fileStem(const QString& name) {
    QString stem = name.toLower();
    stem.replace(QRegularExpression(QStringLiteral("[^a-z0-9]+")), QStringLiteral("-"));
    stem.remove(QRegularExpression(QStringLiteral("^-+|-+$")));
    return stem.isEmpty() ? QStringLiteral("figure") : stem;
}

// The plot last chosen in Export Figure, per project file (this session only).
QHash<QString, FigurePlot>& lastPlots() {
    static QHash<QString, FigurePlot> plots;
    return plots;
}
}  // namespace

FigureExportDialog::FigureExportDialog(FigureSource* source, ProjectDocument* doc, const QString& analysisId,
                                       const QString& caption, QWidget* parent)
    : FigureExportDialog(QList<FigureSource*>{source}, doc, analysisId, caption, parent) {}

FigureExportDialog::FigureExportDialog(const QList<FigureSource*>& sources, ProjectDocument* doc,
                                       const QString& analysisId, const QString& caption, QWidget* parent)
    : QDialog(parent), sources_(sources), doc_(doc), analysisId_(analysisId), caption_(caption) {
    sources_.removeAll(nullptr);
    setWindowTitle(tr("Export Figure"));
    build();
    FigureSettings stored;
    if (doc_)
        if (const Analysis* a = doc_->analysis(analysisId_)) stored = a->figure;
    loadSettings(stored);
    // The plot chosen last time for this project, when this section has it.
    const QString key = doc_ ? doc_->filePath() : QString();
    if (const auto last = lastPlots().constFind(key); last != lastPlots().constEnd())
        for (int i = 0; i < sources_.size(); ++i)
            if (sources_[i]->figureKind() == *last) figure_->setCurrentIndex(i);
    connect(figure_, &QComboBox::currentIndexChanged, this, [this, key](int index) {
        if (FigureSource* s = currentSource()) lastPlots().insert(key, s->figureKind());
        // The caption follows the figure while it is the previous figure's own.
        if (index >= 0 && index < captions_.size() && captionFigure_ >= 0 &&
            captionText_->text() == captions_[captionFigure_]) {
            captionText_->setText(captions_[index]);
            captionText_->setCursorPosition(0);
            captionFigure_ = index;
        }
    });
    updatePreview();
}

void FigureExportDialog::build() {
    auto* form = new QFormLayout;
    form->setFieldGrowthPolicy(QFormLayout::AllNonFixedFieldsGrow);
    createFigureRows(form);
    createLookRows(form);
    auto* top = new QHBoxLayout;
    top->addLayout(form, 0);
    top->addWidget(createPreview(), 1);
    status_ = new QLabel(this);
    status_->setObjectName(QStringLiteral("figure-status"));
    status_->setWordWrap(true);
    status_->setTextInteractionFlags(Qt::TextSelectableByMouse);

    QDialogButtonBox* buttons = createButtons();
    auto* layout = new QVBoxLayout(this);
    layout->addLayout(top, 1);
    layout->addWidget(status_);
    layout->addWidget(buttons);
    connectSignals(buttons);
}

// Which figure, in which format, at which size.
void FigureExportDialog::createFigureRows(QFormLayout* form) {
    figure_ = new QComboBox(this);
    figure_->setObjectName(QStringLiteral("figure-choice"));
    for (FigureSource* s : sources_) figure_->addItem(s->figureName());
    figure_->setEnabled(sources_.size() > 1);
    form->addRow(tr("&Figure:"), figure_);

    format_ = new QComboBox(this);
    format_->setObjectName(QStringLiteral("figure-format"));
    format_->addItem(tr("PNG image"), int(FigureFormat::Png));
    format_->addItem(tr("SVG drawing (vector)"), int(FigureFormat::Svg));
    format_->addItem(tr("PDF document (vector)"), int(FigureFormat::Pdf));
    form->addRow(tr("F&ormat:"), format_);

    preset_ = new QComboBox(this);
    preset_->setObjectName(QStringLiteral("figure-preset"));
    for (const FigurePreset& p : figurePresets()) preset_->addItem(p.label, static_cast<int>(p.key));
    preset_->addItem(tr("Custom size"), static_cast<int>(SizePreset::Custom));
    form->addRow(tr("Si&ze:"), preset_);

    auto makeInches = [this](const QString& name) {
        auto* box = new QDoubleSpinBox(this);
        box->setObjectName(name);
        box->setRange(FigureLimits::min_inches, FigureLimits::max_inches);
        box->setDecimals(2);
        box->setSingleStep(0.1);
        box->setSuffix(tr(" in"));
        box->setKeyboardTracking(false);
        return box;
    };
    width_ = makeInches(QStringLiteral("figure-width"));
    height_ = makeInches(QStringLiteral("figure-height"));
    auto* sizeRow = new QHBoxLayout;
    sizeRow->addWidget(width_);
    sizeRow->addWidget(new QLabel(QStringLiteral("×"), this));
    sizeRow->addWidget(height_);
    form->addRow(buddyLabel(this, tr("&Width × height:"), width_), sizeRow);
}

// Resolution, font, greyscale and caption.
void FigureExportDialog::createLookRows(QFormLayout* form) {
    dpi_ = new QSpinBox(this);
    dpi_->setObjectName(QStringLiteral("figure-dpi"));
    dpi_->setRange(FigureLimits::min_dpi, FigureLimits::max_dpi);
    dpi_->setSingleStep(50);
    dpi_->setSuffix(tr(" DPI"));
    dpi_->setKeyboardTracking(false);
    dpi_->setToolTip(tr("Resolution of the PNG image and of the image copied to the clipboard"));
    pixels_ = new QLabel(this);
    pixels_->setObjectName(QStringLiteral("figure-pixels"));
    pixels_->setWordWrap(true);
    auto* dpiRow = new QHBoxLayout;
    dpiRow->addWidget(dpi_);
    dpiRow->addWidget(pixels_, 1);
    form->addRow(buddyLabel(this, tr("&Resolution:"), dpi_), dpiRow);

    font_ = new QFontComboBox(this);
    font_->setObjectName(QStringLiteral("figure-font"));
    fontSize_ = new QDoubleSpinBox(this);
    fontSize_->setObjectName(QStringLiteral("figure-font-size"));
    fontSize_->setRange(FigureLimits::min_font_pt, FigureLimits::max_font_pt);
    fontSize_->setDecimals(1);
    fontSize_->setSingleStep(0.5);
    fontSize_->setSuffix(tr(" pt"));
    fontSize_->setKeyboardTracking(false);
    auto* fontRow = new QHBoxLayout;
    fontRow->addWidget(font_, 1);
    fontRow->addWidget(fontSize_);
    form->addRow(buddyLabel(this, tr("Fo&nt:"), font_), fontRow);

    greyscale_ = new QCheckBox(tr("&Greyscale"), this);
    greyscale_->setObjectName(QStringLiteral("figure-greyscale"));
    greyscale_->setToolTip(tr("Draw every line, band and label in shades of grey (the series keep their line styles)"));
    form->addRow(QString(), greyscale_);

    markSlider_ = new QCheckBox(tr("&Mark the slider's value"), this);
    markSlider_->setObjectName(QStringLiteral("figure-mark-slider"));
    markSlider_->setToolTip(
        tr("Show where the moderator slider stands (its line or frame), labelled with the value, e.g. “wind = 8.0”; "
           "off, the figure shows no slider"));
    form->addRow(QString(), markSlider_);

    captionOn_ = new QCheckBox(tr("&Caption under the figure"), this);
    captionOn_->setObjectName(QStringLiteral("figure-caption-on"));
    captionText_ = new QLineEdit(caption_, this);
    captionText_->setObjectName(QStringLiteral("figure-caption-text"));
    captionText_->setCursorPosition(0);
    captionText_->setToolTip(tr("Model, SE kind, level and n; edit the text for this export"));
    form->addRow(QString(), captionOn_);
    form->addRow(tr("Caption &text:"), captionText_);
}

QWidget* FigureExportDialog::createPreview() {
    preview_ = new QLabel(this);
    preview_->setObjectName(QStringLiteral("figure-preview"));
    preview_->setMinimumSize(kPreviewWidth, kPreviewHeight);
    preview_->setAlignment(Qt::AlignCenter);
    preview_->setFrameShape(QFrame::StyledPanel);
    auto* previewBox = new QGroupBox(tr("Preview"), this);
    auto* previewLayout = new QVBoxLayout(previewBox);
    previewLayout->addWidget(preview_, 1);

    return previewBox;
}

QDialogButtonBox* FigureExportDialog::createButtons() {
    auto* buttons = new QDialogButtonBox(this);
    save_ = buttons->addButton(tr("&Save…"), QDialogButtonBox::AcceptRole);
    save_->setObjectName(QStringLiteral("figure-save"));
    copy_ = buttons->addButton(tr("Co&py to Clipboard"), QDialogButtonBox::ActionRole);
    copy_->setObjectName(QStringLiteral("figure-copy"));
    keep_ = buttons->addButton(tr("&Keep in Project"), QDialogButtonBox::ActionRole);
    keep_->setObjectName(QStringLiteral("figure-keep"));
    keep_->setToolTip(tr("List this plot under “figures” in the Project sidebar"));
    keep_->setEnabled(doc_ != nullptr);
    buttons->addButton(QDialogButtonBox::Close);
    save_->setDefault(true);

    return buttons;
}

void FigureExportDialog::connectSignals(QDialogButtonBox* buttons) {
    previewTimer_ = new QTimer(this);
    previewTimer_->setSingleShot(true);
    previewTimer_->setInterval(120);
    connect(previewTimer_, &QTimer::timeout, this, &FigureExportDialog::updatePreview);

    // Save… opens a file dialog; this one stays open for the next file.
    connect(save_, &QPushButton::clicked, this, &FigureExportDialog::saveClicked);
    connect(copy_, &QPushButton::clicked, this, [this] { copyToClipboard(); });
    connect(keep_, &QPushButton::clicked, this, [this] { keepInProject(); });
    connect(buttons, &QDialogButtonBox::rejected, this, &QDialog::reject);

    connect(figure_, &QComboBox::currentIndexChanged, this, &FigureExportDialog::schedulePreview);
    connect(format_, &QComboBox::currentIndexChanged, this, &FigureExportDialog::formatChosen);
    connect(preset_, &QComboBox::currentIndexChanged, this, &FigureExportDialog::presetChosen);
    connect(width_, &QDoubleSpinBox::valueChanged, this, &FigureExportDialog::sizeEdited);
    connect(height_, &QDoubleSpinBox::valueChanged, this, &FigureExportDialog::sizeEdited);
    connect(dpi_, &QSpinBox::valueChanged, this, &FigureExportDialog::updatePixelReadout);
    connect(font_, &QFontComboBox::currentFontChanged, this, &FigureExportDialog::schedulePreview);
    connect(fontSize_, &QDoubleSpinBox::valueChanged, this, &FigureExportDialog::schedulePreview);
    connect(greyscale_, &QCheckBox::toggled, this, &FigureExportDialog::schedulePreview);
    connect(markSlider_, &QCheckBox::toggled, this, &FigureExportDialog::schedulePreview);
    connect(captionOn_, &QCheckBox::toggled, this, [this](bool on) {
        captionText_->setEnabled(on);
        schedulePreview();
    });
    connect(captionText_, &QLineEdit::textChanged, this, &FigureExportDialog::schedulePreview);
}

void FigureExportDialog::loadSettings(const FigureSettings& s) {
    loading_ = true;
    width_->setValue(s.width_in);
    height_->setValue(s.height_in);
    const int presetIndex = preset_->findData(static_cast<int>(s.preset));
    preset_->setCurrentIndex(presetIndex >= 0 ? presetIndex : preset_->count() - 1);
    dpi_->setValue(s.dpi);
    QFont f(QString::fromStdString(s.font_family));
    font_->setCurrentFont(f);
    fontSize_->setValue(s.font_pt);
    greyscale_->setChecked(s.greyscale);
    markSlider_->setChecked(s.mark_slider);
    captionOn_->setChecked(s.caption);
    captionText_->setEnabled(s.caption);
    loading_ = false;
    updatePixelReadout();
}

FigureSettings FigureExportDialog::settings() const {
    FigureSettings s;
    s.preset = static_cast<SizePreset>(preset_->currentData().toInt());
    s.width_in = width_->value();
    s.height_in = height_->value();
    s.dpi = dpi_->value();
    s.font_family = font_->currentFont().family().toStdString();
    s.font_pt = fontSize_->value();
    s.greyscale = greyscale_->isChecked();
    s.mark_slider = markSlider_->isChecked();
    s.caption = captionOn_->isChecked();
    return s;
}

FigureFormat FigureExportDialog::format() const { return static_cast<FigureFormat>(format_->currentData().toInt()); }

void FigureExportDialog::setFigureCaptions(const QStringList& captions) {
    if (captions.size() != sources_.size()) return;
    captions_ = captions;
    captionFigure_ = figure_->currentIndex();
    if (captionFigure_ < 0) return;
    captionText_->setText(captions_[captionFigure_]);
    captionText_->setCursorPosition(0);
}

FigureSource* FigureExportDialog::currentSource() const {
    const int i = figure_->currentIndex();
    return i >= 0 && i < sources_.size() ? sources_[i] : nullptr;
}

QString FigureExportDialog::captionText() const {
    return captionOn_->isChecked() ? captionText_->text().trimmed() : QString();
}

QString FigureExportDialog::statusText() const { return status_->text(); }

void FigureExportDialog::presetChosen() {
    if (loading_) return;
    if (const FigurePreset* p = findFigurePreset(static_cast<SizePreset>(preset_->currentData().toInt()))) {
        loading_ = true;
        width_->setValue(p->widthIn);
        height_->setValue(p->heightIn);
        loading_ = false;
    }
    updatePixelReadout();
}

void FigureExportDialog::sizeEdited() {
    if (loading_) return;
    // A size typed by hand is a preset's when it matches one, else custom.
    int index = preset_->count() - 1;
    for (int i = 0; i < figurePresets().size(); ++i) {
        const FigurePreset& p = figurePresets()[i];
        if (std::abs(p.widthIn - width_->value()) < 0.005 && std::abs(p.heightIn - height_->value()) < 0.005) index = i;
    }
    loading_ = true;
    preset_->setCurrentIndex(index);
    loading_ = false;
    updatePixelReadout();
}

void FigureExportDialog::formatChosen() {
    dpi_->setEnabled(true);  // the clipboard image uses it for every format
    pixels_->setEnabled(format() == FigureFormat::Png);
    schedulePreview();
}

// The DPI box offers only resolutions whose image keeps to the pixel limit
// at the chosen size (FigureLimits), and the readout says both.
void FigureExportDialog::updatePixelReadout() {
    const int cap = FigureLimits::max_dpi_for(width_->value(), height_->value());
    if (dpi_->maximum() != cap) dpi_->setMaximum(cap);  // lowers the value when it was over
    const QSize px = FigureExporter::pixelSize(settings());
    const QString limit = countText(static_cast<long long>(FigureLimits::max_pixels / 1e6));
    pixels_->setText(tr("%1 × %2 px (at most %3 megapixels: %4 DPI at this size)")
                         .arg(countText(px.width()), countText(px.height()), limit)
                         .arg(cap));
    schedulePreview();
}

void FigureExportDialog::schedulePreview() {
    if (!loading_) previewTimer_->start();
}

void FigureExportDialog::updatePreview() {
    FigureSource* source = currentSource();
    if (!source) {
        preview_->setText(tr("No figure to export."));
        return;
    }
    // The same drawing as the export, at a resolution that fits the preview:
    // fonts, line widths and the caption keep their proportions.
    FigureSettings s = settings();
    const double ratio = preview_->devicePixelRatioF();
    const double fit = std::min(kPreviewWidth / s.width_in, kPreviewHeight / s.height_in);
    s.dpi = std::max(8, static_cast<int>(fit * ratio));
    QImage image = FigureExporter(source, s, captionText()).renderImage();
    image.setDevicePixelRatio(ratio);
    preview_->setPixmap(QPixmap::fromImage(image));
}

void FigureExportDialog::storeSettings() {
    if (!doc_) return;
    const Analysis* a = doc_->analysis(analysisId_);
    if (!a) return;
    Analysis after = *a;
    after.figure = settings();
    doc_->setAnalysis(after, tr("Figure settings"));  // no step when nothing changed
}

void FigureExportDialog::setStatus(const QString& text, bool error) {
    status_->setText(text);
    keepAccentText(status_, error ? QColor(0xB3, 0x26, 0x1E) : QColor());
}

bool FigureExportDialog::exportTo(const QString& requested) {
    FigureSource* source = currentSource();
    if (!source) {
        setStatus(tr("There is no figure to export."), true);
        return false;
    }
    QString path = requested;
    FigureFormat fmt = format();
    if (const auto named = figureFormatForPath(path)) {
        fmt = *named;
        format_->setCurrentIndex(format_->findData(int(fmt)));
    } else {
        path += QLatin1Char('.') + figureFormatSuffix(fmt);
    }
    QString error;
    if (!FigureExporter(source, settings(), captionText()).save(path, fmt, &error)) {
        setStatus(error, true);
        return false;
    }
    storeSettings();
    lastSavedPath_ = path;
    const QSize px = FigureExporter::pixelSize(settings());
    const QString shown = QDir::toNativeSeparators(QFileInfo(path).absoluteFilePath());
    setStatus(
        fmt == FigureFormat::Png
            ? tr("Saved “%1” (%2 × %3 px, %4 DPI).").arg(shown).arg(px.width()).arg(px.height()).arg(settings().dpi)
            : tr("Saved “%1”.").arg(shown),
        false);
    return true;
}

bool FigureExportDialog::copyToClipboard() {
    FigureSource* source = currentSource();
    const FigureSettings s = settings();
    if (!source) {
        setStatus(tr("There is no figure to copy."), true);
        return false;
    }
    if (const QString bad = validateFigureSettings(s); !bad.isEmpty()) {
        setStatus(tr("Could not copy the figure: %1.").arg(bad), true);
        return false;
    }
    FigureExporter(source, s, captionText()).copyToClipboard();
    storeSettings();
    const QSize px = FigureExporter::pixelSize(s);
    setStatus(tr("Copied the %1 to the clipboard (%2 × %3 px, %4 DPI).")
                  .arg(source->figureName().toLower())
                  .arg(px.width())
                  .arg(px.height())
                  .arg(s.dpi),
              false);
    return true;
}

bool FigureExportDialog::keepInProject() {
    FigureSource* source = currentSource();
    if (!doc_ || !source) return false;
    Project p = doc_->project();
    Analysis* a = p.analysis(analysisId_.toStdString());
    if (!a) {
        setStatus(tr("The analysis of this figure is no longer in the project."), true);
        return false;
    }
    const FigurePlot plot = source->figureKind();
    for (const FigureEntry& f : p.figures)
        if (f.analysis == a->id && f.plot == plot) {
            setStatus(tr("The project already keeps this figure as “%1”.").arg(QString::fromStdString(f.name)), false);
            return false;
        }
    a->figure = settings();
    FigureEntry entry;
    entry.id = p.unique_id("figure");
    entry.name = (QString::fromStdString(a->name) + QStringLiteral(": ") + source->figureName()).toStdString();
    entry.analysis = a->id;
    entry.plot = plot;
    p.figures.push_back(entry);
    doc_->setProject(p, tr("Keep figure"));
    setStatus(
        tr("Kept “%1” in the project (see “figures” in the Project sidebar).").arg(QString::fromStdString(entry.name)),
        false);
    return true;
}

QString FigureExportDialog::suggestedFileName() const {
    FigureSource* source = currentSource();
    if (!source) return {};
    const Analysis* a = doc_ ? doc_->analysis(analysisId_) : nullptr;
    const QString stem = a ? fileStem(QString::fromStdString(a->name) + QLatin1Char(' ') + source->figureKey())
                           : fileStem(source->figureName());
    return stem + QLatin1Char('.') + figureFormatSuffix(format());
}

QString FigureExportDialog::saveFolder() const {
    // Beside the project; an unsaved project: the folder saved to last.
    if (doc_ && !doc_->filePath().isEmpty()) return QFileInfo(doc_->filePath()).absolutePath();
    const QString dir = QSettings().value(QStringLiteral("figureExport/lastDir")).toString();
    if (!dir.isEmpty() && QDir(dir).exists()) return dir;
    return QStandardPaths::writableLocation(QStandardPaths::DocumentsLocation);
}

void FigureExportDialog::saveClicked() {
    if (!currentSource()) return;
    const FigureFormat fmt = format();
    const QString filters = tr("PNG image (*.png);;SVG drawing (*.svg);;PDF document (*.pdf)");
    QString selected = fmt == FigureFormat::Png   ? tr("PNG image (*.png)")
                       : fmt == FigureFormat::Svg ? tr("SVG drawing (*.svg)")
                                                  : tr("PDF document (*.pdf)");
    const QString path = QFileDialog::getSaveFileName(
        this, tr("Save Figure"), QDir(saveFolder()).filePath(suggestedFileName()), filters, &selected);
    if (path.isEmpty()) return;
    QSettings().setValue(QStringLiteral("figureExport/lastDir"), QFileInfo(path).absolutePath());
    if (exportTo(path)) Q_EMIT figureSaved(lastSavedPath_);
}

}  // namespace moderato::ui
