#include "shell/analysis_page.hpp"

#include <QButtonGroup>
#include <QHBoxLayout>
#include <QLabel>
#include <QProgressBar>
#include <QPushButton>
#include <QStackedWidget>
#include <QToolButton>
#include <QVBoxLayout>

#include "model/analysis_runner.hpp"
#include "model/project_document.hpp"
#include "sections/checks_section.hpp"
#include "sections/estimates_section.hpp"
#include "sections/memo_section.hpp"
#include "sections/probe_section.hpp"
#include "sections/specify_section.hpp"

namespace moderato::ui {

AnalysisPage::AnalysisPage(ProjectDocument* doc, AnalysisRunner* runner, QWidget* parent)
    : QWidget(parent),
      doc_(doc),
      runner_(runner),
      title_(new QLabel(this)),
      status_(new QLabel(this)),
      busy_(new QProgressBar(this)),
      cancel_(new QPushButton(tr("Cancel"), this)),
      switcher_(new QButtonGroup(this)),
      stack_(new QStackedWidget(this)),
      specify_(new SpecifySection(doc, this)),
      estimates_(new EstimatesSection(doc, this)),
      probe_(new ProbeSection(doc, this)),
      checks_(new ChecksSection(doc, this)),
      memo_(new MemoSection(doc, probe_, this)) {
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(8, 6, 8, 6);
    auto* header = new QHBoxLayout;
    QFont titleFont = title_->font();
    titleFont.setPointSizeF(titleFont.pointSizeF() * 1.25);
    titleFont.setBold(true);
    title_->setFont(titleFont);
    header->addWidget(title_);
    header->addSpacing(16);
    const QStringList names{tr("Specify"), tr("Estimates"), tr("Probe"), tr("Checks"), tr("Memo")};
    for (int i = 0; i < names.size(); ++i) {
        auto* b = new QToolButton(this);
        b->setText(names[i]);
        b->setCheckable(true);
        b->setAutoRaise(true);
        b->setObjectName(QStringLiteral("section-") + names[i].toLower());
        b->setToolTip(tr("Show the %1 section (Ctrl+%2)").arg(names[i]).arg(i + 1));
        b->setShortcut(QKeySequence(Qt::CTRL | static_cast<Qt::Key>(Qt::Key_1 + i)));
        switcher_->addButton(b, i);
        header->addWidget(b);
    }
    switcher_->setExclusive(true);
    header->addStretch(1);
    status_->setObjectName(QStringLiteral("analysis-status"));
    header->addWidget(status_);
    busy_->setObjectName(QStringLiteral("analysis-busy"));
    busy_->setRange(0, 0);  // a fit reports no progress: an indicator that it runs
    busy_->setTextVisible(false);
    busy_->setMaximumWidth(80);
    busy_->hide();
    header->addWidget(busy_);
    cancel_->setObjectName(QStringLiteral("cancel-fit"));
    cancel_->setToolTip(tr("Stop waiting for this fit; the results shown stay those of the earlier settings"));
    cancel_->hide();
    header->addWidget(cancel_);
    layout->addLayout(header);
    stack_->addWidget(specify_);
    stack_->addWidget(estimates_);
    stack_->addWidget(probe_);
    stack_->addWidget(checks_);
    stack_->addWidget(memo_);
    layout->addWidget(stack_, 1);
    connect(switcher_, &QButtonGroup::idClicked, this, [this](int id) { showSection(static_cast<Section>(id)); });
    connect(runner_, &AnalysisRunner::resultChanged, this, [this](const QString& id) {
        if (id == id_) refreshFromRunner(id);
    });
    connect(runner_, &AnalysisRunner::busyChanged, this, [this](const QString& id) {
        if (id == id_) showBusy();
    });
    connect(cancel_, &QPushButton::clicked, this, [this] { runner_->cancel(id_); });
    connect(probe_, &ProbeSection::preparingChanged, this, &AnalysisPage::showBusy);
    connect(doc_, &ProjectDocument::structureChanged, this, [this] {
        if (const Analysis* a = doc_->analysis(id_)) title_->setText(QString::fromStdString(a->name));
    });
    showSection(Probe);
}

void AnalysisPage::showAnalysis(const QString& id) {
    id_ = id;
    const Analysis* a = doc_->analysis(id);
    title_->setText(a ? QString::fromStdString(a->name) : QString());
    runner_->refresh(id);
    refreshFromRunner(id);
}

void AnalysisPage::refreshFromRunner(const QString& id) {
    const auto run = runner_->result(id);
    const QString error = runner_->error(id);
    showBusy();
    for (int s = Specify; s <= Memo; ++s) section(static_cast<Section>(s))->showAnalysis(id, run, error);
}

void AnalysisPage::setBackgroundThreshold(double cells) {
    probe_->setBackgroundThreshold(cells);
    checks_->setBackgroundThreshold(cells);
}

void AnalysisPage::showBusy() {
    const bool busy = runner_->busy(id_);
    busy_->setVisible(busy || probe_->isPreparing());
    cancel_->setVisible(busy);
    if (busy) status_->setText(tr("Fitting…"));
    else if (probe_->isPreparing()) status_->setText(tr("Drawing…"));
    else if (runner_->stopped(id_))
        status_->setText(tr("Fit cancelled: the results shown are for the earlier settings"));
    else status_->setText(QString());
}

void AnalysisPage::showSection(Section s) {
    stack_->setCurrentIndex(s);
    if (auto* b = switcher_->button(s)) b->setChecked(true);
    Q_EMIT sectionChanged(s);
}

AnalysisPage::Section AnalysisPage::currentSection() const { return static_cast<Section>(stack_->currentIndex()); }

AnalysisSection* AnalysisPage::section(Section s) const {
    switch (s) {
        case Specify:
            return specify_;
        case Estimates:
            return estimates_;
        case Probe:
            return probe_;
        case Checks:
            return checks_;
        case Memo:
            return memo_;
    }
    return nullptr;
}

QList<FigureSource*> AnalysisPage::currentFigures() const { return section(currentSection())->figures(); }

}  // namespace moderato::ui
