// A plot that can be exported as a figure (see export/figure_exporter.hpp).
#pragma once

#include <QString>

#include "moderato/project/project.hpp"

class QCustomPlot;

namespace moderato::ui {

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
};

}  // namespace moderato::ui
