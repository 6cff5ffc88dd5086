#include "probe/readout_panel.hpp"

#include <QEvent>
#include <QPainter>
#include <QPainterPath>
#include <algorithm>

#include "common/number_text.hpp"
#include "style/estuary.hpp"

namespace moderato::ui {

namespace {
constexpr int kMargin = 10;
constexpr int kRowGap = 3;

QFont titleFont(const QFont& base) {
    QFont f = base;
    f.setPointSizeF(base.pointSizeF() * 1.2);
    f.setBold(true);
    return f;
}
QFont smallFont(const QFont& base) {
    QFont f = base;
    f.setPointSizeF(base.pointSizeF() * 0.9);
    return f;
}
}  // namespace

ReadoutPanel::ReadoutPanel(QWidget* parent) : QWidget(parent) {
    setObjectName(QStringLiteral("probe-readout"));
    setSizePolicy(QSizePolicy::Preferred, QSizePolicy::Fixed);
    setAttribute(Qt::WA_OpaquePaintEvent, false);
    fitHeight();
}

void ReadoutPanel::setContext(const QString& heading, const QString& statisticName, const QString& intervalName,
                              const QString& statement) {
    heading_ = heading;
    statisticName_ = statisticName;
    intervalName_ = intervalName;
    statement_ = statement;
    fitHeight();
    update();
}

void ReadoutPanel::setPoint(const QString& moderatorLabel, const EffectPoint& point,
                            std::optional<std::pair<double, double>> band, bool stale) {
    const bool rowsChange = band.has_value() != band_.has_value() || !hasPoint_;
    label_ = moderatorLabel;
    point_ = point;
    band_ = band;
    stale_ = stale;
    hasPoint_ = true;
    message_.clear();
    if (rowsChange) fitHeight();
    update();
}

void ReadoutPanel::clear(const QString& message) {
    hasPoint_ = false;
    message_ = message;
    label_.clear();
    band_.reset();
    fitHeight();
    update();
}

QList<ReadoutPanel::Row> ReadoutPanel::rows() const {
    QList<Row> r;
    if (!hasPoint_) return r;
    // The house order of an estimate, as in the pinned values and the memo's tables:
    // effect, interval, SE, test value, p.
    r << Row{tr("effect"), numberText(point_.estimate)};
    r << Row{intervalName_, rangeText(point_.ci_lower, point_.ci_upper)};
    r << Row{tr("SE"), numberText(point_.std_error)};
    r << Row{statisticName_, numberText(point_.statistic)};
    r << Row{tr("p"), pValueText(point_.p_value)};
    if (band_) r << Row{tr("simultaneous band"), rangeText(band_->first, band_->second)};
    return r;
}

QString ReadoutPanel::text() const {
    QStringList lines;
    if (!hasPoint_) return message_;
    lines << label_ + (point_.beyond_data ? tr(" (beyond the data)") : QString());
    lines << heading_;
    for (const Row& r : rows()) lines << r.label + QLatin1Char('\t') + r.value;
    if (stale_) lines << tr("(updates when the drag ends)");
    lines << statement_;
    return lines.join(QLatin1Char('\n'));
}

int ReadoutPanel::idealHeight(int width) const {
    const QFontMetrics title(titleFont(font())), body(font()), small(smallFont(font()));
    int h = kMargin + title.height() + 4;
    if (!hasPoint_) {
        const QRect r = body.boundingRect(QRect(0, 0, std::max(80, width - 2 * kMargin), 2000), Qt::TextWordWrap,
                                          message_.isEmpty() ? QStringLiteral(" ") : message_);
        return h + r.height() + kMargin;
    }
    h += small.height() + 6;  // heading
    h += static_cast<int>(rows().size()) * (body.height() + kRowGap) + 6;
    h += small.height();  // stale note line (kept so the height does not jump)
    const QRect s = small.boundingRect(QRect(0, 0, std::max(80, width - 2 * kMargin), 2000), Qt::TextWordWrap,
                                       statement_.isEmpty() ? QStringLiteral(" ") : statement_);
    return h + s.height() + kMargin;
}

void ReadoutPanel::fitHeight() {
    const int h = idealHeight(width() > 0 ? width() : 320);
    if (h != height() || minimumHeight() != h) setFixedHeight(h);
}

QSize ReadoutPanel::sizeHint() const { return {320, idealHeight(320)}; }
QSize ReadoutPanel::minimumSizeHint() const { return {220, idealHeight(220)}; }

void ReadoutPanel::resizeEvent(QResizeEvent* event) {
    QWidget::resizeEvent(event);
    fitHeight();
}

void ReadoutPanel::changeEvent(QEvent* event) {
    QWidget::changeEvent(event);
    if (event->type() == QEvent::FontChange || event->type() == QEvent::PaletteChange) fitHeight();
}

void ReadoutPanel::paintEvent(QPaintEvent*) {
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    const QPalette pal = palette();
    const QRectF frame = QRectF(rect()).adjusted(0.5, 0.5, -0.5, -0.5);
    QPainterPath path;
    path.addRoundedRect(frame, 5, 5);
    p.fillPath(path, pal.base());
    p.setPen(QPen(pal.mid().color(), 1));
    p.drawPath(path);

    const QColor text = pal.text().color();
    QColor muted = text;
    muted.setAlphaF(0.62f);
    const int w = width() - 2 * kMargin;
    int y = kMargin;
    const QFont tf = titleFont(font()), sf = smallFont(font());
    const QFontMetrics tm(tf), bm(font()), sm(sf);
    if (!hasPoint_) {
        p.setFont(tf);
        p.setPen(text);
        p.drawText(QRect(kMargin, y, w, tm.height()), Qt::AlignLeft | Qt::AlignVCenter, tr("Readout"));
        y += tm.height() + 4;
        p.setFont(font());
        p.setPen(muted);
        p.drawText(QRect(kMargin, y, w, height() - y), Qt::TextWordWrap, message_);
        return;
    }
    // Title: the moderator value, and a tag when it lies beyond the data.
    QString tag;
    int tagWidth = 0;
    if (point_.beyond_data) {
        tag = tr("beyond the data");
        tagWidth = sm.horizontalAdvance(tag) + 14;
    }
    p.setFont(tf);
    p.setPen(text);
    const QString title = tm.elidedText(label_, Qt::ElideRight, w - (tagWidth ? tagWidth + 8 : 0));
    p.drawText(QRect(kMargin, y, w, tm.height()), Qt::AlignLeft | Qt::AlignVCenter, title);
    if (tagWidth) {
        const QRectF pill(kMargin + tm.horizontalAdvance(title) + 8, y + (tm.height() - sm.height() - 4) / 2.0,
                          tagWidth, sm.height() + 4);
        QPainterPath pp;
        pp.addRoundedRect(pill, 4, 4);
        p.fillPath(pp, QColor(estuary::beyond));
        p.setPen(QPen(estuary::notSignificant, 1));
        p.drawPath(pp);
        p.setFont(sf);
        p.setPen(estuary::ink);
        p.drawText(pill, Qt::AlignCenter, tag);
    }
    y += tm.height() + 4;
    p.setFont(sf);
    p.setPen(muted);
    p.drawText(QRect(kMargin, y, w, sm.height()), Qt::AlignLeft | Qt::AlignVCenter,
               sm.elidedText(heading_, Qt::ElideRight, w));
    y += sm.height() + 6;

    const QList<Row> rs = rows();
    int labelWidth = 0;
    for (const Row& r : rs) labelWidth = std::max(labelWidth, bm.horizontalAdvance(r.label));
    labelWidth += 16;
    for (const Row& r : rs) {
        p.setFont(font());
        p.setPen(muted);
        p.drawText(QRect(kMargin, y, labelWidth, bm.height()), Qt::AlignLeft | Qt::AlignVCenter, r.label);
        p.setPen(stale_ ? muted : text);
        p.drawText(QRect(kMargin + labelWidth, y, w - labelWidth, bm.height()), Qt::AlignLeft | Qt::AlignVCenter,
                   bm.elidedText(r.value, Qt::ElideRight, w - labelWidth));
        y += bm.height() + kRowGap;
    }
    y += 6;
    p.setFont(sf);
    p.setPen(muted);
    if (stale_) p.drawText(QRect(kMargin, y, w, sm.height()), Qt::AlignLeft, tr("updates when the drag ends"));
    y += sm.height();
    p.drawText(QRect(kMargin, y, w, height() - y), Qt::TextWordWrap, statement_);
}

}  // namespace moderato::ui
