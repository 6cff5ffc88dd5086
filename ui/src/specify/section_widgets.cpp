#include "specify/section_widgets.hpp"
#include "style/palette_text.hpp"

#include <QLabel>
#include <QPalette>

namespace moderato::ui {

QString cssRgba(const QColor& c, double opacity) {
    return QStringLiteral("rgba(%1, %2, %3, %4)").arg(c.red()).arg(c.green()).arg(c.blue()).arg(opacity);
}

QLabel* sectionHeading(const QString& text, QWidget* parent) {
    auto* l = new QLabel(text, parent);
    QFont f = l->font();
    f.setBold(true);
    f.setPointSizeF(f.pointSizeF() * 1.08);
    l->setFont(f);
    return l;
}

QLabel* mutedLabel(QWidget* parent) {
    auto* l = new QLabel(parent);
    l->setWordWrap(true);
    keepMutedText(l);  // quieter than the body text, readable on a light or dark desktop
    return l;
}

QString bannerStyle(const QColor& c) {
    return QStringLiteral("QLabel { background: %1; border: 1px solid %2; border-radius: 4px; padding: 6px 8px; }")
        .arg(cssRgba(c, 0.14), c.name());
}

}  // namespace moderato::ui
