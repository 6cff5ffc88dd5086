// Application-wide look: the system's light or dark palette is kept (Qt
// follows the desktop); only the accent follows the house colours.
#pragma once

class QApplication;

namespace moderato::ui {

void applyAppStyle(QApplication& app);
// Whether the window palette is dark (the plots keep white backgrounds either way).
bool darkPalette();

}  // namespace moderato::ui
