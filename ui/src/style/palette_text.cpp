#include "style/palette_text.hpp"

#include <QApplication>
#include <QEvent>
#include <QObject>
#include <QPointer>
#include <QWidget>
#include <algorithm>
#include <cmath>

#include "style/estuary.hpp"

namespace moderato::ui {

namespace {

double channel(double v) {
    // sRGB to linear light (WCAG 2 definition).
    return v <= 0.04045 ? v / 12.92 : std::pow((v + 0.055) / 1.055, 2.4);
}

QColor mix(const QColor& a, const QColor& b, double t) {
    const auto m = [t](int x, int y) { return static_cast<int>(std::lround(x + (y - x) * t)); };
    return QColor(m(a.red(), b.red()), m(a.green(), b.green()), m(a.blue(), b.blue()));
}

}  // namespace

double relativeLuminance(const QColor& c) {
    return 0.2126 * channel(c.redF()) + 0.7152 * channel(c.greenF()) + 0.0722 * channel(c.blueF());
}

double contrastRatio(const QColor& a, const QColor& b) {
    const double la = relativeLuminance(a), lb = relativeLuminance(b);
    return (std::max(la, lb) + 0.05) / (std::min(la, lb) + 0.05);
}

QColor readableOn(const QColor& colour, const QColor& background, double minimumRatio) {
    QColor c = colour;
    c.setAlpha(255);
    if (contrastRatio(c, background) >= minimumRatio) return c;
    const QColor toward = relativeLuminance(background) > 0.18 ? QColor(Qt::black) : QColor(Qt::white);
    for (int step = 1; step <= 20; ++step) {
        const QColor m = mix(c, toward, step / 20.0);
        if (contrastRatio(m, background) >= minimumRatio) return m;
    }
    return toward;
}

QColor mutedText(const QPalette& palette, QPalette::ColorRole background) {
    const QColor bg = palette.color(background);
    const QPalette::ColorRole textRole = background == QPalette::Base ? QPalette::Text : QPalette::WindowText;
    return readableOn(mix(palette.color(textRole), bg, 0.33), bg);
}

QColor beyondRowBackground(const QPalette& palette) {
    const QColor base = palette.color(QPalette::Base);
    const QColor text = palette.color(QPalette::Text);
    if (relativeLuminance(base) > relativeLuminance(text)) return estuary::beyond;
    return mix(base, text, 0.10);
}

QString cssColour(const QColor& c) { return c.name(QColor::HexRgb); }

namespace {

// Re-applies a widget's text colour when the application palette changes.
class TextColourKeeper : public QObject {
public:
    TextColourKeeper(QWidget* w, QPalette::ColorRole background, QColor accent)
        : QObject(w), widget_(w), background_(background), accent_(accent) {
        w->installEventFilter(this);
        apply();
    }
    void setAccent(const QColor& c) {
        accent_ = c;
        apply();
    }
    void apply() {
        if (!widget_) return;
        const QPalette app = QApplication::palette(widget_);
        QPalette p = widget_->palette();
        if (accent_.isValid()) {
            const QColor c = readableOn(accent_, app.color(background_));
            p.setColor(QPalette::WindowText, c);
            p.setColor(QPalette::Text, c);
        } else if (muted_) {
            p.setColor(QPalette::WindowText, mutedText(app, QPalette::Window));
            p.setColor(QPalette::Text, mutedText(app, QPalette::Base));
        } else {
            p.setColor(QPalette::WindowText, app.color(QPalette::WindowText));
            p.setColor(QPalette::Text, app.color(QPalette::Text));
        }
        if (p == widget_->palette() && p.resolveMask() == widget_->palette().resolveMask()) return;
        applying_ = true;
        widget_->setPalette(p);
        applying_ = false;
    }
    bool muted_ = false;

protected:
    bool eventFilter(QObject* o, QEvent* e) override {
        // The application palette changed (a light or dark desktop): the quiet
        // colour is recomputed from it. Setting it sends one more PaletteChange,
        // which finds nothing left to change.
        if (o == widget_ && !applying_ &&
            (e->type() == QEvent::ApplicationPaletteChange || e->type() == QEvent::PaletteChange))
            apply();
        return false;
    }

private:
    QPointer<QWidget> widget_;
    QPalette::ColorRole background_;
    QColor accent_;
    bool applying_ = false;
};

TextColourKeeper* keeper(QWidget* w, QPalette::ColorRole background) {
    for (QObject* child : w->children())
        if (auto* k = dynamic_cast<TextColourKeeper*>(child)) return k;
    return new TextColourKeeper(w, background, QColor());
}

}  // namespace

void keepMutedText(QWidget* widget, QPalette::ColorRole background) {
    TextColourKeeper* k = keeper(widget, background);
    k->muted_ = true;
    k->setAccent(QColor());
}

void keepAccentText(QWidget* widget, const QColor& colour) {
    TextColourKeeper* k = keeper(widget, QPalette::Window);
    k->muted_ = false;
    k->setAccent(colour);
}

}  // namespace moderato::ui
