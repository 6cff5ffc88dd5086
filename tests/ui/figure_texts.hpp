// Every text an exported figure draws, where and in which colour: a paint
// device whose engine draws nothing and records each run of text (its
// rectangle from the font's ascent, descent and advance, mapped to the
// figure; the clip the painter had; its pen colour). The figure is drawn by
// FigureExporter::paint, the drawing every export format makes.
#pragma once

#include <QColor>
#include <QList>
#include <QPaintDevice>
#include <QPaintEngine>
#include <QPainter>
#include <QRectF>
#include <QString>
#include <QTextItem>
#include <cmath>

#include "export/figure_exporter.hpp"

namespace moderato::test {

struct DrawnText {
    QString text;
    QRectF rect;  // in the figure's units (1/L inch, FigureExporter::layoutSize)
    QRectF clip;  // the painter's clip then (empty: none)
    QColor colour;
};

class TextRecordingEngine : public QPaintEngine {
public:
    TextRecordingEngine() : QPaintEngine(QPaintEngine::AllFeatures) {}
    bool begin(QPaintDevice*) override { return true; }
    bool end() override { return true; }
    void updateState(const QPaintEngineState&) override {}
    void drawPixmap(const QRectF&, const QPixmap&, const QRectF&) override {}
    void drawImage(const QRectF&, const QImage&, const QRectF&, Qt::ImageConversionFlags) override {}
    void drawTiledPixmap(const QRectF&, const QPixmap&, const QPointF&) override {}
    void drawPath(const QPainterPath&) override {}
    void drawPolygon(const QPointF*, int, PolygonDrawMode) override {}
    void drawPolygon(const QPoint*, int, PolygonDrawMode) override {}
    void drawTextItem(const QPointF& p, const QTextItem& item) override {
        const QPainter* pa = painter();
        const QTransform t = pa->combinedTransform();
        DrawnText d;
        d.text = item.text();
        d.rect = t.mapRect(QRectF(p.x(), p.y() - item.ascent(), item.width(), item.ascent() + item.descent()));
        if (pa->hasClipping()) d.clip = t.mapRect(pa->clipBoundingRect());
        d.colour = pa->pen().color();
        if (!d.text.trimmed().isEmpty()) texts << d;
    }
    Type type() const override { return QPaintEngine::User; }

    QList<DrawnText> texts;
};

class TextRecorder : public QPaintDevice {
public:
    TextRecorder(QSize size, int dpi) : size_(size), dpi_(dpi) {}
    ~TextRecorder() override = default;
    QPaintEngine* paintEngine() const override { return &engine_; }
    const QList<DrawnText>& texts() const { return engine_.texts; }

protected:
    int metric(PaintDeviceMetric m) const override {
        switch (m) {
            case PdmWidth:
                return size_.width();
            case PdmHeight:
                return size_.height();
            case PdmWidthMM:
                return static_cast<int>(std::lround(size_.width() * 25.4 / dpi_));
            case PdmHeightMM:
                return static_cast<int>(std::lround(size_.height() * 25.4 / dpi_));
            case PdmNumColors:
                return 0x7fffffff;
            case PdmDepth:
                return 32;
            case PdmDpiX:
            case PdmDpiY:
            case PdmPhysicalDpiX:
            case PdmPhysicalDpiY:
                return dpi_;
            case PdmDevicePixelRatio:
                return 1;
            case PdmDevicePixelRatioScaled:
                return static_cast<int>(devicePixelRatioFScale());
            default:
                return QPaintDevice::metric(m);
        }
    }

private:
    QSize size_;
    int dpi_;
    mutable TextRecordingEngine engine_;
};

// The texts of `source` drawn as an export with `settings` and `caption`.
inline QList<DrawnText> figureTexts(ui::FigureSource* source, const FigureSettings& settings,
                                    const QString& caption = {}) {
    const ui::FigureExporter exporter(source, settings, caption);
    TextRecorder device(ui::FigureExporter::layoutSize(settings), ui::FigureExporter::layoutDpi());
    exporter.paint(&device);
    return device.texts();
}

}  // namespace moderato::test
