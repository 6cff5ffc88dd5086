// Placeholder until the dataset view is built (issue #4, in progress).
#include "data/dataset_page.hpp"

#include <QLabel>
#include <QVBoxLayout>

namespace moderato::ui {

DatasetPage::DatasetPage(ProjectDocument* doc, QWidget* parent) : QWidget(parent), doc_(doc), label_(new QLabel(this)) {
    auto* layout = new QVBoxLayout(this);
    layout->addWidget(label_);
}

void DatasetPage::showDataset(const QString& id) {
    id_ = id;
    label_->setText(id);
}

void DatasetPage::selectRows(const std::vector<std::size_t>&) {}

}  // namespace moderato::ui
