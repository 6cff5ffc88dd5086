// Renders a live plot (a FigureSource) to a file at a physical size: PNG at a
// chosen DPI (exact pixel size, DPI in the file), SVG and PDF as vectors.
// The figure's font, greyscale and caption apply only while it is drawn; the
// live plot is exactly as before afterwards. Files are written atomically.
#pragma once

#include <QByteArray>
#include <QImage>
#include <QList>
#include <QSize>
#include <QString>
#include <optional>

#include "moderato/project/project.hpp"

class QCustomPlot;
class QPaintDevice;

namespace moderato::ui {

class FigureSource;

enum class FigureFormat { Png, Svg, Pdf };

// "png" / "svg" / "pdf".
QString figureFormatSuffix(FigureFormat format);
// The format named by a file's extension (case-insensitive); nullopt if none.
std::optional<FigureFormat> figureFormatForPath(const QString& path);

// The size presets of LOOK.md ("Figures for memos").
struct FigurePreset {
    SizePreset key;  // FigureSettings::preset
    QString label;   // shown in the dialog
    double widthIn;
    double heightIn;
};
const QList<FigurePreset>& figurePresets();
// The preset with this key (nullptr: Custom).
const FigurePreset* findFigurePreset(SizePreset key);

// Checks that the settings can be drawn (sizes, DPI, font size in range);
// returns the reason when they cannot, else an empty string.
QString validateFigureSettings(const FigureSettings& settings);

class FigureExporter {
public:
    // `caption`: the text under the figure (drawn when settings.caption is on
    // and the text is not empty).
    FigureExporter(FigureSource* source, const FigureSettings& settings, const QString& caption = {});

    // Pixel size of the PNG: inches × DPI, rounded.
    static QSize pixelSize(const FigureSettings& settings);
    // Figures are laid out in units of 1/layoutDpi() inch (the resolution
    // fonts are measured at without a device); layoutSize() is the figure's
    // size in those units, rounded.
    static int layoutDpi();
    static QSize layoutSize(const FigureSettings& settings);

    // The figure as an image of pixelSize() carrying the DPI in its metadata
    // (greyscale settings: an 8-bit grey image).
    QImage renderImage() const;
    // SVG document (width/height attributes in mm of the figure size).
    QByteArray renderSvg() const;
    // PDF document of one page of the figure size.
    QByteArray renderPdf() const;
    QByteArray render(FigureFormat format) const;
    // Draws the figure, as every format does, on `device` of layoutSize()
    // at layoutDpi() (e.g. a device that checks what is drawn where).
    void paint(QPaintDevice* device) const;

    // Writes the figure to `path` atomically (a temporary file beside it,
    // renamed over the target when complete). On failure returns false with a
    // message naming the file in `error`; an existing file is left unchanged.
    bool save(const QString& path, FigureFormat format, QString* error = nullptr) const;
    // Puts renderImage() on the clipboard.
    void copyToClipboard() const;

private:
    FigureSource* source_;
    FigureSettings settings_;
    QString caption_;
};

}  // namespace moderato::ui
