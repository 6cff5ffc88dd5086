#include "export/figure_exporter.hpp"
#include "export/pdf_stamp.hpp"

#include <qcustomplot.h>

#include <QBuffer>
#include <QClipboard>
#include <QDir>
#include <QFileInfo>
#include <QFontMetricsF>
#include <QGuiApplication>
#include <QMetaProperty>
#include <QPageLayout>
#include <QPageSize>
#include <QPdfWriter>
#include <QPointer>
#include <QRegularExpression>
#include <QSvgGenerator>
#include <algorithm>
#include <cmath>
#include <functional>
#include <string>
#include <string_view>
#include <vector>

#include "moderato/support/file_util.hpp"
#include "plots/figure_source.hpp"
#include "plots/probe_plot_util.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

QString figureFormatSuffix(FigureFormat format) {
    switch (format) {
        case FigureFormat::Png:
            return QStringLiteral("png");
        case FigureFormat::Svg:
            return QStringLiteral("svg");
        case FigureFormat::Pdf:
            return QStringLiteral("pdf");
    }
    return {};
}

std::optional<FigureFormat> figureFormatForPath(const QString& path) {
    const QString suffix = QFileInfo(path).suffix().toLower();
    for (FigureFormat f : {FigureFormat::Png, FigureFormat::Svg, FigureFormat::Pdf})
        if (suffix == figureFormatSuffix(f)) return f;
    return std::nullopt;
}

const QList<FigurePreset>& figurePresets() {
    // LOOK.md, "Figures for memos".
    static const QList<FigurePreset> presets{
        {SizePreset::Memo, QObject::tr("Memo (6.5 × 4 in)"), 6.5, 4.0},
        {SizePreset::SingleColumn, QObject::tr("Single column (3.5 × 2.6 in)"), 3.5, 2.6},
        {SizePreset::TwoColumn, QObject::tr("Two column (7 × 4.3 in)"), 7.0, 4.3},
        {SizePreset::Slide, QObject::tr("Slide (10 × 5.63 in)"), 10.0, 5.63},
    };
    return presets;
}

const FigurePreset* findFigurePreset(SizePreset key) {
    for (const FigurePreset& p : figurePresets())
        if (p.key == key) return &p;
    return nullptr;
}

