#include "probe/straight_line_panel.hpp"

#include <QCheckBox>
#include <QDoubleSpinBox>
#include <QEvent>
#include <QHBoxLayout>
#include <QLabel>
#include <QSignalBlocker>
#include <QSpinBox>
#include <QVBoxLayout>
#include <cmath>
#include <limits>

#include "common/figure_caption.hpp"
#include "common/number_text.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

QString q(const std::string& s) { return QString::fromStdString(s); }

QString testText(const LinearityTest& t) {
    return std::isinf(t.df2)
               ? QObject::tr("χ²(%1) = %2").arg(exactText(t.df1), numberText(t.chi_square))
               : QObject::tr("F(%1, %2) = %3").arg(exactText(t.df1), dfText(t.df2), numberText(t.statistic));
}

}  // namespace

StraightLinePanel::StraightLinePanel(QWidget* parent)
    : QWidget(parent),
      binned_(new QCheckBox(tr("Binned estimates"), this)),
      bins_(new QSpinBox(this)),
      smooth_(new QCheckBox(tr("Smooth curve"), this)),
      bandwidth_(new QDoubleSpinBox(this)),
      intro_(new QLabel(this)),
      body_(new QLabel(this)) {
    setObjectName(QStringLiteral("straight-line-panel"));
    auto* layout = new QVBoxLayout(this);
    layout->setContentsMargins(0, 0, 0, 0);
    layout->setSpacing(4);
    intro_->setWordWrap(true);
    intro_->setTextFormat(Qt::RichText);
    layout->addWidget(intro_);
    auto* row = new QHBoxLayout;
    binned_->setObjectName(QStringLiteral("binned-toggle"));
    binned_->setToolTip(
        tr("Estimate the effect separately in bins of the moderator (cut at its quantiles) and test whether "
           "the straight-line effect fits them (Hainmueller, Mummolo & Xu 2019)"));
    row->addWidget(binned_);
    bins_->setObjectName(QStringLiteral("bins-box"));
    bins_->setRange(2, 50);
    bins_->setValue(3);
    bins_->setSuffix(tr(" bins"));
    bins_->setKeyboardTracking(false);  // one step per value the user settles on
    bins_->setToolTip(tr("How many bins of the moderator, each with about the same number of rows"));
    row->addWidget(bins_);
    row->addStretch(1);
    layout->addLayout(row);
    smooth_->setObjectName(QStringLiteral("smooth-toggle"));
    smooth_->setToolTip(
        tr("A kernel estimate of the effect along the moderator: local straight lines weighted by "
           "distance, the bandwidth chosen by cross-validation, a bootstrap band. Takes a few seconds."));
    auto* smoothRow = new QHBoxLayout;
    smoothRow->addWidget(smooth_);
    bandwidth_->setObjectName(QStringLiteral("bandwidth-box"));
    bandwidth_->setRange(0, 1e9);
    bandwidth_->setDecimals(4);
    bandwidth_->setPrefix(tr("bandwidth "));
    bandwidth_->setSpecialValueText(tr("bandwidth by cross-validation"));
    bandwidth_->setKeyboardTracking(false);  // one step per value the user settles on
    bandwidth_->setToolTip(
        tr("In the moderator's units: how far the local lines reach (Gaussian weights). "
           "0: chosen by 5-fold cross-validation."));
    smoothRow->addWidget(bandwidth_);
    smoothRow->addStretch(1);
    layout->addLayout(smoothRow);
    body_->setObjectName(QStringLiteral("straight-line-text"));
    body_->setWordWrap(true);
    body_->setTextFormat(Qt::RichText);
    body_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    layout->addWidget(body_);
    connect(binned_, &QCheckBox::toggled, this, &StraightLinePanel::binnedToggled);
    connect(smooth_, &QCheckBox::toggled, this, &StraightLinePanel::smoothToggled);
    connect(bins_, &QSpinBox::valueChanged, this, &StraightLinePanel::binsChanged);
    connect(bandwidth_, &QDoubleSpinBox::valueChanged, this,
            [this](double h) { Q_EMIT bandwidthChanged(h > 0 ? h : std::numeric_limits<double>::quiet_NaN()); });
}

void StraightLinePanel::changeEvent(QEvent* event) {
    QWidget::changeEvent(event);
    if (event->type() == QEvent::PaletteChange) publish();
}

void StraightLinePanel::setAnalysis(const Analysis& a, const AnalysisRun* run, bool probabilityShown) {
    {
        const QSignalBlocker b1(binned_), b2(bins_), b3(smooth_), b4(bandwidth_);
        binned_->setChecked(a.probe.show_binned);
        bins_->setValue(a.probe.bins);
        smooth_->setChecked(a.probe.show_smooth);
        bandwidth_->setValue(std::isnan(a.probe.smooth_bandwidth) ? 0.0 : a.probe.smooth_bandwidth);
    }
    bins_->setEnabled(a.probe.show_binned);
    bandwidth_->setEnabled(a.probe.show_smooth);
    html_.clear();
    plain_.clear();
    if (run) fill(a, *run, probabilityShown);
    publish();
}

