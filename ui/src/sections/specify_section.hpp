// The Specify section: the dataset's columns on the left, the role slots on
// the right (filled by drag and drop or pickers), the multilevel choices
// while a Groups column is chosen, the family, standard-error kind,
// confidence level and centring, and the model written out as an equation. Each change is one undoable edit of the
// analysis; the runner refits on its own. Edits that cannot work are refused with a message naming the role and column;
// run errors show in a banner.
#pragma once

#include <array>
#include <memory>

#include "sections/analysis_section.hpp"
#include "specify/role_edit.hpp"

class QComboBox;
class QFormLayout;
class QDoubleSpinBox;
class QLabel;
class QTableView;
class QVBoxLayout;

namespace moderato::ui {

class ColumnListModel;
class MultilevelPanel;
class RoleSlot;

class SpecifySection : public AnalysisSection {
    Q_OBJECT
public:
    explicit SpecifySection(ProjectDocument* doc, QWidget* parent = nullptr);
    void showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) override;

    RoleSlot* slot(Role r) const { return slots_[static_cast<std::size_t>(r)]; }
    QTableView* columnView() const { return columnView_; }
    ColumnListModel* columnModel() const { return columns_; }
    QComboBox* familyBox() const { return family_; }
    QComboBox* seBox() const { return se_; }
    QDoubleSpinBox* levelBox() const { return level_; }
    QComboBox* centringBox() const { return centring_; }
    // The multilevel choices (shown while a Groups column is chosen).
    MultilevelPanel* multilevelPanel() const { return multilevel_; }
    // The reference level of a categorical moderator (hidden otherwise).
    QComboBox* referenceBox() const { return reference_; }
    // The inline message (refused edits and problems with the roles); empty when none.
    QString message() const;
    QLabel* messageLabel() const { return message_; }
    QLabel* errorBanner() const { return errorBanner_; }
    QLabel* equationLabel() const { return equation_; }
    QLabel* readingLabel() const { return reading_; }
    QLabel* rowsLabel() const { return rows_; }

private:
    // The constructor's steps: the column list (left), the settings (right:
    // role slots, model options, messages, equation), then the connections.
    QWidget* createColumnList(QWidget* parent);
    QWidget* createSettings(QWidget* parent);
    void createRoleSlots(QWidget* right, QVBoxLayout* r);
    void createModelOptions(QWidget* right, QVBoxLayout* r);
    void connectMultilevel();
    void createMessages(QVBoxLayout* r);
    void createEquation(QWidget* right, QVBoxLayout* r);
    void connectSignals();

    const Analysis* current() const;
    void refresh();
    void apply(const RoleEdit& edit, const QString& mergeKey = {});
    void columnChosen(Role target, const QString& column, int fromRole);
    void columnCleared(Role role, const QString& column);
    void showColumnMenu(const QPoint& pos);
    void refreshReference(const Analysis& a, const Table* table);
    void refreshStandardErrors(const Analysis& a);

    QString id_;
    std::shared_ptr<const AnalysisRun> run_;
    QString error_;
    QString refusal_;  // why the last edit was refused (until the next accepted edit)
    QString note_;     // something to know about the last accepted edit
    bool applying_ = false;

    ColumnListModel* columns_;
    QTableView* columnView_;
    QLabel* columnsTitle_;
    std::array<RoleSlot*, kRoleCount> slots_{};
    MultilevelPanel* multilevel_;
    QComboBox* family_;
    QComboBox* se_;
    QDoubleSpinBox* level_;
    QComboBox* centring_;
    QComboBox* reference_;
    QLabel* referenceLabel_;
    QFormLayout* modelForm_ = nullptr;
    QLabel* centringHint_;
    QLabel* message_;
    QLabel* errorBanner_;
    QLabel* equation_;
    QLabel* legend_;
    QLabel* reading_;
    QLabel* rows_;
};

}  // namespace moderato::ui