namespace {

using L = FigureLimits;  // the one set of limits, shared with the project loader

QFont exportFont(const QFont& original, const FigureSettings& s, double factor) {
    QFont f = original;
    if (!s.font_family.empty()) f.setFamilies({QString::fromStdString(s.font_family)});
    f.setPointSizeF(s.font_pt * factor);
    return f;
}

QColor grey(const QColor& c) { return c.isValid() ? estuary::toGrey(c) : c; }

// `text` broken at spaces into lines no wider than `room` (a single long word keeps its line).
QString wrapWords(const QString& text, const QFontMetricsF& fm, double room) {
    QStringList lines;
    for (const QString& word : text.split(QLatin1Char(' '))) {
        if (!lines.isEmpty() && fm.horizontalAdvance(lines.last() + QLatin1Char(' ') + word) <= room)
            lines.last() += QLatin1Char(' ') + word;
        else lines << word;
    }
    return lines.join(QLatin1Char('\n'));
}

// Lays `plot` out at the figure's `size`, lets `read` take what it needs
// from that layout, and gives the plot its own viewport back.
void atFigureSize(QCustomPlot* plot, QSize size, const std::function<void()>& read) {
    const QRect viewport = plot->viewport();
    plot->setViewport(QRect(QPoint(0, 0), size));
    for (auto phase : {QCPLayoutElement::upPreparation, QCPLayoutElement::upMargins, QCPLayoutElement::upLayout})
        plot->plotLayout()->update(phase);
    read();
    plot->setViewport(viewport);
}

QPen greyPen(QPen p) {
    QBrush b = p.brush();
    b.setColor(grey(b.color()));
    p.setBrush(b);
    return p;
}

QBrush greyBrush(QBrush b) {
    if (b.style() == Qt::NoBrush) return b;
    if (const QGradient* g = b.gradient()) {
        QGradient copy = *g;
        QGradientStops stops = copy.stops();
        for (auto& stop : stops) stop.second = grey(stop.second);
        copy.setStops(stops);
        QBrush out(copy);
        out.setTransform(b.transform());
        return out;
    }
    b.setColor(grey(b.color()));
    return b;
}

// Applies the figure's font and greyscale to a live plot for one export and
// restores every value it changed (and the source's colours) when destroyed.
class ExportState {
public:
    // `size`: the figure's size in the units the plot is laid out in.
    ExportState(FigureSource* source, QCustomPlot* plot, const FigureSettings& s, QSize size)
        : source_(source), plot_(plot), greyscale_(s.greyscale) {
        const int width = size.width();
        if (greyscale_) source_->setGreyscale(true);
        source_->setExportSize(s.width_in, s.height_in);
        source_->setExportLook(true, s.mark_slider);
        // Everything QCustomPlot draws is a layerable owned by the plot; its
        // pens, brushes, colours and fonts are properties. All values are read
        // before any is written: some setters pass theirs on (a legend's font
        // goes to its items).
        std::vector<QVariant> changed;
        for (QCPLayerable* layerable : plot->findChildren<QCPLayerable*>()) {
            const QMetaObject* mo = layerable->metaObject();
            const bool title = qobject_cast<QCPTextElement*>(layerable) != nullptr &&
                               layerable->objectName() != QLatin1String(kPanelCaptionName) &&
                               layerable->objectName() != QLatin1String(kSmallTextName);
            for (int i = 0; i < mo->propertyCount(); ++i) {
                const QMetaProperty prop = mo->property(i);
                if (!prop.isReadable() || !prop.isWritable()) continue;
                const int type = prop.metaType().id();
                const QVariant value = prop.read(layerable);
                QVariant next;
                if (type == QMetaType::QFont) {
                    const bool small = layerable->objectName() == QLatin1String(kSmallTextName);
                    next = exportFont(value.value<QFont>(), s, title ? 1.2 : small ? kSmallTextScale : 1.0);
                } else if (!greyscale_) {
                    continue;
                } else if (type == QMetaType::QPen) {
                    next = greyPen(value.value<QPen>());
                } else if (type == QMetaType::QBrush) {
                    next = greyBrush(value.value<QBrush>());
                } else if (type == QMetaType::QColor) {
                    next = grey(value.value<QColor>());
                } else if (type == qMetaTypeId<QCPScatterStyle>()) {
                    QCPScatterStyle style = value.value<QCPScatterStyle>();
                    style.setPen(greyPen(style.pen()));
                    style.setBrush(greyBrush(style.brush()));
                    next = QVariant::fromValue(style);
                } else if (type == qMetaTypeId<QCPColorGradient>()) {
                    QCPColorGradient gradient = value.value<QCPColorGradient>();
                    QMap<double, QColor> stops = gradient.colorStops();
                    for (auto it = stops.begin(); it != stops.end(); ++it) it.value() = grey(it.value());
                    gradient.setColorStops(stops);
                    next = QVariant::fromValue(gradient);
                } else {
                    continue;
                }
                saved_.push_back({layerable, prop, value});
                changed.push_back(next);
            }
        }
        for (std::size_t i = 0; i < saved_.size(); ++i) saved_[i].property.write(saved_[i].object, changed[i]);
        // A legend in a row of its own is wrapped for the live plot's width:
        // wrap it again for the figure's width and font, or its entries are cut off.
        QCPLegend* legend = plot->legend;
        if (legend && legend->visible() && !plot->axisRect()->insetLayout()->elements(false).contains(legend)) {
            legend_ = legend;
            legendWrap_ = legend->wrap();
            legendOrder_ = legend->fillOrder();
            for (int i = 0; i < legend->elementCount(); ++i)  // a wrapped grid has empty cells
                if (QCPAbstractLegendItem* item = legend->item(i)) itemMargins_.push_back({item, item->margins()});
            fitLegend(plot, width);
            shrinkLegend(plot, s, width, size.height());
        }
        // An axis title's lines widen the margin beside the plot area (less room for a title
        // over it), and a title's lines take height from the plot area (less room for an axis
        // title): the axis titles are wrapped again once the titles are.
        wrapAxisLabels(plot, size);
        wrapTextElements(plot, size);
        wrapAxisLabels(plot, size);
    }

    ~ExportState() {
        // In the order recorded: a legend's font and colour pass to its items,
        // so the legend comes back first and each item's own value after it.
        for (const Saved& s : saved_)
            if (s.object) s.property.write(s.object, s.value);
        for (const auto& [axis, label] : labels_)
            if (axis) axis->setLabel(label);
        for (const auto& [element, text] : texts_)
            if (element) element->setText(text);
        if (legend_) {
            legend_->setIconSize(legendIcon_);
            for (const auto& [item, margins] : itemMargins_)
                if (item) item->setMargins(margins);
            legend_->setWrap(legendWrap_);
            legend_->setFillOrder(legendOrder_, true);
        }
        source_->setExportLook(false, false);
        if (greyscale_) source_->setGreyscale(false);
        plot_->replot();  // lays the plot out again at its own size
    }