void StraightLinePanel::publish() {
    const QString muted = cssColour(mutedText(palette()));
    intro_->setText(tr("<b>Straight-line check</b><br><span style='color:%1'>Does the effect change along a "
                       "straight line where the data are?</span>")
                        .arg(muted));
    body_->setText(html_.join(QString()));
    body_->setVisible(!html_.isEmpty());
}

void StraightLinePanel::section(const QString& title) {
    html_ << QStringLiteral("<p style='margin-top:4px'><b>%1</b><br>").arg(title.toHtmlEscaped());
    plain_ << title;
}

void StraightLinePanel::line(const QString& text) {
    html_ << text.toHtmlEscaped() + QStringLiteral("<br>");
    plain_ << text;
}

void StraightLinePanel::fill(const Analysis& a, const AnalysisRun& run, bool probabilityShown) {
    if (a.probe.show_binned && run.binned) addBinned(*run.binned, seDescription(a, run));
    if (a.probe.show_smooth && run.smooth) addSmooth(*run.smooth);
    if (a.probe.show_binned || a.probe.show_smooth) {
        addThin(run);
        addCautions(a, run, probabilityShown);
    }
}

void StraightLinePanel::addBinned(const BinnedEffects& b, const QString& se) {
    const LinearityTest& t = b.linearity;
    section(tr("Binned estimates against the straight line"));
    line(tr("Test of the straight line, %1 SEs: %2, %3").arg(se, testText(t), pClauseText(t.p_value)));
    line(q(linearity_sentence(b)));
    for (std::size_t k = 0; k < b.bins.size(); ++k) {
        const EffectBin& e = b.bins[k];
        line(tr("Bin %1: %2 %3 (median %4, %5 rows): effect %6, %7 CI %8; straight line %9%10")
                 .arg(k + 1)
                 .arg(q(b.moderator), rangeText(e.min, e.max), numberText(e.moderator_value),
                      countText(static_cast<long long>(e.rows)), numberText(e.estimate), levelText(b.level),
                      rangeText(e.ci_lower, e.ci_upper), numberText(e.linear.estimate))
                 .arg(e.thin ? tr(" · few rows (hollow)") : QString()));
    }
    for (const auto& n : b.notes) line(QStringLiteral("• ") + q(n));
    html_ << QStringLiteral("</p>");
}

void StraightLinePanel::addSmooth(const SmoothEffects& s) {
    section(tr("Smooth curve"));
    const QString how =
        s.method == BandwidthMethod::CrossValidation
            ? tr("chosen by %1-fold cross-validation over %2 candidates").arg(s.folds).arg(s.scores.size())
            : tr("as given");
    line(tr("Bandwidth %1 (in units of %2), %3").arg(numberText(s.bandwidth), q(s.moderator), how));
    if (s.replicates > 0)
        line(tr("Band: %1 percentile intervals from %2 bootstrap replicates (seed %3)")
                 .arg(levelText(s.level), countText(s.replicates), QString::number(s.seed)));
    else line(tr("No band: no bootstrap replicates were asked for"));
    if (s.failed_replicates > 0)
        line(tr("%1 replicates had a local fit that could not be computed").arg(countText(s.failed_replicates)));
    // (The curve's own notes say the bandwidth and band again in core's words: not repeated.)
    html_ << QStringLiteral("</p>");
}

void StraightLinePanel::addThin(const AnalysisRun& run) {
    if (!run.support) return;
    const CommonSupport& c = *run.support;
    section(tr("Where the data are thin"));
    if (c.thin.empty()) line(tr("Nowhere along %1.").arg(q(c.moderator)));
    QStringList spans;
    for (const Region& r : c.thin) spans << rangeText(r.lo, r.hi);
    if (!spans.isEmpty())
        line(tr("%1 from %2: hatched along the bottom of the Effect plot.").arg(q(c.moderator), spans.join(tr("; "))));
    line(tr("Rule: %1.").arg(q(c.rule)));
    html_ << QStringLiteral("</p>");
}

void StraightLinePanel::addCautions(const Analysis& a, const AnalysisRun& run, bool probabilityShown) {
    section(tr("Read with care"));
    for (const auto& n : run.straight_line_notes) line(QStringLiteral("• ") + q(n));
    // (Core's cautions say that a test which does not reject is no proof, when it does not.)
    if (run.binned)
        for (const auto& c : run.binned->cautions) line(QStringLiteral("• ") + q(c));
    if (run.smooth)
        for (const auto& c : run.smooth->cautions) line(QStringLiteral("• ") + q(c));
    if (a.family == Family::Logistic)
        line(probabilityShown ? tr("• On the log-odds scale: the Effect plot shows probabilities, so the check is "
                                   "not drawn there; choose the log-odds scale to see it.")
                              : tr("• On the log-odds scale, as the Effect plot."));
    line(tr("• Associations, not causal effects, unless the focal predictor was randomised."));
    html_ << QStringLiteral("</p>");
}

}  // namespace moderato::ui
