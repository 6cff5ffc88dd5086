// Text colours for the widgets around the plots, taken from the palette so
// they stay readable on a light or a dark desktop. (The plots themselves keep
// white backgrounds and Estuary ink, LOOK.md; this is for everything else.)
#pragma once

#include <QColor>
#include <QPalette>
#include <QString>

class QWidget;

namespace moderato::ui {

// WCAG 2 relative luminance of an opaque colour (0 black .. 1 white).
double relativeLuminance(const QColor& c);
// WCAG 2 contrast ratio of two opaque colours (1 .. 21).
double contrastRatio(const QColor& a, const QColor& b);

// Secondary text (subtitles, captions, notes): the palette's text colour
// moved a third of the way toward its background, so it reads as quieter
// but keeps a contrast of at least 4.5:1.
QColor mutedText(const QPalette& palette, QPalette::ColorRole background = QPalette::Window);
// `colour` itself when it contrasts with `background` by at least
// `minimumRatio`, else the nearest mix of it with black or white that does
// (for accent colours used as text: errors, warnings).
QColor readableOn(const QColor& colour, const QColor& background, double minimumRatio = 4.5);
// The shading of a table row beyond the data: Estuary's "beyond the data"
// fill on a light base, a slightly lifted base on a dark one.
QColor beyondRowBackground(const QPalette& palette);
// Gives `widget` the muted text colour of the application palette (its
// WindowText and Text roles) and keeps it so when the desktop switches
// between light and dark while the program runs.
void keepMutedText(QWidget* widget, QPalette::ColorRole background = QPalette::Window);
// The same for an accent colour used as text (errors): `colour` made
// readable on the palette's background, kept across palette changes.
// An invalid colour restores the palette's own text colour.
void keepAccentText(QWidget* widget, const QColor& colour);
// "#rrggbb" for rich text.
QString cssColour(const QColor& c);

}  // namespace moderato::ui
