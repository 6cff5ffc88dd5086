#include "shell/app_style.hpp"

#include <QApplication>
#include <QPalette>

#include "style/estuary.hpp"

namespace moderato::ui {

bool darkPalette() {
    const QPalette p = QApplication::palette();
    return p.color(QPalette::Window).lightness() < p.color(QPalette::WindowText).lightness();
}

void applyAppStyle(QApplication& app) {
    QPalette p = app.palette();
    // Highlight in the first series colour (lighter on a dark desktop).
    const QColor accent = darkPalette() ? estuary::series(0).lighter(150) : estuary::series(0);
    p.setColor(QPalette::Highlight, accent);
    p.setColor(QPalette::HighlightedText, darkPalette() ? QColor(Qt::black) : QColor(Qt::white));
    app.setPalette(p);
}

}  // namespace moderato::ui
