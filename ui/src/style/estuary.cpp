#include "style/estuary.hpp"

#include <array>
#include <cmath>

namespace moderato::ui::estuary {

namespace {
const std::array<QColor, seriesCount> kSeries{QColor(0x1F, 0x6F, 0x8B), QColor(0xC8, 0x55, 0x3D),
                                              QColor(0x6A, 0x99, 0x4E), QColor(0x8E, 0x55, 0x72),
                                              QColor(0xE0, 0xA5, 0x26), QColor(0x4A, 0x4E, 0x69)};
int wrap(int k, int n) { return ((k % n) + n) % n; }
}  // namespace

QColor series(int k) { return kSeries[static_cast<std::size_t>(wrap(k, seriesCount))]; }

QColor toGrey(const QColor& c) {
    // Rec. 709 luma (common practice), keeping the alpha.
    const int g = static_cast<int>(std::lround(0.2126 * c.red() + 0.7152 * c.green() + 0.0722 * c.blue()));
    return QColor(g, g, g, c.alpha());
}

Qt::PenStyle lineStyle(int k) {
    static const Qt::PenStyle styles[] = {Qt::SolidLine, Qt::DashLine, Qt::DashDotLine, Qt::DotLine};
    return styles[wrap(k, 4)];
}

int markerShape(int k) {
    // QCPScatterStyle (2.1): ssCircle = 4, ssSquare = 6, ssTriangle = 9, ssDiamond = 7, ssCross = 2, ssPlus = 3
    static const int shapes[] = {4, 6, 9, 7, 2, 3};
    return shapes[wrap(k, 6)];
}

QColor withAlpha(QColor c, double opacity) {
    c.setAlphaF(static_cast<float>(opacity));
    return c;
}

QPen seriesPen(int k, double width, bool greyscale) {
    QPen pen(greyscale ? toGrey(series(k)) : series(k));
    pen.setWidthF(width);
    pen.setStyle(lineStyle(k));
    return pen;
}

QBrush bandBrush(int k, bool greyscale) {
    const QColor c = greyscale ? toGrey(series(k)) : series(k);
    return QBrush(withAlpha(c, bandOpacity));
}

QBrush significanceBrush(bool greyscale) {
    const QColor c = greyscale ? toGrey(series(0)) : series(0);
    return QBrush(withAlpha(c, significanceOpacity));
}

QBrush notSignificantBrush() { return QBrush(withAlpha(notSignificant, notSignificantOpacity), Qt::BDiagPattern); }

}  // namespace moderato::ui::estuary
