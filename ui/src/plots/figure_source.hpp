// A plot that can be exported as a figure (see export/figure_exporter.hpp).
#pragma once

#include <QString>

#include "moderato/project/project.hpp"

class QCustomPlot;

namespace moderato::ui {

// The object name of a caption over one panel of a plot (a QCPTextElement
// like the plot's title, but exported at the text size, not the title's).
inline constexpr const char* kPanelCaptionName = "panel-caption";
// The object name of a small label inside a plot (a row's name), exported at
// kSmallTextScale times the figure's text size.
inline constexpr const char* kSmallTextName = "small-text";
inline constexpr double kSmallTextScale = 0.8;
// A figure shorter than this (inches) is drawn compactly by the plots that
// would otherwise crowd it (setExportSize).
inline constexpr double kCompactFigureHeightIn = 3.2;

class FigureSource {
public:
    virtual ~FigureSource() = default;
    // "Lines plot", "Effect plot", ... (also the default file name).
    virtual QString figureName() const = 0;
    // Which plot this is (what a kept figure of the project names).
    virtual FigurePlot figureKind() const = 0;
    // Its key, as the project file spells it ("lines", "effect", …): object
    // names and file names.
    QString figureKey() const { return QString::fromLatin1(to_string(figureKind())); }
    // The live plot; the exporter renders it at the figure size and restores it.
    virtual QCustomPlot* figurePlot() = 0;
    // Restyle every series in grey (true) or the Estuary colours (false); replots.
    virtual void setGreyscale(bool on) = 0;
    // While a figure is exported (`exporting`), what marks the moderator
    // slider's value (a handle, its value box, the slider's line) is hidden
    // unless `markSlider`; a mark that is shown names itself ("wind = 8.0").
    // Not exporting: the live look again. Does not replot. Plots without a
    // slider's mark ignore it.
    virtual void setExportLook(bool exporting, bool markSlider) {
        (void)exporting;
        (void)markSlider;
    }
    // The size of the figure about to be exported, in inches: told before
    // setExportLook(true, ...), so a plot can be drawn more compactly for a
    // small figure. Plots that need no change ignore it.
    virtual void setExportSize(double widthIn, double heightIn) {
        (void)widthIn;
        (void)heightIn;
    }
};

}  // namespace moderato::ui