    ExportState(const ExportState&) = delete;
    ExportState& operator=(const ExportState&) = delete;

private:
    // On a small figure the legend would take the plot's room (and squeezed
    // rows clip their text): smaller type, down to 3 pt below the figure's,
    // until it takes at most a quarter of the height.
    void shrinkLegend(QCustomPlot* plot, const FigureSettings& s, int width, int height) {
        QCPLegend* legend = plot->legend;
        legendIcon_ = legend->iconSize();
        const double limit = height / 4.0;
        for (double pt = s.font_pt;; pt -= 0.5) {
            if (legend->minimumOuterSizeHint().height() <= limit) return;
            if (pt - 0.5 < std::max(5.0, s.font_pt - 3.0)) return;
            QFont f = legend->font();
            f.setPointSizeF(pt - 0.5);
            legend->setFont(f);  // passes to the items
            const double k = (pt - 0.5) / s.font_pt;
            legend->setIconSize(QSize(std::max(8, static_cast<int>(legendIcon_.width() * k)),
                                      std::max(6, static_cast<int>(legendIcon_.height() * k))));
            fitLegend(plot, width);
        }
    }

    // An axis title longer than its axis is broken into two lines near the
    // middle (panels stacked in one plot share its height).
    void wrapAxisLabels(QCustomPlot* plot, QSize size) {
        // The room of each axis title: its side of the plot area at the figure's size.
        std::vector<std::pair<QCPAxis*, double>> rooms;
        atFigureSize(plot, size, [&] {
            for (QCPAxisRect* rect : plot->axisRects())
                for (QCPAxis* axis : rect->axes())
                    rooms.emplace_back(axis, axis->orientation() == Qt::Vertical
                                                 ? rect->height() - 4.0
                                                 : std::min(size.width() * 0.85, rect->width() - 4.0));
        });
        for (const auto& [axis, room] : rooms) wrapAxisLabel(axis, room);
    }

    // Breaks an axis title at spaces into lines no longer than `room`; a
    // title that fits on two lines breaks at the space nearest its middle.
    void wrapAxisLabel(QCPAxis* axis, double room) {
        // A title wrapped before is wrapped again from its own text.
        const auto earlier =
            std::find_if(labels_.begin(), labels_.end(), [&](const auto& l) { return l.first == axis; });
        const QString label = earlier != labels_.end() ? earlier->second : axis->label();
        const QFontMetricsF fm(axis->labelFont());
        if (label.isEmpty() || label.contains(QLatin1Char('\n')) || fm.horizontalAdvance(label) <= room) return;
        int best = -1;
        for (int i = 0; i < label.size(); ++i)
            if (label[i] == QLatin1Char(' ') &&
                (best < 0 || std::abs(i - label.size() / 2) < std::abs(best - label.size() / 2)))
                best = i;
        if (best < 0) return;
        if (earlier == labels_.end()) labels_.push_back({axis, label});
        QString wrapped = label;
        wrapped[best] = QLatin1Char('\n');
        bool fits = true;
        for (const QString& line : wrapped.split(QLatin1Char('\n'))) fits = fits && fm.horizontalAdvance(line) <= room;
        if (!fits) wrapped = wrapWords(label, fm, room);
        axis->setLabel(wrapped);
    }

    // A title or caption wider than its place in the figure's layout (a
    // layout pass at the figure's size says how wide that is) is broken at
    // spaces into lines that fit.
    void wrapTextElements(QCustomPlot* plot, QSize size) {
        // Each text's room is its cell's width without it: a long text
        // widens its column (the Surface plot's title squeezes the colour
        // scale's), and the room it leaves once wrapped is less.
        std::vector<std::pair<QCPTextElement*, QString>> texts;
        for (QCPTextElement* element : plot->findChildren<QCPTextElement*>())
            if (element->visible()) {
                texts.emplace_back(element, element->text());
                element->setText(QString());
            }
        std::vector<double> rooms;
        atFigureSize(plot, size, [&] {
            for (const auto& [element, text] : texts)
                rooms.push_back(std::min<double>(size.width(), element->rect().width()) - 4);
        });
        for (std::size_t i = 0; i < texts.size(); ++i) {
            const auto& [element, text] = texts[i];
            element->setText(text);
            const QFontMetricsF fm(element->font());
            if (text.isEmpty() || text.contains(QLatin1Char('\n')) || fm.horizontalAdvance(text) <= rooms[i]) continue;
            texts_.push_back({element, text});
            element->setText(wrapWords(text, fm, rooms[i]));
        }
    }

