// The control for the value a second moderator is held at while the first
// one is probed (three-way models): a box for an exact value with buttons for
// mean − SD, mean and mean + SD, or a choice of levels for a categorical or
// 0/1 second moderator. It only reports the choice; the Probe section keeps
// it in the analysis (one undoable edit) and the runner re-probes.
#pragma once

#include <QString>
#include <QStringList>
#include <QWidget>
#include <limits>

#include "moderato/estimation/design.hpp"
#include "moderato/project/project.hpp"

class QComboBox;
class QDoubleSpinBox;
class QLabel;
class QToolButton;

namespace moderato::ui {

class HeldValueControl : public QWidget {
    Q_OBJECT
public:
    explicit HeldValueControl(QWidget* parent = nullptr);

    // A numeric second moderator (not 0/1): `value` NaN means its mean.
    void setNumeric(const QString& name, double mean, double sd, double lo, double hi, double value);
    // A categorical one (`levels`, reference first; value = level index, NaN:
    // the reference) or a 0/1 one (levels "0" and "1", plus its mean).
    void setLevels(const QString& name, const QStringList& levels, double value, bool zeroOne, double mean = 0);

    QDoubleSpinBox* valueBox() const { return box_; }
    QComboBox* levelChoice() const { return levels_; }
    QToolButton* presetButton(const QString& key) const;  // "mean-sd", "mean", "mean+sd"

Q_SIGNALS:
    // The user chose a value (NaN: the default, its mean or reference level).
    void valueChosen(double value);

private:
    void relayout();

    QLabel* name_;
    QDoubleSpinBox* box_;
    QComboBox* levels_;
    QToolButton* meanMinus_;
    QToolButton* mean_;
    QToolButton* meanPlus_;
    double mean_value_ = 0, sd_ = 0;
    bool updating_ = false;
};

}  // namespace moderato::ui
