// The moderator slider under the Effect plot: a slider over the observed
// range (or one step per group), a box to type an exact value, buttons for
// mean − SD, mean, mean + SD and percentiles, and Pin.
#pragma once

#include <QString>
#include <QStringList>
#include <QWidget>

class QDoubleSpinBox;
class QLabel;
class QSlider;
class QToolButton;

namespace moderato::ui {

class ModeratorSlider : public QWidget {
    Q_OBJECT
public:
    explicit ModeratorSlider(QWidget* parent = nullptr);

    // A numeric moderator: the slider spans the observed range [lo, hi]; the
    // box accepts [axisLo, axisHi] (values beyond the data are allowed there).
    void setContinuous(const QString& name, double lo, double hi, double axisLo, double axisHi);
    // A categorical or 0/1 moderator: one step per group.
    void setGroups(const QString& name, const QStringList& groups);
    // Shows m without emitting anything.
    void setValue(double m);
    double value() const { return value_; }
    bool groups() const { return groups_; }

    QSlider* slider() const { return slider_; }
    QDoubleSpinBox* valueBox() const { return box_; }
    QToolButton* presetButton(const QString& key) const;  // "mean-sd", "mean", "mean+sd", "percentiles"
    QToolButton* pinButton() const { return pin_; }

Q_SIGNALS:
    void sliderPressed();
    void valueMoved(double m);  // while the slider is dragged
    // A value to keep: the drag ended, a value was typed, or a key moved the
    // slider (`keyboard`: consecutive key steps merge into one undo step).
    void valueCommitted(double m, bool keyboard);
    void presetRequested(const QString& key);  // "mean-sd", "mean", "mean+sd", "p10", ... "p90"
    void pinRequested();

private:
    double sliderToValue(int pos) const;
    int valueToSlider(double m) const;

    QLabel* name_;
    QSlider* slider_;
    QDoubleSpinBox* box_;
    QLabel* groupLabel_;
    QToolButton* meanMinus_;
    QToolButton* mean_;
    QToolButton* meanPlus_;
    QToolButton* percentiles_;
    QToolButton* pin_;
    bool groups_ = false;
    QStringList groupNames_;
    double lo_ = 0, hi_ = 1;
    double value_ = 0;
    bool updating_ = false;
};

}  // namespace moderato::ui
