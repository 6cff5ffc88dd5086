// The readout beside the plots: the moderator value under the slider and the
// conditional effect there (effect, interval, SE, test value, p), with a statement
// of what is shown (scale, SE kind, level, band) so a screenshot explains
// itself. Painted directly with a fixed size, so updating it on every frame
// of a drag repaints this widget only and never re-lays out the page.
#pragma once

#include <QString>
#include <QStringList>
#include <QWidget>
#include <optional>
#include <utility>

#include "moderato/probing/probe.hpp"

namespace moderato::ui {

class ReadoutPanel : public QWidget {
    Q_OBJECT
public:
    explicit ReadoutPanel(QWidget* parent = nullptr);

    // What every value means: "Effect of x on y", the statistic's name
    // ("t(196)", "z"), the interval's name ("95% CI") and the statement line.
    void setContext(const QString& heading, const QString& statisticName, const QString& intervalName,
                    const QString& statement);
    // The value under the slider and the effect there. `band`: the
    // simultaneous band at this value when that band is shown. `stale`: the
    // numbers belong to an earlier value (recomputed on release).
    void setPoint(const QString& moderatorLabel, const EffectPoint& point,
                  std::optional<std::pair<double, double>> band = std::nullopt, bool stale = false);
    void clear(const QString& message = {});

    // The readout as plain text, one line per row.
    QString text() const;
    const EffectPoint& point() const { return point_; }

    QSize sizeHint() const override;
    QSize minimumSizeHint() const override;

protected:
    void paintEvent(QPaintEvent* event) override;
    void resizeEvent(QResizeEvent* event) override;
    void changeEvent(QEvent* event) override;

private:
    struct Row {
        QString label, value;
    };
    QList<Row> rows() const;
    int idealHeight(int width) const;
    void fitHeight();

    QString heading_, statisticName_, intervalName_, statement_, label_, message_;
    EffectPoint point_;
    std::optional<std::pair<double, double>> band_;
    bool stale_ = false;
    bool hasPoint_ = false;
};

}  // namespace moderato::ui
