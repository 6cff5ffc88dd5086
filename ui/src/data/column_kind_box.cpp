#include "data/column_kind_box.hpp"

#include <QComboBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QPushButton>
#include <QSignalBlocker>
#include <QVBoxLayout>

#include "common/number_text.hpp"
#include "data/text_cell_list.hpp"
#include "model/project_document.hpp"
#include "moderato/reading/retype.hpp"

namespace moderato::ui {

namespace {

QString cells(std::size_t n) {
    return n == 1 ? ColumnKindBox::tr("1 cell")
                  : ColumnKindBox::tr("%1 cells").arg(countText(static_cast<long long>(n)));
}

}  // namespace

ColumnKindBox::ColumnKindBox(ProjectDocument* doc, QWidget* parent) : QWidget(parent), doc_(doc) {
    setObjectName(QStringLiteral("column-kind"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    auto* row = new QHBoxLayout;
    auto* label = new QLabel(tr("Read as"), this);
    kind_ = new QComboBox(this);
    kind_->setObjectName(QStringLiteral("column-kind-choice"));
    kind_->addItem(tr("numbers"), false);
    kind_->addItem(tr("categories"), true);
    label->setBuddy(kind_);
    row->addWidget(label);
    row->addWidget(kind_, 1);
    layout->addLayout(row);
    note_ = new QLabel(this);
    note_->setObjectName(QStringLiteral("column-kind-note"));
    note_->setWordWrap(true);
    note_->setTextFormat(Qt::RichText);
    layout->addWidget(note_);
    asNumbers_ = new QPushButton(tr("Read as numbers; these cells missing"), this);
    asNumbers_->setObjectName(QStringLiteral("column-kind-as-numbers"));
    layout->addWidget(asNumbers_);
    connect(kind_, &QComboBox::activated, this, [this] {
        if (!column_.empty()) setKind(dataset_, column_, kind_->currentData().toBool());
    });
    connect(asNumbers_, &QPushButton::clicked, this, [this] {
        if (!column_.empty()) setKind(dataset_, column_, false);
    });
    showColumn({}, nullptr, -1, false);
}

void ColumnKindBox::showColumn(const std::string& datasetId, const Table* table, int column, bool derived) {
    dataset_ = datasetId;
    const bool valid = table && column >= 0 && column < static_cast<int>(table->cols());
    column_ = valid && !derived ? table->columns[static_cast<std::size_t>(column)].name : std::string();
    setVisible(valid);
    note_->clear();
    note_->hide();
    asNumbers_->hide();
    if (!valid) return;
    const Column& c = table->columns[static_cast<std::size_t>(column)];
    {
        const QSignalBlocker quiet(kind_);
        kind_->setCurrentIndex(c.kind == ColumnKind::Categorical ? 1 : 0);
    }
    kind_->setEnabled(!derived);
    kind_->setToolTip(derived ? tr("A derived column has the kind its recipe gives") : QString());
    showNote(*table, column);
}

void ColumnKindBox::showNote(const Table& table, int column) {
    const Column& c = table.columns[static_cast<std::size_t>(column)];
    const DataSource* source = doc_->project().dataset(dataset_);
    if (c.kind == ColumnKind::Numeric && c.text_as_missing) {
        note_->setText(tr("%1 of text read as missing: %2.")
                           .arg(cells(c.text_as_missing), textCellList(c.text_examples, c.text_as_missing)));
        note_->show();
        return;
    }
    if (c.kind != ColumnKind::Categorical || column_.empty()) return;
    const StrayText stray = stray_text(table, c, source && source->import.decimal_comma);
    if (!mostly_numbers(stray)) return;
    note_->setText(tr("Mostly numbers: %1 of %2 non-missing cells %3 (%4).")
                       .arg(countText(static_cast<long long>(stray.text_cells)),
                            countText(static_cast<long long>(stray.text_cells + stray.number_cells)),
                            stray.text_cells == 1 ? tr("is not a number") : tr("are not numbers"),
                            textCellList(stray.first, stray.text_cells)));
    note_->show();
    asNumbers_->show();
}

void ColumnKindBox::setKind(const std::string& datasetId, const std::string& column, bool categorical) {
    Project after = doc_->project();
    DataSource* source = nullptr;
    for (auto& d : after.datasets)
        if (d.id == datasetId) source = &d;
    const auto read = doc_->baseTable(datasetId);
    const Column* asRead = read ? read->find(column) : nullptr;
    if (!source || !asRead) return;
    const ColumnKind wanted = categorical ? ColumnKind::Categorical : ColumnKind::Numeric;
    if (asRead->kind == wanted) source->retyped.erase(column);
    else source->retyped[column] = wanted;
    if (after == doc_->project()) return;
    const QString name = QString::fromStdString(column);
    doc_->setProject(after,
                     categorical ? tr("Read “%1” as categories").arg(name) : tr("Read “%1” as numbers").arg(name));
}

}  // namespace moderato::ui