    struct Saved {
        QPointer<QObject> object;
        QMetaProperty property;
        QVariant value;
    };
    FigureSource* source_;
    QCustomPlot* plot_;
    bool greyscale_;
    std::vector<Saved> saved_;
    QPointer<QCPLegend> legend_;
    int legendWrap_ = 0;
    QCPLayoutGrid::FillOrder legendOrder_ = QCPLayoutGrid::foColumnsFirst;
    std::vector<std::pair<QPointer<QCPAbstractLegendItem>, QMargins>> itemMargins_;
    QSize legendIcon_;
    std::vector<std::pair<QPointer<QCPAxis>, QString>> labels_;
    std::vector<std::pair<QPointer<QCPTextElement>, QString>> texts_;
};

// Draws the plot and the caption under it into `logical` (units of 1/L inch).
// The caption is drawn by the painter below the plot rather than added to the
// plot's layout, so long captions wrap and the live layout is never touched.
void paintFigure(QCPPainter& painter, QCustomPlot* plot, QSize logical, const FigureSettings& s,
                 const QString& caption) {
    painter.setMode(QCPPainter::pmNoCaching);
    painter.setMode(QCPPainter::pmNonCosmetic);
    painter.fillRect(QRect(QPoint(0, 0), logical), Qt::white);
    QFont captionFont = exportFont(QFont(), s, 1.0);
    captionFont.setPointSizeF(std::max(6.0, s.font_pt - 1.0));
    captionFont.setItalic(true);
    int captionHeight = 0;
    QRectF textRect;
    const int flags = Qt::AlignHCenter | Qt::AlignTop | Qt::TextWordWrap;
    if (!caption.isEmpty()) {
        const QFontMetricsF fm(captionFont);
        const double margin = std::ceil(fm.height() * 0.6);
        const QRectF bounds =
            fm.boundingRect(QRectF(0, 0, std::max(1.0, logical.width() - 2 * margin), 1e6), flags, caption);
        captionHeight = static_cast<int>(std::ceil(bounds.height() + 1.5 * margin));
        captionHeight = std::min(captionHeight, logical.height() / 2);
        textRect = QRectF(margin, logical.height() - captionHeight + 0.5 * margin, logical.width() - 2 * margin,
                          captionHeight - 0.5 * margin);
    }
    plot->toPainter(&painter, logical.width(), std::max(1, logical.height() - captionHeight));
    if (!caption.isEmpty()) {
        painter.save();
        painter.setFont(captionFont);
        painter.setPen(s.greyscale ? estuary::toGrey(estuary::ink) : estuary::ink);
        painter.drawText(textRect, flags, caption);
        painter.restore();
    }
}

}  // namespace

QString validateFigureSettings(const FigureSettings& s) {
    if (!(s.width_in >= L::min_inches && s.width_in <= L::max_inches) ||
        !(s.height_in >= L::min_inches && s.height_in <= L::max_inches))
        return QObject::tr("the size %1 × %2 in is outside %3–%4 in")
            .arg(s.width_in)
            .arg(s.height_in)
            .arg(L::min_inches)
            .arg(L::max_inches);
    if (s.dpi < L::min_dpi || s.dpi > L::max_dpi)
        return QObject::tr("the resolution %1 DPI is outside %2–%3 DPI").arg(s.dpi).arg(L::min_dpi).arg(L::max_dpi);
    if (!L::pixels_fit(s.width_in, s.height_in, s.dpi)) {
        const QSize px = FigureExporter::pixelSize(s);
        return QObject::tr(
                   "%1 × %2 pixels is over the limit of %3 megapixels for a figure; at %4 × %5 in the "
                   "resolution may be at most %6 DPI")
            .arg(px.width())
            .arg(px.height())
            .arg(L::max_pixels / 1e6)
            .arg(s.width_in)
            .arg(s.height_in)
            .arg(L::max_dpi_for(s.width_in, s.height_in));
    }
    if (!(s.font_pt >= L::min_font_pt && s.font_pt <= L::max_font_pt))
        return QObject::tr("the font size %1 pt is outside %2–%3 pt")
            .arg(s.font_pt)
            .arg(L::min_font_pt)
            .arg(L::max_font_pt);
    return {};
}

