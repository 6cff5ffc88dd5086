#include "probe/held_value_control.hpp"

#include <QComboBox>
#include <QDoubleSpinBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QToolButton>
#include <algorithm>
#include <cmath>

#include "common/held_value_text.hpp"

namespace moderato::ui {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

}  // namespace

HeldValueControl::HeldValueControl(QWidget* parent)
    : QWidget(parent),
      name_(new QLabel(this)),
      box_(new QDoubleSpinBox(this)),
      levels_(new QComboBox(this)),
      meanMinus_(new QToolButton(this)),
      mean_(new QToolButton(this)),
      meanPlus_(new QToolButton(this)) {
    setObjectName(QStringLiteral("held-value"));
    auto* layout = new QHBoxLayout(this);
    layout->setContentsMargins(4, 0, 4, 2);
    layout->setSpacing(6);
    name_->setObjectName(QStringLiteral("held-name"));
    layout->addWidget(name_);
    box_->setObjectName(QStringLiteral("held-value-box"));
    box_->setKeyboardTracking(false);
    box_->setMinimumWidth(90);
    box_->setToolTip(tr("The value the second moderator is held at while the moderator is probed"));
    layout->addWidget(box_);
    levels_->setObjectName(QStringLiteral("held-level"));
    levels_->setToolTip(tr("The level the second moderator is held at while the moderator is probed"));
    layout->addWidget(levels_);
    auto button = [&](QToolButton* b, const QString& key, const QString& text, const QString& tip) {
        b->setObjectName(QStringLiteral("held-") + key);
        b->setText(text);
        b->setToolTip(tip);
        layout->addWidget(b);
    };
    button(meanMinus_, QStringLiteral("mean-sd"), tr("mean − SD"),
           tr("Hold the second moderator at its mean minus one SD"));
    button(mean_, QStringLiteral("mean"), tr("mean"), tr("Hold the second moderator at its mean"));
    button(meanPlus_, QStringLiteral("mean+sd"), tr("mean + SD"),
           tr("Hold the second moderator at its mean plus one SD"));
    layout->addStretch(1);

    connect(meanMinus_, &QToolButton::clicked, this, [this] { Q_EMIT valueChosen(mean_value_ - sd_); });
    connect(mean_, &QToolButton::clicked, this, [this] { Q_EMIT valueChosen(kNaN); });
    connect(meanPlus_, &QToolButton::clicked, this, [this] { Q_EMIT valueChosen(mean_value_ + sd_); });
    connect(box_, &QDoubleSpinBox::valueChanged, this, [this](double v) {
        if (!updating_) Q_EMIT valueChosen(v);
    });
    connect(levels_, &QComboBox::activated, this,
            [this](int i) { Q_EMIT valueChosen(levels_->itemData(i).toDouble()); });
}

void HeldValueControl::relayout() {
    // Which parts show changes with the kind of column: lay them out again now.
    layout()->invalidate();
    layout()->activate();
    updateGeometry();
}

QToolButton* HeldValueControl::presetButton(const QString& key) const {
    if (key == QStringLiteral("mean-sd")) return meanMinus_;
    if (key == QStringLiteral("mean")) return mean_;
    if (key == QStringLiteral("mean+sd")) return meanPlus_;
    return nullptr;
}

void HeldValueControl::setNumeric(const QString& name, double mean, double sd, double lo, double hi, double value) {
    updating_ = true;
    name_->setText(tr("%1 held at").arg(name));
    mean_value_ = mean;
    sd_ = sd;
    const double w = hi > lo ? hi - lo : std::max(1.0, std::abs(mean));
    // Decimals that show about 1/1000 of the observed range; values beyond the data are allowed (half a range).
    box_->setDecimals(std::clamp(static_cast<int>(std::ceil(-std::log10(w / 1000))), 0, 8));
    box_->setRange(std::min(lo - 0.5 * w, mean - 2 * sd), std::max(hi + 0.5 * w, mean + 2 * sd));
    box_->setSingleStep(std::pow(10.0, std::floor(std::log10(w / 20))));
    box_->setValue(std::isnan(value) ? mean : value);
    box_->setVisible(true);
    levels_->setVisible(false);
    for (QToolButton* b : {meanMinus_, mean_, meanPlus_}) b->setVisible(true);
    relayout();
    updating_ = false;
}

void HeldValueControl::setLevels(const QString& name, const QStringList& levels, double value, bool zeroOne,
                                 double mean) {
    updating_ = true;
    name_->setText(tr("%1 held at").arg(name));
    levels_->clear();
    if (zeroOne) {
        levels_->addItem(heldValueLabel(kNaN, mean, 0, {}, true), kNaN);
        levels_->addItem(QStringLiteral("0"), 0.0);
        levels_->addItem(QStringLiteral("1"), 1.0);
        levels_->setCurrentIndex(std::isnan(value) ? 0 : value == 0.0 ? 1 : value == 1.0 ? 2 : 0);
    } else {
        for (int k = 0; k < levels.size(); ++k)
            levels_->addItem(k == 0 ? tr("%1 (reference level)").arg(levels[k]) : levels[k], static_cast<double>(k));
        const int k = std::isnan(value) ? 0 : static_cast<int>(std::lround(value));
        levels_->setCurrentIndex(std::clamp(k, 0, std::max(0, static_cast<int>(levels.size()) - 1)));
    }
    box_->setVisible(false);
    levels_->setVisible(true);
    for (QToolButton* b : {meanMinus_, mean_, meanPlus_}) b->setVisible(false);
    relayout();
    updating_ = false;
}

}  // namespace moderato::ui
