// Small pieces shared by the Specify and Estimates sections: headings,
// muted hint text, tinted message banners.
#pragma once

#include <QColor>
#include <QString>

class QLabel;
class QWidget;

namespace moderato::ui {

// A style-sheet colour with transparency: "rgba(r, g, b, a)".
QString cssRgba(const QColor& c, double opacity);
// A bold heading a little larger than the text.
QLabel* sectionHeading(const QString& text, QWidget* parent);
// Wrapped text in the palette's muted (disabled) text colour.
QLabel* mutedLabel(QWidget* parent);
// A banner: the colour at 14 % behind the text, a border in the colour.
QString bannerStyle(const QColor& c);

}  // namespace moderato::ui
