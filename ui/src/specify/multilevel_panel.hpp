// The Specify section's multilevel choices, shown while a Groups column is
// chosen: for each numeric predictor of the model a Random slope, Centre
// within groups and Group means switch; the estimation (REML or ML), the
// random effects' covariance (full or diagonal) and the degrees of freedom
// of the tests (Satterthwaite, between–within, z). The panel only reports
// what the user asked for; the section turns it into an undoable edit.
#pragma once

#include <QString>
#include <QWidget>
#include <map>
#include <memory>
#include <string>
#include <vector>

#include "specify/multilevel_edit.hpp"

class QCheckBox;
class QComboBox;
class QFormLayout;
class QGridLayout;
class QLabel;

namespace moderato::ui {

class MultilevelPanel : public QWidget {
    Q_OBJECT
public:
    explicit MultilevelPanel(QWidget* parent = nullptr);

    // Shows the choices of `a` (the panel hides itself without a Groups
    // column). `table` may be null.
    void showAnalysis(const Analysis* a, std::shared_ptr<const Table> table);

    // The switches of a predictor (nullptr when it is not listed).
    QCheckBox* randomSlopeBox(const std::string& column) const;
    QCheckBox* centreWithinBox(const std::string& column) const;
    QCheckBox* groupMeansBox(const std::string& column) const;
    QComboBox* estimationBox() const { return estimation_; }
    QComboBox* covarianceBox() const { return covariance_; }
    QComboBox* dfBox() const { return df_; }
    QLabel* introLabel() const { return intro_; }

Q_SIGNALS:
    void randomSlopeToggled(const QString& column, bool on);
    void centreWithinToggled(const QString& column, bool on);
    void groupMeansToggled(const QString& column, bool on);
    void estimationChosen(MixedEstimation estimation);
    void covarianceChosen(RandomCovariance covariance);
    void dfChosen(FixedEffectDf df);

private:
    void createChoices();
    void connectCombos();
    // One row of switches per numeric predictor, rebuilt when the predictors change.
    void rebuildRows(const std::vector<MultilevelPredictor>& predictors);
    void setRowStates(const Analysis& a, const std::vector<MultilevelPredictor>& predictors);
    // Whether a column varies within groups (cached for this table and grouping column).
    bool varies(const std::string& column);

    QLabel* intro_;
    QWidget* rowsArea_;
    QGridLayout* rows_;
    QLabel* noRows_;
    QComboBox* estimation_;
    QComboBox* covariance_;
    QComboBox* df_;
    QLabel* hint_;
    std::vector<std::pair<std::string, Role>> shown_;  // the predictors the rows show
    std::map<std::string, QCheckBox*> slopes_, centre_, means_;
    std::shared_ptr<const Table> table_;
    std::string groups_;
    std::map<std::string, bool> varies_;
};

}  // namespace moderato::ui