FigureExporter::FigureExporter(FigureSource* source, const FigureSettings& settings, const QString& caption)
    : source_(source), settings_(settings), caption_(settings.caption ? caption.trimmed() : QString()) {}

// The resolution QFontMetrics assumes for a font without a paint device.
// QCustomPlot measures text that way while laying out, so every figure is
// laid out in units of 1/L inch and drawn on a device of L dots per inch:
// text is measured and drawn alike, and a 9 pt font is 9 pt on the page.
int FigureExporter::layoutDpi() {
    const QImage probe(1, 1, QImage::Format_ARGB32);  // a fresh image carries the default resolution
    return std::max(1, probe.logicalDpiY());
}

QSize FigureExporter::layoutSize(const FigureSettings& s) {
    const int L = layoutDpi();
    return {static_cast<int>(std::lround(s.width_in * L)), static_cast<int>(std::lround(s.height_in * L))};
}

QSize FigureExporter::pixelSize(const FigureSettings& s) {
    const auto side = [&](double inches) {
        return static_cast<int>(std::clamp<long long>(L::side_pixels(inches, s.dpi), 0, 1 << 30));
    };
    return {side(s.width_in), side(s.height_in)};
}

QImage FigureExporter::renderImage() const {
    // Over the pixel limit nothing is allocated: a null image, which every
    // caller reports as a figure that could not be drawn.
    if (!L::pixels_fit(settings_.width_in, settings_.height_in, settings_.dpi)) return {};
    const QSize px = pixelSize(settings_);
    QImage image(px, QImage::Format_ARGB32_Premultiplied);
    if (image.isNull()) return image;
    image.fill(Qt::white);
    QCustomPlot* plot = source_->figurePlot();
    {
        const double L = layoutDpi();
        const double scale = settings_.dpi / L;  // the image keeps its default resolution (L) while painting
        const QSize logical(std::max(1, static_cast<int>(std::lround(px.width() / scale))),
                            std::max(1, static_cast<int>(std::lround(px.height() / scale))));
        ExportState state(source_, plot, settings_, logical);
        QCPPainter painter(&image);
        painter.scale(scale, scale);
        paintFigure(painter, plot, logical, settings_, caption_);
        painter.end();
    }
    // Greyscale: the series are grey already; converting the pixels makes sure
    // nothing coloured remains (and writes an 8-bit grey PNG).
    image = image.convertToFormat(settings_.greyscale ? QImage::Format_Grayscale8 : QImage::Format_RGB32);
    const int dotsPerMeter = static_cast<int>(std::lround(settings_.dpi / 0.0254));
    image.setDotsPerMeterX(dotsPerMeter);
    image.setDotsPerMeterY(dotsPerMeter);
    return image;
}

QByteArray FigureExporter::renderSvg() const {
    const int L = layoutDpi();
    const QSize logical = layoutSize(settings_);
    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    QSvgGenerator generator;
    generator.setOutputDevice(&buffer);
    generator.setResolution(L);
    generator.setSize(logical);
    generator.setViewBox(QRect(QPoint(0, 0), logical));
    // Qt 6.4's generator writes the title and description without escaping
    // them, so a '<' or '&' in a column name would break the XML (or make
    // elements). Plain placeholders go in; the escaped text replaces them below.
    static const QString titleMark = QStringLiteral("MODERATO-SVG-TITLE-MARK");
    static const QString descMark = QStringLiteral("MODERATO-SVG-DESCRIPTION-MARK");
    generator.setTitle(titleMark);
    generator.setDescription(descMark);
    QCustomPlot* plot = source_->figurePlot();
    {
        ExportState state(source_, plot, settings_, logical);
        QCPPainter painter;
        if (!painter.begin(&generator)) return {};
        painter.setMode(QCPPainter::pmVectorized);
        paintFigure(painter, plot, logical, settings_, caption_);
        painter.end();
    }
    // The generator states the size from whole units of 1/L inch; state the
    // figure's exact size instead (the view box scales the drawing to it).
    QString svg = QString::fromUtf8(buffer.data());
    const auto replaceFirst = [&svg](const QString& mark, const QString& text) {
        const qsizetype at = svg.indexOf(mark);
        if (at >= 0) svg.replace(at, mark.size(), text.toHtmlEscaped());
    };
    replaceFirst(titleMark, source_->figureName());
    replaceFirst(descMark, caption_.isEmpty() ? QObject::tr("Made with Moderato") : caption_);
    static const QRegularExpression size(QStringLiteral("<svg width=\"[^\"]*\" height=\"[^\"]*\""));
    svg.replace(size, QStringLiteral("<svg width=\"%1mm\" height=\"%2mm\"")
                          .arg(QString::number(settings_.width_in * 25.4, 'g', 10),
                               QString::number(settings_.height_in * 25.4, 'g', 10)));
    return svg.toUtf8();
}

