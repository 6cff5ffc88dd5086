// A plot that can be exported as a figure (see export/figure_exporter.hpp).
#pragma once

#include <QString>

class QCustomPlot;

namespace moderato::ui {

class FigureSource {
public:
    virtual ~FigureSource() = default;
    // "Lines plot", "Effect plot", ... (also the default file name).
    virtual QString figureName() const = 0;
    // The plot key stored in the project ("lines", "effect", "surface", "cells",
    // "residuals", "qq", "influence").
    virtual QString figureKey() const = 0;
    // The live plot; the exporter renders it at the figure size and restores it.
    virtual QCustomPlot* figurePlot() = 0;
    // Restyle every series in grey (true) or the Estuary colours (false); replots.
    virtual void setGreyscale(bool on) = 0;
};

}  // namespace moderato::ui
