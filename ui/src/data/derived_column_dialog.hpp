// "Add derived column…": the kind of recipe, its source column(s), the new
// column's name (suggested from the source) and the level or value some
// kinds need. The recipe is tried on the data before the dialog closes, so
// a recipe that cannot be computed (log of a value <= 0, …) is explained
// here and nothing is added.
#pragma once

#include <QDialog>
#include <memory>
#include <set>
#include <string>

#include "moderato/project/project.hpp"
#include "moderato/reading/table.hpp"

class QComboBox;
class QDialogButtonBox;
class QLabel;
class QLineEdit;

namespace moderato::ui {

class DerivedColumnDialog : public QDialog {
    Q_OBJECT
public:
    // `table`: the dataset with its current derived columns; `taken`: names
    // no new column may use (every column and every recipe of the dataset).
    DerivedColumnDialog(std::shared_ptr<const Table> table, std::set<std::string> taken, const QString& datasetId,
                        QWidget* parent = nullptr);

    // Picks the kind and the source column.
    void setKind(RecipeKind kind);
    void setSource(const QString& column);
    DerivedRecipe recipe() const;
    QString message() const;

    // Short description of a recipe for lists ("centred at its mean").
    static QString describe(const DerivedRecipe& r);
    // All recipe kinds in the order the dialog offers them.
    static QStringList kinds();

public Q_SLOTS:
    void accept() override;

private:
    void kindChanged();
    void fillSources();
    void fillLevels();
    void suggestName();
    void updateHint();
    void setMessage(const QString& text, bool error);
    void growToFit();

    std::shared_ptr<const Table> table_;
    std::set<std::string> taken_;
    QString datasetId_;
    bool nameEdited_ = false;

    QComboBox* kind_ = nullptr;
    QComboBox* source_ = nullptr;
    QComboBox* other_ = nullptr;
    QComboBox* level_ = nullptr;
    QLineEdit* value_ = nullptr;
    QLineEdit* name_ = nullptr;
    QLabel* hint_ = nullptr;
    QLabel* message_ = nullptr;
    QDialogButtonBox* buttons_ = nullptr;
    QWidget* otherLabel_ = nullptr;
    QWidget* levelLabel_ = nullptr;
    QWidget* valueLabel_ = nullptr;
};

}  // namespace moderato::ui