QByteArray FigureExporter::renderPdf() const {
    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    QCustomPlot* plot = source_->figurePlot();
    {
        QPdfWriter writer(&buffer);
        writer.setResolution(layoutDpi());
        prepareDeterministicPdf(writer, source_->figureName());
        QPageLayout layout(QPageSize(QSizeF(settings_.width_in, settings_.height_in), QPageSize::Inch, QString(),
                                     QPageSize::ExactMatch),
                           QPageLayout::Portrait, QMarginsF(0, 0, 0, 0), QPageLayout::Point);
        layout.setMode(QPageLayout::FullPageMode);
        writer.setPageLayout(layout);
        ExportState state(source_, plot, settings_, QSize(writer.width(), writer.height()));
        QCPPainter painter;
        if (!painter.begin(&writer)) return {};
        painter.setMode(QCPPainter::pmVectorized);
        paintFigure(painter, plot, QSize(writer.width(), writer.height()), settings_, caption_);
        painter.end();
    }
    QByteArray pdf = buffer.data();
    stabilisePdf(pdf);
    return pdf;
}

void FigureExporter::paint(QPaintDevice* device) const {
    const QSize logical = layoutSize(settings_);
    QCustomPlot* plot = source_->figurePlot();
    ExportState state(source_, plot, settings_, logical);
    QCPPainter painter;
    if (!painter.begin(device)) return;
    painter.setMode(QCPPainter::pmVectorized);
    paintFigure(painter, plot, logical, settings_, caption_);
    painter.end();
}

QByteArray FigureExporter::render(FigureFormat format) const {
    switch (format) {
        case FigureFormat::Png: {
            const QImage image = renderImage();
            if (image.isNull()) return {};
            QBuffer buffer;
            buffer.open(QIODevice::WriteOnly);
            if (!image.save(&buffer, "PNG")) return {};
            return buffer.data();
        }
        case FigureFormat::Svg:
            return renderSvg();
        case FigureFormat::Pdf:
            return renderPdf();
    }
    return {};
}

bool FigureExporter::save(const QString& path, FigureFormat format, QString* error) const {
    const QString shown = QDir::toNativeSeparators(QFileInfo(path).absoluteFilePath());
    auto fail = [&](const QString& why) {
        if (error) *error = QObject::tr("Could not write the figure to “%1”: %2.").arg(shown, why);
        return false;
    };
    if (const QString bad = validateFigureSettings(settings_); !bad.isEmpty()) return fail(bad);
    const QByteArray data = render(format);
    if (data.isEmpty()) return fail(QObject::tr("the %1 could not be drawn").arg(figureFormatSuffix(format).toUpper()));
    // Our atomic write (core support/file_util): a temporary file in the same
    // folder, synced, renamed over the target, the folder synced; a killed
    // export leaves the old file whole and a temporary file that the next
    // write into the folder removes.
    const std::string file = path.toStdString();
    try {
        write_file_atomically(file, std::string_view(data.constData(), static_cast<std::size_t>(data.size())));
    } catch (const std::exception& e) {
        std::string why = e.what();  // "<path>: cannot be written (...); the file was left as it was"
        if (why.rfind(file + ": ", 0) == 0) why.erase(0, file.size() + 2);
        return fail(QString::fromStdString(why));
    }
    return true;
}

void FigureExporter::copyToClipboard() const {
    QImage image = renderImage();
    if (image.format() != QImage::Format_RGB32) {
        const int dpmX = image.dotsPerMeterX(), dpmY = image.dotsPerMeterY();
        image = image.convertToFormat(QImage::Format_RGB32);
        image.setDotsPerMeterX(dpmX);
        image.setDotsPerMeterY(dpmY);
    }
    QGuiApplication::clipboard()->setImage(image);
}

}  // namespace moderato::ui
