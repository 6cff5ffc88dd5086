#include "probe/moderator_slider.hpp"

#include <QDoubleSpinBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QMenu>
#include <QSlider>
#include <QToolButton>
#include <algorithm>
#include <cmath>

namespace moderato::ui {

namespace {
constexpr int kSteps = 1000;

// Decimals that show a step of about 1/1000 of the range.
int decimalsFor(double lo, double hi) {
    const double step = (hi - lo) / kSteps;
    if (!(step > 0)) return 2;
    return std::clamp(static_cast<int>(std::ceil(-std::log10(step))), 0, 8);
}
}  // namespace

ModeratorSlider::ModeratorSlider(QWidget* parent)
    : QWidget(parent),
      name_(new QLabel(this)),
      slider_(new QSlider(Qt::Horizontal, this)),
      box_(new QDoubleSpinBox(this)),
      groupLabel_(new QLabel(this)),
      meanMinus_(new QToolButton(this)),
      mean_(new QToolButton(this)),
      meanPlus_(new QToolButton(this)),
      percentiles_(new QToolButton(this)),
      pin_(new QToolButton(this)) {
    auto* layout = new QHBoxLayout(this);
    layout->setContentsMargins(4, 2, 4, 2);
    layout->setSpacing(6);
    name_->setObjectName(QStringLiteral("slider-name"));
    layout->addWidget(name_);
    slider_->setObjectName(QStringLiteral("moderator-slider"));
    slider_->setRange(0, kSteps);
    slider_->setMinimumWidth(100);
    slider_->setToolTip(tr("Moderator slider: the highlighted line and the readout follow it"));
    layout->addWidget(slider_, 1);
    box_->setObjectName(QStringLiteral("moderator-value"));
    box_->setKeyboardTracking(false);
    box_->setMinimumWidth(90);
    box_->setToolTip(tr("Type a moderator value (values beyond the data are allowed and marked)"));
    layout->addWidget(box_);
    groupLabel_->setMinimumWidth(90);
    layout->addWidget(groupLabel_);
    layout->addSpacing(6);

    auto button = [&](QToolButton* b, const QString& key, const QString& text, const QString& tip) {
        b->setObjectName(QStringLiteral("preset-") + key);
        b->setText(text);
        b->setToolTip(tip);
        layout->addWidget(b);
        connect(b, &QToolButton::clicked, this, [this, key] { Q_EMIT presetRequested(key); });
    };
    button(meanMinus_, QStringLiteral("mean-sd"), tr("mean − SD"), tr("Set the moderator to its mean minus one SD"));
    button(mean_, QStringLiteral("mean"), tr("mean"), tr("Set the moderator to its mean"));
    button(meanPlus_, QStringLiteral("mean+sd"), tr("mean + SD"), tr("Set the moderator to its mean plus one SD"));
    percentiles_->setObjectName(QStringLiteral("preset-percentiles"));
    percentiles_->setText(tr("Percentile"));
    percentiles_->setToolTip(tr("Set the moderator to a percentile of its observed values"));
    percentiles_->setPopupMode(QToolButton::InstantPopup);
    auto* menu = new QMenu(percentiles_);
    for (int p : {10, 25, 50, 75, 90}) {
        QAction* a = menu->addAction(p == 50 ? tr("50th (median)") : tr("%1th").arg(p));
        a->setObjectName(QStringLiteral("percentile-%1").arg(p));
        connect(a, &QAction::triggered, this, [this, p] { Q_EMIT presetRequested(QStringLiteral("p%1").arg(p)); });
    }
    percentiles_->setMenu(menu);
    layout->addWidget(percentiles_);
    layout->addSpacing(6);
    pin_->setObjectName(QStringLiteral("pin"));
    pin_->setText(tr("Pin"));
    pin_->setToolTip(tr("Keep this moderator value in the pinned-values table and as a line on the Lines plot"));
    layout->addWidget(pin_);
    connect(pin_, &QToolButton::clicked, this, &ModeratorSlider::pinRequested);

    connect(slider_, &QSlider::sliderPressed, this, &ModeratorSlider::sliderPressed);
    connect(slider_, &QSlider::valueChanged, this, [this](int pos) {
        if (updating_) return;
        value_ = sliderToValue(pos);
        updating_ = true;
        if (groups_) groupLabel_->setText(groupNames_.value(pos));
        else box_->setValue(value_);
        updating_ = false;
        Q_EMIT valueMoved(value_);
        if (!slider_->isSliderDown()) Q_EMIT valueCommitted(value_, true);
    });
    connect(slider_, &QSlider::sliderReleased, this, [this] { Q_EMIT valueCommitted(value_, false); });
    connect(box_, &QDoubleSpinBox::valueChanged, this, [this](double v) {
        if (updating_) return;
        value_ = v;
        updating_ = true;
        slider_->setValue(valueToSlider(v));
        updating_ = false;
        Q_EMIT valueMoved(v);
        Q_EMIT valueCommitted(v, false);
    });
}

QToolButton* ModeratorSlider::presetButton(const QString& key) const {
    if (key == QStringLiteral("mean-sd")) return meanMinus_;
    if (key == QStringLiteral("mean")) return mean_;
    if (key == QStringLiteral("mean+sd")) return meanPlus_;
    if (key == QStringLiteral("percentiles")) return percentiles_;
    return nullptr;
}

void ModeratorSlider::setContinuous(const QString& name, double lo, double hi, double axisLo, double axisHi) {
    updating_ = true;
    groups_ = false;
    name_->setText(name);
    lo_ = lo;
    hi_ = hi > lo ? hi : lo + 1;
    slider_->setRange(0, kSteps);
    slider_->setPageStep(kSteps / 10);
    slider_->setSingleStep(kSteps / 100);
    box_->setDecimals(decimalsFor(lo_, hi_));
    box_->setRange(std::min(axisLo, lo_), std::max(axisHi, hi_));
    box_->setSingleStep(std::pow(10.0, std::floor(std::log10((hi_ - lo_) / 20))));
    box_->setVisible(true);
    groupLabel_->setVisible(false);
    for (QToolButton* b : {meanMinus_, mean_, meanPlus_, percentiles_, pin_}) b->setVisible(true);
    updating_ = false;
}

void ModeratorSlider::setGroups(const QString& name, const QStringList& groups) {
    updating_ = true;
    groups_ = true;
    groupNames_ = groups;
    name_->setText(name);
    slider_->setRange(0, std::max(0, static_cast<int>(groups.size()) - 1));
    slider_->setPageStep(1);
    slider_->setSingleStep(1);
    slider_->setTickPosition(QSlider::TicksBelow);
    slider_->setTickInterval(1);
    box_->setVisible(false);
    groupLabel_->setVisible(true);
    for (QToolButton* b : {meanMinus_, mean_, meanPlus_, percentiles_, pin_}) b->setVisible(false);
    updating_ = false;
}

void ModeratorSlider::setValue(double m) {
    updating_ = true;
    value_ = m;
    if (groups_) {
        const int k = static_cast<int>(std::lround(m));
        slider_->setValue(k);
        groupLabel_->setText(groupNames_.value(k));
    } else {
        slider_->setTickPosition(QSlider::NoTicks);
        slider_->setValue(valueToSlider(m));
        box_->setValue(m);
    }
    updating_ = false;
}

double ModeratorSlider::sliderToValue(int pos) const {
    if (groups_) return pos;
    return lo_ + (hi_ - lo_) * pos / kSteps;
}

int ModeratorSlider::valueToSlider(double m) const {
    if (groups_) return static_cast<int>(std::lround(m));
    return std::clamp(static_cast<int>(std::lround((m - lo_) / (hi_ - lo_) * kSteps)), 0, kSteps);
}

}  // namespace moderato::ui
