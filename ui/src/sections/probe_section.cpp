#include "sections/probe_section.hpp"

#include <QCheckBox>
#include <QComboBox>
#include <QEvent>
#include <QHBoxLayout>
#include <QLabel>
#include <QScrollArea>
#include <QSlider>
#include <QSplitter>
#include <QStackedWidget>
#include <QToolButton>
#include <QVBoxLayout>
#include <algorithm>
#include <cmath>
#include <optional>

#include "common/background_job.hpp"
#include "common/figure_caption.hpp"
#include "common/held_value_text.hpp"
#include "common/inline_work.hpp"
#include "common/number_text.hpp"
#include "model/project_document.hpp"
#include "moderato/probing/multilevel_probe.hpp"
#include "moderato/reporting/memo.hpp"
#include "plots/cells_view.hpp"
#include "plots/effect_plot.hpp"
#include "plots/lines_plot.hpp"
#include "plots/surface_plot.hpp"
#include "probe/gap_text.hpp"
#include "probe/held_value_control.hpp"
#include "probe/moderator_slider.hpp"
#include "probe/pinned_table.hpp"
#include "probe/readout_panel.hpp"
#include "probe/straight_line_overlays.hpp"
#include "probe/straight_line_panel.hpp"
#include "specify/role_edit.hpp"
#include "style/palette_text.hpp"

namespace moderato::ui {

namespace {

enum Page { MessagePage = 0, ProbePage = 1, CellsPage = 2 };

QString q(const std::string& s) { return QString::fromStdString(s); }

// "Probability", "Log expected count": a scale's words at the start of a phrase.
QString capitalized(QString s) {
    if (!s.isEmpty()) s[0] = s[0].toUpper();
    return s;
}

QLabel* plotTitle(QWidget* parent) {
    auto* l = new QLabel(parent);
    l->setTextFormat(Qt::RichText);
    l->setWordWrap(true);  // a long subtitle (held values, long names) wraps instead of being cut off
    l->setContentsMargins(4, 2, 4, 0);
    return l;
}

QString escaped(const QString& s) { return s.toHtmlEscaped(); }

bool sameNumber(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

}  // namespace

ProbeSection::ProbeSection(ProjectDocument* doc, QWidget* parent)
    : AnalysisSection(doc, parent),
      threshold_(kInlineWorkCells),
      pages_(new QStackedWidget(this)),
      message_(new QLabel(this)),
      band_(new QComboBox(this)),
      points_(new QCheckBox(tr("Data points"), this)),
      scaleLabel_(new QLabel(tr("Scale"), this)),
      scale_(new QComboBox(this)),
      averaging_(new QComboBox(this)),
      adjust_(new QComboBox(this)),
      surfaceToggle_(new QToolButton(this)),
      differ_(new QCheckBox(tr("Where groups differ"), this)),
      extend_(new QCheckBox(tr("Extend to boundaries"), this)),
      linesTitle_(plotTitle(this)),
      effectTitle_(plotTitle(this)),
      linesStack_(new QStackedWidget(this)),
      lines_(new LinesPlot(this)),
      surface_(new SurfacePlot(this)),
      effect_(new EffectPlot(this)),
      cells_(new CellsView(this)),
      slider_(new ModeratorSlider(this)),
      held_(new HeldValueControl(this)),
      readout_(new ReadoutPanel(this)),
      pinned_(new PinnedTable(this)),
      straight_(new StraightLinePanel(this)),
      summary_(new QLabel(this)) {
    auto* outer = new QVBoxLayout(this);
    outer->setContentsMargins(0, 0, 0, 0);
    outer->addWidget(pages_);

    message_->setWordWrap(true);
    message_->setAlignment(Qt::AlignCenter);
    message_->setObjectName(QStringLiteral("probe-message"));
    message_->setContentsMargins(40, 40, 40, 40);
    pages_->addWidget(message_);

    // The probe page: plots and slider on the left, readout and tables on the right.
    auto* split = new QSplitter(Qt::Horizontal, this);
    split->setChildrenCollapsible(false);
    auto* left = new QWidget(split);
    auto* leftLayout = new QVBoxLayout(left);
    leftLayout->setContentsMargins(0, 0, 4, 0);
    leftLayout->setSpacing(4);

    leftLayout->addLayout(createControls());
    leftLayout->addWidget(createPlots(left), 1);
    leftLayout->addWidget(slider_);
    held_->setVisible(false);
    leftLayout->addWidget(held_);

    QWidget* scroll = createSidePanel(split);
    split->addWidget(left);
    split->addWidget(scroll);
    split->setStretchFactor(0, 1);
    split->setStretchFactor(1, 0);
    split->setSizes({860, 480});
    pages_->addWidget(split);
    pages_->addWidget(cells_);
    pages_->setCurrentIndex(MessagePage);

    connectMoves();
    connectSettings();
    connectStraightLine();
}

// The row of choices above the plots: band, data points, scale, averaging,
// where groups differ, and the Surface plot toggle.
QHBoxLayout* ProbeSection::createControls() {
    auto* controls = new QHBoxLayout;
    controls->setSpacing(8);
    band_->setObjectName(QStringLiteral("band-choice"));
    band_->addItem(tr("Pointwise band"), false);
    band_->addItem(tr("Simultaneous band"), true);
    band_->setToolTip(
        tr("Pointwise: each moderator value tested on its own. Simultaneous: a band that covers the "
           "whole effect curve at once (Potthoff), so the region of significance does not pick up "
           "false values from testing many moderator values."));
    controls->addWidget(band_);
    points_->setObjectName(QStringLiteral("points-toggle"));
    points_->setToolTip(tr("Show the observed rows on the Lines plot (binned into counts above 20,000 rows)"));
    // The spread toggle sits under "Data points", so the row keeps its width.
    auto* pointsColumn = new QVBoxLayout;
    pointsColumn->setSpacing(0);
    pointsColumn->addWidget(points_);
    controls->addLayout(pointsColumn);
    jitter_ = new QCheckBox(tr("Spread sideways"), this);
    jitter_->setObjectName(QStringLiteral("jitter-toggle"));
    jitter_->setToolTip(
        tr("The focal predictor takes a few whole values: move each data point a little sideways "
           "(the same way on every draw) so points on one value do not hide one another"));
    pointsColumn->addWidget(jitter_);
    jitter_->setVisible(false);  // until a discrete focal predictor shows (syncJitterToggle)
    controls->addSpacing(8);
    controls->addWidget(scaleLabel_);
    scale_->setObjectName(QStringLiteral("scale-choice"));
    scale_->setSizeAdjustPolicy(QComboBox::AdjustToContents);  // its entries follow the family's words
    scale_->addItem(tr("log-odds"), static_cast<int>(ProbeScale::Model));
    scale_->addItem(tr("probability"), static_cast<int>(ProbeScale::Outcome));
    scale_->setToolTip(tr("Effects on the scale of the model's coefficients, or on the outcome's own scale"));
    controls->addWidget(scale_);
    averaging_->setObjectName(QStringLiteral("averaging-choice"));
    averaging_->addItem(tr("averaged over the rows"), static_cast<int>(Averaging::Sample));
    averaging_->addItem(tr("at the means"), static_cast<int>(Averaging::AtValues));
    averaging_->setToolTip(
        tr("Probability-scale effects averaged over every observed row, or at one profile with "
           "the other predictors at their means and reference levels"));
    controls->addWidget(averaging_);
    adjust_->setObjectName(QStringLiteral("adjustment-choice"));
    adjust_->addItem(tr("pairs: Holm"), static_cast<int>(Adjustment::Holm));
    adjust_->addItem(tr("pairs: Bonferroni"), static_cast<int>(Adjustment::Bonferroni));
    adjust_->addItem(tr("pairs: unadjusted"), static_cast<int>(Adjustment::None));
    adjust_->setToolTip(
        tr("How the p-values of the differences between every two groups are adjusted for making several "
           "comparisons at once. Holm's step-down is never less powerful than Bonferroni's."));
    adjust_->hide();  // shown for three or more groups
    controls->addWidget(adjust_);
    differ_->setObjectName(QStringLiteral("differ-toggle"));
    differ_->setChecked(true);
    differ_->setToolTip(
        tr("Shade a strip along the bottom of the Lines plot where the predicted outcomes of two "
           "groups (or of any two lines) differ: the Johnson–Neyman technique applied to the gap "
           "between them. With three or more groups, one named strip per pair."));
    controls->addWidget(differ_);
    controls->addStretch(1);
    surfaceToggle_->setObjectName(QStringLiteral("surface-toggle"));
    surfaceToggle_->setText(tr("Surface plot"));
    surfaceToggle_->setCheckable(true);
    surfaceToggle_->setToolTip(tr("Show the predicted outcome over both predictors in place of the Lines plot"));
    controls->addWidget(surfaceToggle_);
    return controls;
}

// The Lines (or Surface) plot over the Effect plot, each under its title
// (the Effect plot's with the extend-to-boundaries switch beside it).
QWidget* ProbeSection::createPlots(QWidget* left) {
    auto* plots = new QSplitter(Qt::Vertical, left);
    plots->setChildrenCollapsible(false);
    auto* linesBox = new QWidget(plots);
    auto* linesLayout = new QVBoxLayout(linesBox);
    linesLayout->setContentsMargins(0, 0, 0, 0);
    linesLayout->setSpacing(0);
    linesLayout->addWidget(linesTitle_);
    linesStack_->addWidget(lines_);
    linesStack_->addWidget(surface_);
    linesLayout->addWidget(linesStack_, 1);
    auto* effectBox = new QWidget(plots);
    auto* effectLayout = new QVBoxLayout(effectBox);
    effectLayout->setContentsMargins(0, 0, 0, 0);
    effectLayout->setSpacing(0);
    // Beside the Effect plot's title: whether its axis takes in the boundaries beyond the data.
    auto* effectHead = new QHBoxLayout;
    effectHead->setContentsMargins(0, 0, 4, 0);
    effectHead->addWidget(effectTitle_, 1);
    extend_->setObjectName(QStringLiteral("extend-toggle"));
    extend_->setToolTip(
        tr("Widen the Effect plot's axis to show Johnson–Neyman boundaries that lie beyond the observed "
           "values of the moderator (never to values the data cannot take, such as below 0 for a "
           "moderator observed only at 0 or above). Off: they are written at the plot's edge."));
    effectHead->addWidget(extend_);
    effectLayout->addLayout(effectHead);
    effectLayout->addWidget(effect_, 1);
    plots->addWidget(linesBox);
    plots->addWidget(effectBox);
    plots->setStretchFactor(0, 1);
    plots->setStretchFactor(1, 1);
    return plots;
}

// The right side: readout, pinned values and the summary, scrolled.
QWidget* ProbeSection::createSidePanel(QWidget* split) {
    auto* scroll = new QScrollArea(split);
    scroll->setWidgetResizable(true);
    scroll->setFrameShape(QFrame::NoFrame);
    scroll->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    auto* panel = new QWidget(scroll);
    auto* panelLayout = new QVBoxLayout(panel);
    panelLayout->setContentsMargins(6, 0, 6, 6);
    panelLayout->setSpacing(10);
    panelLayout->addWidget(readout_);
    panelLayout->addWidget(pinned_);
    panelLayout->addWidget(straight_);
    straight_->hide();  // until a continuous moderator shows
    summary_->setObjectName(QStringLiteral("probe-summary"));
    summary_->setWordWrap(true);
    summary_->setTextFormat(Qt::RichText);
    summary_->setAlignment(Qt::AlignTop | Qt::AlignLeft);
    summary_->setTextInteractionFlags(Qt::TextSelectableByMouse);
    panelLayout->addWidget(summary_);
    panelLayout->addStretch(1);
    scroll->setWidget(panel);
    scroll->setMinimumWidth(320);
    return scroll;
}

void ProbeSection::connectMoves() {
    // Moving the moderator: every frame recomputes and redraws the moving layers.
    connect(effect_, &EffectPlot::valueDragged, this, [this](double m) { moveTo(m, true); });
    connect(effect_, &EffectPlot::dragFinished, this, [this](double m) {
        moveTo(m, false);
        commitCurrent(m, false);
    });
    connect(slider_, &ModeratorSlider::valueMoved, this,
            [this](double m) { moveTo(m, slider_->slider()->isSliderDown()); });
    connect(slider_, &ModeratorSlider::valueCommitted, this, [this](double m, bool keyboard) {
        if (!engine_.effectIsCheap()) moveTo(m, false);
        commitCurrent(m, keyboard);
    });
    connect(slider_, &ModeratorSlider::presetRequested, this, &ProbeSection::applyPreset);
    connect(slider_, &ModeratorSlider::pinRequested, this, &ProbeSection::pinCurrentValue);
    connect(pinned_, &PinnedTable::removeRequested, this, &ProbeSection::removePinned);
}

void ProbeSection::connectSettings() {
    // Settings (each an undoable edit).
    connect(band_, &QComboBox::activated, this, [this](int i) {
        const bool on = band_->itemData(i).toBool();
        editSettings([on](ProbeSettings& p) { p.simultaneous_band = on; },
                     on ? tr("Show the simultaneous band") : tr("Show the pointwise band"));
    });
    connect(points_, &QCheckBox::toggled, this, [this](bool on) {
        if (rebuilding_) return;
        editSettings([on](ProbeSettings& p) { p.show_points = on; },
                     on ? tr("Show data points") : tr("Hide data points"));
    });
    connect(jitter_, &QCheckBox::toggled, this, [this](bool on) {
        if (rebuilding_) return;
        editSettings([on](ProbeSettings& p) { p.jitter = on; },
                     on ? tr("Spread data points sideways") : tr("Draw data points at their values"));
    });
    connect(scale_, &QComboBox::activated, this, [this](int i) {
        const auto s = static_cast<ProbeScale>(scale_->itemData(i).toInt());
        editSettings([s](ProbeSettings& p) { p.scale = s; },
                     tr("Probe on the %1 scale").arg(scale_->itemText(scale_->findData(static_cast<int>(s)))));
    });
    connect(averaging_, &QComboBox::activated, this, [this](int i) {
        const auto s = static_cast<Averaging>(averaging_->itemData(i).toInt());
        editSettings([s](ProbeSettings& p) { p.averaging = s; }, tr("Change how outcome-scale effects are averaged"));
    });
    connect(adjust_, &QComboBox::activated, this, [this](int i) {
        const auto a = static_cast<Adjustment>(adjust_->itemData(i).toInt());
        editSettings([a](ProbeSettings& p) { p.adjustment = a; },
                     tr("Adjust pairwise p-values: %1").arg(QString::fromLatin1(to_string(a))));
    });
    connect(held_, &HeldValueControl::valueChosen, this, [this](double v) {
        const Analysis* a = doc_->analysis(id_);
        if (!a || !engine_.valid() || sameNumber(a->probe.second_value, v)) return;
        const QString col = q(a->roles.second_moderator);
        editSettings([v](ProbeSettings& p) { p.second_value = v; }, std::isnan(v)
                                                                        ? tr("Hold %1 at its default").arg(col)
                                                                        : tr("Hold %1 at %2").arg(col, numberText(v)));
    });
    connect(differ_, &QCheckBox::toggled, this, [this](bool on) {
        if (rebuilding_ || !engine_.valid()) return;
        editSettings([on](ProbeSettings& p) { p.show_gaps = on; },
                     on ? tr("Shade where the lines differ") : tr("Hide where the lines differ"));
    });
    connect(extend_, &QCheckBox::toggled, this, [this](bool on) {
        if (rebuilding_ || !engine_.valid()) return;
        editSettings(
            [on](ProbeSettings& p) { p.extend_to_boundaries = on; },
            on ? tr("Extend the Effect plot to the boundaries") : tr("Keep the Effect plot to the observed range"));
    });
    connect(surfaceToggle_, &QToolButton::toggled, this, [this](bool on) {
        linesStack_->setCurrentIndex(on ? 1 : 0);
        fillReadoutContext();
    });
    connect(doc_, &ProjectDocument::analysisChanged, this, &ProbeSection::onDocumentChanged);
}

// The straight-line check's switches, each an undoable edit.
void ProbeSection::connectStraightLine() {
    connect(straight_, &StraightLinePanel::binnedToggled, this, [this](bool on) {
        editSettings([on](ProbeSettings& p) { p.show_binned = on; },
                     on ? tr("Show the binned estimates") : tr("Hide the binned estimates"));
    });
    connect(straight_, &StraightLinePanel::binsChanged, this, [this](int bins) {
        const Analysis* a = doc_->analysis(id_);
        if (!a || a->probe.bins == bins) return;
        editSettings([bins](ProbeSettings& p) { p.bins = bins; }, tr("Use %1 bins").arg(bins));
    });
    connect(straight_, &StraightLinePanel::smoothToggled, this, [this](bool on) {
        editSettings([on](ProbeSettings& p) { p.show_smooth = on; },
                     on ? tr("Show the smooth curve") : tr("Hide the smooth curve"));
    });
    connect(straight_, &StraightLinePanel::bandwidthChanged, this, [this](double h) {
        const Analysis* a = doc_->analysis(id_);
        const double old = a ? a->probe.smooth_bandwidth : h;
        if (!a || old == h || (std::isnan(old) && std::isnan(h))) return;
        editSettings(
            [h](ProbeSettings& p) { p.smooth_bandwidth = h; },
            std::isnan(h) ? tr("Choose the bandwidth by cross-validation") : tr("Use bandwidth %1").arg(numberText(h)));
    });
}

QSlider* ProbeSection::slider() const { return slider_->slider(); }

void ProbeSection::changeEvent(QEvent* event) {
    AnalysisSection::changeEvent(event);
    if (event->type() == QEvent::PaletteChange && engine_.valid()) fillReadoutContext();
}

QList<FigureSource*> ProbeSection::figures() {
    if (pages_->currentIndex() == CellsPage) return {cells_};
    if (pages_->currentIndex() != ProbePage) return {};
    if (surfaceToggle_->isChecked()) return {surface_, effect_};
    return {lines_, effect_};
}

QList<FigureSource*> ProbeSection::reportFigures(const AnalysisRun& run) const {
    if (run.kind == ProbeKind::Cells) return run.cells ? QList<FigureSource*>{cells_} : QList<FigureSource*>{};
    if (!run.probe) return {};
    QList<FigureSource*> out{lines_, effect_};
    if (run.surface) out << surface_;
    return out;
}

EffectPoint ProbeSection::currentEffect() const { return readout_->point(); }
QString ProbeSection::readoutText() const { return readout_->text(); }

void ProbeSection::showAnalysis(const QString& id, std::shared_ptr<const AnalysisRun> run, const QString& error) {
    const Analysis* a = doc_->analysis(id);
    if (id == id_ && run == run_ && error == error_ && a && *a == shown_) return;
    if (prepare_ && id == id_ && run == run_ && error == error_) return;  // being prepared already
    if (id != id_) surfaceToggle_->setChecked(false);
    id_ = id;
    run_ = std::move(run);
    error_ = error;
    const double cells =
        run_ ? static_cast<double>(run_->design.X.rows()) * static_cast<double>(run_->design.X.cols()) : 0.0;
    if (a && run_ && run_->probe && run_->kind != ProbeKind::Cells && cells >= threshold_) {
        startPrepare();  // rebuild() follows when the engine is ready
        return;
    }
    dropPrepare();
    rebuild();
}

void ProbeSection::startPrepare() {
    dropPrepare();
    const int generation = ++prepareGeneration_;
    auto out = std::make_shared<ProbeEngine>();
    prepare_ = new BackgroundJob(this);
    connect(prepare_, &BackgroundJob::finished, this, [this, job = prepare_, generation, out](bool cancelled) {
        job->deleteLater();
        if (generation != prepareGeneration_ || cancelled) return;  // dropped: a newer run is on its way
        prepare_ = nullptr;
        Q_EMIT preparingChanged(false);
        if (out->valid() && &out->run() == run_.get()) prepared_ = out;  // else rebuild() builds it here
        rebuild();
    });
    Q_EMIT preparingChanged(true);
    prepare_->start([run = run_, a = *doc_->analysis(id_), out](const BackgroundJob::Progress&) {
        try {
            ProbeEngine engine(run, a);
            engine.prepareExtras();
            *out = std::move(engine);
        } catch (const std::exception&) {
            *out = ProbeEngine();  // rebuild() tries again on the UI thread and shows what fails
        }
    });
}

void ProbeSection::dropPrepare() {
    prepared_.reset();
    if (!prepare_) return;
    ++prepareGeneration_;  // its engine is dropped when it arrives
    prepare_->cancel();
    prepare_ = nullptr;
    Q_EMIT preparingChanged(false);
}

void ProbeSection::showMessage(const QString& text) {
    engine_ = ProbeEngine();
    message_->setText(text);
    pages_->setCurrentIndex(MessagePage);
    lines_->clear();
    effect_->clear();
    readout_->clear(text);
}

void ProbeSection::rebuild() {
    const Analysis* a = doc_->analysis(id_);
    if (!a) {
        showMessage(tr("No analysis selected."));
        return;
    }
    shown_ = *a;
    if (!run_) {
        showMessage(error_.isEmpty() ? tr("Fitting…") : error_);
        return;
    }
    if (run_->kind == ProbeKind::Cells) {
        engine_ = ProbeEngine();
        cells_->setRun(*a, *run_);
        pages_->setCurrentIndex(CellsPage);
        return;
    }
    if (!run_->probe) {
        showMessage(tr("This analysis has no probe to show."));
        return;
    }
    rebuilding_ = true;
    if (prepared_ && &prepared_->run() == run_.get()) {
        engine_ = std::move(*prepared_);  // built in a worker for this very run
    } else {
        // The same run again (a view setting changed): keep what was prepared for it.
        auto extras = engine_.valid() && &engine_.run() == run_.get() ? engine_.extras() : nullptr;
        engine_ = ProbeEngine(run_, *a, std::move(extras));
        engine_.prepareExtras();  // at once for small data; big data's come from the worker
    }
    prepared_.reset();
    pages_->setCurrentIndex(ProbePage);

    const ProbeSettings& ps = a->probe;
    band_->setCurrentIndex(simultaneousShown() ? 1 : 0);
    band_->setEnabled(engine_.hasSimultaneous());
    band_->setVisible(!engine_.groups());
    band_->setToolTip(engine_.hasSimultaneous()
                          ? band_->toolTip()
                          : tr("No simultaneous band here: on the %1 scale the effect is not linear in the "
                               "coefficients")
                                .arg(engine_.words().outcomeScale));
    points_->setChecked(ps.show_points);
    differ_->setChecked(ps.show_gaps);
    extend_->setChecked(ps.extend_to_boundaries);
    extend_->setVisible(!engine_.groups());
    points_->setEnabled(!engine_.generalizedModel() || engine_.probability());
    syncJitterToggle(ps);
    syncScaleChoice(ps);
    adjust_->setVisible(run_->probe->slope_contrasts.size() > 1);
    adjust_->setCurrentIndex(std::max(0, adjust_->findData(static_cast<int>(ps.adjustment))));
    const bool surfaceOk = run_->surface.has_value();
    surfaceToggle_->setVisible(surfaceOk);
    if (!surfaceOk) surfaceToggle_->setChecked(false);
    if (surfaceOk) surface_->setRun(*a, *run_, engine_.surfaceRegion(), engine_.surfacePoints());
    linesStack_->setCurrentIndex(surfaceToggle_->isChecked() ? 1 : 0);
    // A gap to shade: each pair of groups, or the lines at any two values of a numeric moderator.
    differ_->setVisible(!run_->probe->crossovers.empty());
    differ_->setText(engine_.groups() ? tr("Where groups differ") : tr("Where lines differ"));
    fillHeldValue();
    // Core's straight-line check serves linear and logistic models (not yet probit or count models).
    const bool checkable = a->family == Family::Linear || a->family == Family::Logistic;
    straight_->setVisible(run_->kind == ProbeKind::Continuous && !a->multilevel.active() && checkable);
    straight_->setAnalysis(*a, run_.get(), engine_.probability());

    if (engine_.groups()) {
        QStringList names;
        for (const auto& g : engine_.groupNames()) names << q(g);
        slider_->setGroups(q(engine_.moderator()), names);
    } else {
        const auto [lo, hi] = engine_.observedRange();
        const auto [alo, ahi] = engine_.axisRange();
        slider_->setContinuous(q(engine_.moderator()), lo, hi, alo, ahi);
    }
    double m = std::isnan(ps.current) ? engine_.defaultValue() : ps.current;
    if (engine_.groups()) m = std::clamp(std::round(m), 0.0, static_cast<double>(engine_.groupNames().size()) - 1);
    current_ = m;

    fillReadoutContext();
    buildPlots();
    fillTable();
    fillSummary();
    rebuilding_ = false;
    moveTo(current_, false);
}

// A generalized model's two scales, in its family's words, and how outcome-scale effects are averaged.
void ProbeSection::syncScaleChoice(const ProbeSettings& ps) {
    const bool generalizedModel = engine_.generalizedModel();
    scaleLabel_->setVisible(generalizedModel);
    scale_->setVisible(generalizedModel);
    const ScaleWords words = engine_.words();
    scale_->setItemText(0, words.modelSwitch);
    scale_->setItemText(1, words.outcomeSwitch);
    scale_->setItemData(0, tr("Effects on the %1 scale, the scale of the model's coefficients").arg(words.modelScale),
                        Qt::ToolTipRole);
    scale_->setItemData(1, tr("Effects on the outcome's own scale: %1").arg(words.outcomeOf), Qt::ToolTipRole);
    scale_->setCurrentIndex(engine_.probability() ? 1 : 0);
    averaging_->setVisible(generalizedModel && engine_.probability());
    averaging_->setCurrentIndex(ps.averaging == Averaging::AtValues ? 1 : 0);
}

bool ProbeSection::simultaneousShown() const {
    return shown_.probe.simultaneous_band && engine_.valid() && engine_.hasSimultaneous();
}

QString ProbeSection::effectTitle() const {
    const QString f = q(engine_.focal()), y = q(engine_.outcome());
    if (engine_.probability()) return tr("Effect of %1 on %2").arg(f, engine_.words().outcomeOf);
    if (engine_.generalizedModel()) return tr("Effect of %1 on the %2").arg(f, engine_.words().modelOf);
    return tr("Effect of %1 on %2").arg(f, y);
}

QString ProbeSection::productCoefficientText() const {
    // " (setup_sessions×employees = 0.0003627)": the fit's own coefficient, when the model has one product term.
    const Design& d = run_->design;
    const int i = d.column_of({{engine_.focal(), "", 1}, {engine_.moderator(), "", 1}});
    if (i < 0) return {};
    return QStringLiteral(" (%1 = %2)")
        .arg(q(d.columns[static_cast<std::size_t>(i)].label), numberText(run_->fit.beta[i]));
}

QString ProbeSection::outcomeWhat() const {
    if (engine_.probability()) return engine_.words().outcomeOf;
    return engine_.words().modelOf;
}

QString ProbeSection::heldText() const {
    if (!engine_.valid()) return {};
    return heldValueText(shown_, run_->design);
}

void ProbeSection::fillHeldValue() {
    const std::string& second = shown_.roles.second_moderator;
    const Design& d = run_->design;
    held_->setVisible(!second.empty());
    if (second.empty()) return;
    const double v = shown_.probe.second_value;
    if (const CategoricalInfo* cat = d.categorical(second)) {
        QStringList levels;
        for (const auto& l : cat->levels) levels << q(l);
        held_->setLevels(q(second), levels, v, false);
    } else if (const auto it = d.summaries.find(second); it != d.summaries.end()) {
        const NumericSummary& s = it->second;
        if (d.is_binary(second)) held_->setLevels(q(second), {}, v, true, s.mean);
        else held_->setNumeric(q(second), s.mean, s.sd, s.min, s.max, v);
    }
}

QString ProbeSection::moderatorLabel(double m) const {
    if (engine_.groups()) {
        const auto& names = engine_.groupNames();
        const std::size_t k =
            static_cast<std::size_t>(std::clamp(std::lround(m), 0L, static_cast<long>(names.size()) - 1));
        return QStringLiteral("%1 = %2").arg(q(engine_.moderator()), q(names[k]));
    }
    return QStringLiteral("%1 = %2").arg(q(engine_.moderator()), numberText(m));
}

void ProbeSection::fillReadoutContext() {
    if (!engine_.valid()) return;
    const ProbeResult& p = engine_.probe();
    const Analysis& a = shown_;
    const QString level = levelText(p.level);
    // A logistic model's effects are on one of two scales: say which. A linear model has only its outcome's.
    QString scale;
    const ScaleWords words = engine_.words();
    if (engine_.probability())
        scale = (p.averaging == Averaging::AtValues ? tr("%1 scale, other predictors at their means")
                                                    : tr("%1 scale, averaged over the observed rows"))
                    .arg(capitalized(words.outcomeScale));
    else if (engine_.generalizedModel()) scale = tr("%1 scale").arg(capitalized(words.modelScale));
    QString statement = tr("%1 SEs · %2 pointwise interval").arg(seDescription(a, *run_), level);
    if (!scale.isEmpty()) statement = tr("%1 · %2").arg(scale, statement);
    const QString held = heldText();
    if (!held.isEmpty()) statement = tr("With %1 · %2").arg(held, statement);
    if (simultaneousShown())
        statement +=
            tr(" · band: %1 simultaneous (critical value %2)").arg(level, numberText(p.simultaneous->critical_value));
    statement += tr(" · n\u00A0=\u00A0%1").arg(countText(static_cast<long long>(run_->fit.n)));
    readout_->setContext(effectTitle(), statisticText(p.df), tr("%1 CI").arg(level), statement);

    const QString f = escaped(q(engine_.focal())), mod = escaped(q(engine_.moderator()));
    const QString yWhat = escaped(outcomeWhat());
    // Subtitles in the palette's quieter text colour (readable on a light or dark desktop).
    const QString muted = cssColour(mutedText(palette()));
    const QString with = held.isEmpty() ? QString() : tr(" · with %1").arg(escaped(held));
    if (surfaceToggle_->isChecked())
        linesTitle_->setText(tr("<b>Surface plot</b> &nbsp;<span style='color:%1'>predicted %2 over %3 and %4%5</span>")
                                 .arg(muted, yWhat, f, mod, with));
    else
        linesTitle_->setText(
            tr("<b>Lines plot</b> &nbsp;<span style='color:%1'>predicted %2 against %3, one line per %4%5</span>")
                .arg(muted, yWhat, f, engine_.groups() ? tr("group of %1").arg(mod) : tr("value of %1").arg(mod),
                     with));
    effectTitle_->setText(tr("<b>Effect plot</b> &nbsp;<span style='color:%1'>effect of %2 against %3%4 · drag to move "
                             "the moderator</span>")
                              .arg(muted, f, mod, with));
}

void ProbeSection::buildPlots() {
    const ProbeResult& p = engine_.probe();
    const bool groups = engine_.groups();
    const bool sim = simultaneousShown();
    const QString level = levelText(p.level);

    buildEffectPlot(sim, level);
    LinesPlotData l = linesPlotData();
    addCrossings(l, level);
    // Where two groups (or any two lines) differ: core's gap regions, clipped to the data, one row per pair.
    if (differ_->isChecked() && !p.crossovers.empty()) {
        const QStringList pairs = pairNames();
        for (std::size_t k = 0; k < p.crossovers.size(); ++k) {
            LinesPlotData::DifferRow row;
            row.spans =
                describeGap(p.crossovers[k].gap_regions, QString(), q(engine_.focal()), engine_.focalRange(), level)
                    .differ;
            if (p.crossovers.size() > 1 && k < static_cast<std::size_t>(pairs.size()))
                row.label = pairs[static_cast<qsizetype>(k)];
            l.differ.push_back(row);
        }
        l.differName = !groups                   ? tr("lines differ")
                       : p.crossovers.size() > 1 ? tr("pair differs (unadjusted)")
                                                 : tr("groups differ");
    }
    lines_->setData(l);
}

// Jitter is offered for a discrete focal predictor only (observed_points.hpp).
void ProbeSection::syncJitterToggle(const ProbeSettings& ps) {
    const auto linesPoints = engine_.linesPoints();
    jitter_->setVisible(linesPoints && discreteFocal(*linesPoints));
    jitter_->setChecked(ps.jitter);
    jitter_->setEnabled(points_->isEnabled() && ps.show_points);
}

void ProbeSection::buildEffectPlot(bool sim, const QString& level) {
    const bool groups = engine_.groups();
    // Effect plot.
    EffectPlotData e;
    e.groups = groups;
    e.moderatorTitle = q(engine_.moderator());
    e.effectTitle = effectTitle();
    if (groups) {
        for (std::size_t k = 0; k < engine_.groupNames().size(); ++k) {
            e.groupNames.push_back(q(engine_.groupNames()[k]));
            e.legendNames.push_back(QStringLiteral("%1 = %2").arg(q(engine_.moderator()), q(engine_.groupNames()[k])));
            e.groupEffects.push_back(engine_.effectAt(static_cast<double>(k)));
        }
    } else {
        e.curve = engine_.effectCurve(sim);
        e.bandName = sim ? tr("%1 simultaneous band").arg(level) : tr("%1 pointwise band").arg(level);
        if (const SignificanceRegions* r = engine_.regions(sim)) {
            e.significant = r->significant;
            e.boundaries = r->boundaries;
        }
        e.observed = engine_.observedRange();
        e.axis = engine_.axisRange();
        e.rug = engine_.rug();
        e.overlays = straightLineOverlays(*run_, shown_.probe, engine_.probability());
        if (const auto& spread = engine_.probe().group_slopes) {
            const double half = spread->critical_value * spread->sd;
            for (CurvePoint c : engine_.effectCurve(false)) {
                c.lower = c.estimate - half;
                c.upper = c.estimate + half;
                e.groupSpread.push_back(c);
            }
            e.groupSpreadName = tr("%1 of groups' own slopes").arg(level);
        }
    }
    effect_->setData(e);
}

void ProbeSection::addGroupLines(LinesPlotData& l) {
    if (!run_->fit.multilevel) return;
    const auto lines = group_lines(run_->design, run_->fit, engine_.focal(), engine_.moderator(), 20);
    for (const GroupLine& g : lines) {
        std::vector<CurvePoint> points = engine_.lineAt(g.moderator);
        for (CurvePoint& c : points) {
            c.estimate += g.intercept_shift + g.slope_shift * c.x;
            c.lower = c.upper = c.estimate;
        }
        l.groupLines.push_back(std::move(points));
    }
    if (!lines.empty())
        l.groupLinesName = tr("%1 of %2 groups' own lines")
                               .arg(static_cast<int>(lines.size()))
                               .arg(static_cast<int>(run_->fit.multilevel->groups_count));
}

LinesPlotData ProbeSection::linesPlotData() {
    const ProbeResult& p = engine_.probe();
    const bool groups = engine_.groups();
    // The lines: one per group, or per pinned (or default) moderator value.
    LinesPlotData l;
    l.focalTitle = q(engine_.focal());
    l.outcomeTitle = engine_.probability() ? engine_.words().outcomeOf : engine_.words().modelOf;
    l.xRange = engine_.focalRange();
    const double xw = l.xRange.second - l.xRange.first;
    // A focal predictor observed only at 0 or above gets no negative margin.
    l.xRange = {l.xRange.first >= 0 ? std::max(0.0, l.xRange.first - 0.02 * xw) : l.xRange.first - 0.02 * xw,
                l.xRange.second + 0.02 * xw};
    // What the outcome can take: a probability, or a value observed only at 0 or above.
    const Eigen::VectorXd& observedY = run_->design.y;
    const Family family = run_->fit.family;
    if (engine_.probability() && binary_outcome(family)) l.yBounds = {0.0, 1.0};
    else if (engine_.probability() && count_outcome(family)) l.yBounds.first = 0.0;
    else if (!engine_.generalizedModel() && observedY.size() > 0 && observedY.minCoeff() >= 0) l.yBounds.first = 0.0;
    groupLines_.clear();
    const QString mod = q(engine_.moderator());
    if (groups) {
        for (std::size_t k = 0; k < engine_.groupNames().size(); ++k) {
            groupLines_.push_back(engine_.lineAt(engine_.groupValues()[k]));
            l.lines.push_back({QStringLiteral("%1 = %2").arg(mod, q(engine_.groupNames()[k])), groupLines_.back(),
                               static_cast<int>(k)});
        }
    } else {
        int k = 0;
        for (const auto& ef : p.effects) {
            QString name = QStringLiteral("%1 = %2").arg(mod, numberText(ef.moderator_value));
            const QString tag = defaultTag(p, ef.moderator_value);
            if (!tag.isEmpty()) name += QStringLiteral(" (%1)").arg(tag);
            if (ef.beyond_data) name += tr(" (beyond the data)");
            l.lines.push_back({name, engine_.lineAt(ef.moderator_value), k});
            ++k;
        }
        l.highlightName = tr("at the slider's value");
        addGroupLines(l);
        for (double m : {engine_.axisRange().first, engine_.axisRange().second})
            for (CurvePoint c : engine_.lineAt(m, 3)) {
                c.lower = c.upper = c.estimate;  // keep the slider's line in view, not its whole band
                l.yExtent.push_back(c);
            }
    }
    l.showPoints = shown_.probe.show_points && (!engine_.generalizedModel() || engine_.probability());
    if (l.showPoints) {
        l.points = engine_.linesPoints();
        l.jitter = shown_.probe.jitter;
        l.pointsByGroup = groups;
    }
    return l;
}

// Core lists the pairs of groups in order: (0,1), (0,2), ..., (1,2), ...
std::vector<std::pair<QString, QString>> ProbeSection::pairLevels() const {
    std::vector<std::pair<QString, QString>> pairs;
    const auto& names = engine_.groupNames();
    for (std::size_t a = 0; a < names.size(); ++a)
        for (std::size_t b = a + 1; b < names.size(); ++b) pairs.emplace_back(q(names[a]), q(names[b]));
    return pairs;
}

// Each pair as it is named on the plot ("day/night").
QStringList ProbeSection::pairNames() const {
    QStringList out;
    for (const auto& [a, b] : pairLevels()) out << a + u'/' + b;
    return out;
}

// The first group of the k-th pair in core's order.
std::size_t ProbeSection::pairFirst(std::size_t k) const {
    const std::size_t L = engine_.groupValues().size();
    for (std::size_t a = 0; a < L; ++a) {
        if (k < L - a - 1) return a;
        k -= L - a - 1;
    }
    return 0;
}

// Crossover points inside the data.
void ProbeSection::addCrossings(LinesPlotData& l, const QString& level) {
    const ProbeResult& p = engine_.probe();
    const bool groups = engine_.groups();
    const auto [flo, fhi] = engine_.focalRange();
    l.crossingName = tr("lines cross (%1 interval)").arg(level);
    const QStringList pairs = pairNames();
    for (std::size_t c = 0; c < p.crossovers.size(); ++c) {
        const Crossover& x = p.crossovers[c];
        if (!std::isfinite(x.focal_value) || x.focal_value < flo || x.focal_value > fhi) continue;
        // The lines meet here; any of the two gives the height (the first group of the pair, or the mean).
        double at = engine_.defaultValue();
        QString label;
        if (groups) {
            at = engine_.groupValues()[pairFirst(c)];
            if (p.crossovers.size() > 1 && c < static_cast<std::size_t>(pairs.size()))
                label = pairs[static_cast<qsizetype>(c)];
        }
        const auto pt = prediction_line(run_->design, run_->fit, engine_.focal(), engine_.heldValues(at),
                                        {x.focal_value}, engine_.probability());
        LinesPlotData::Crossing cr;
        cr.x = x.focal_value;
        cr.y = pt.front().estimate;
        cr.bounded = x.ci_kind == FiellerInterval::Bounded;
        cr.lower = x.ci_lower;
        cr.upper = x.ci_upper;
        cr.label = label;
        l.crossings.push_back(cr);
    }
}

// Which default a moderator value is ("mean − 1 SD", "10th percentile"; empty: none).
QString ProbeSection::defaultTag(const ProbeResult& p, double value) {
    const double tol = 1e-9 * std::max(1.0, std::abs(p.moderator_mean) + p.moderator_sd);
    const auto near = [&](double a) { return std::abs(value - a) <= tol; };
    if (p.points == ProbePoints::Percentiles) {
        if (near(p.moderator_percentiles[0])) return tr("10th percentile");
        if (near(p.moderator_percentiles[1])) return tr("median");
        if (near(p.moderator_percentiles[2])) return tr("90th percentile");
        return {};
    }
    if (p.points != ProbePoints::MeanSd) return {};
    if (near(p.moderator_mean)) return tr("mean");
    if (p.moderator_sd > 0 && near(p.moderator_mean - p.moderator_sd)) return tr("mean − 1 SD");
    if (p.moderator_sd > 0 && near(p.moderator_mean + p.moderator_sd)) return tr("mean + 1 SD");
    return {};
}

// The index of `value` among the pins (-1: not pinned).
int ProbeSection::pinIndex(const std::vector<double>& pins, double value) {
    for (std::size_t i = 0; i < pins.size(); ++i)
        if (std::abs(pins[i] - value) <= 1e-9 * std::max(1.0, std::abs(value))) return static_cast<int>(i);
    return -1;
}

void ProbeSection::fillTable() {
    const ProbeResult& p = engine_.probe();
    std::vector<PinnedTableModel::Row> rows;
    const QString mod = q(engine_.moderator());
    if (engine_.groups()) {
        for (std::size_t k = 0; k < p.effects.size(); ++k)
            rows.push_back({q(k < engine_.groupNames().size() ? engine_.groupNames()[k] : p.effects[k].level),
                            p.effects[k], false, -1, std::nullopt});
        pinned_->setCaption(tr("The effect of %1 in each group of %2.").arg(q(engine_.focal()), mod));
    } else {
        const auto& pins = shown_.probe.pinned;
        for (const auto& e : p.effects) {
            const int pin = pinIndex(pins, e.moderator_value);
            rows.push_back({numberText(e.moderator_value), e, pin >= 0, pin, std::nullopt});
        }
        QString caption = p.points == ProbePoints::Percentiles
                              ? tr("Shown at the 10th, 50th and 90th percentiles of %1 (it is skewed, or mean ± 1 SD "
                                   "would leave the data)")
                                    .arg(mod)
                              : tr("Shown at the mean of %1 and one SD either side").arg(mod);
        caption += pins.empty() ? tr(". Move the slider and press Pin to add your own values.")
                                : tr(", with your pinned values, in order of value.");
        bool beyond = false;
        for (const auto& e : p.effects) beyond |= e.beyond_data;
        if (beyond) {
            const auto [lo, hi] = engine_.observedRange();
            caption +=
                (caption.isEmpty() ? QString() : QStringLiteral(" ")) +
                tr("Shaded rows in italics lie beyond the data (%1 observed from %2).").arg(mod, rangeText(lo, hi));
        }
        pinned_->setCaption(caption);
    }
    // A count model's rate ratios, at the same moderator values as the effects (core computes both).
    if (p.rate_ratios.size() == rows.size()) {
        for (std::size_t k = 0; k < rows.size(); ++k) rows[k].ratio = p.rate_ratios[k];
        pinned_->setCaption(pinned_->caption() + QStringLiteral(" ") +
                            tr("Rate ratio: the factor on the %1 for %2 (1 is no effect).")
                                .arg(run_->fit.exposure.empty() ? tr("expected count") : tr("rate"),
                                     p.binary_focal ? tr("%1 from 0 to 1").arg(q(engine_.focal()))
                                                    : tr("one unit more of %1").arg(q(engine_.focal()))));
    }
    const QString level = levelText(p.level);
    pinned_->model()->setRows(std::move(rows), mod, statisticText(p.df), level);
}

// The summary's text as HTML (for the label) and as plain lines (for copying).
struct SummaryText {
    QStringList html, plain;
    void section(const QString& title) {
        html << QStringLiteral("<p style='margin-top:6px'><b>%1</b><br>").arg(escaped(title));
        plain << title;
    }
    void line(const QString& text) {
        html << escaped(text) + QStringLiteral("<br>");
        plain << text;
    }
    void end() { html << QStringLiteral("</p>"); }
};

void ProbeSection::fillSummary() {
    const ProbeResult& p = engine_.probe();
    SummaryText out;
    summarizeInteraction(out);
    summarizeComparisons(out);
    if (!engine_.groups()) summarizeRegions(out);
    summarizeCrossovers(out);
    // Where the groups (or the lines) differ: the Johnson–Neyman technique on the gap between them.
    if (!p.crossovers.empty()) summarizeGaps(out);
    out.section(tr("Cautions"));
    for (const auto& c : run_->cautions) out.line(QStringLiteral("• ") + q(c));
    out.end();
    if (!p.notes.empty()) {
        out.section(tr("Notes"));
        for (const auto& n : p.notes) out.line(QStringLiteral("• ") + q(n));
        out.end();
    }
    summary_->setText(out.html.join(QString()));
    summaryPlain_ = out.plain.join(QLatin1Char('\n'));
}

void ProbeSection::summarizeInteraction(SummaryText& out) {
    const ProbeResult& p = engine_.probe();
    const ScaleWords words = engine_.words();
    const QString mod = q(engine_.moderator());
    if (p.interaction_effect) {
        // The interaction on the outcome's scale (Ai & Norton), which is not the product coefficient.
        const auto& ie = *p.interaction_effect;
        const QString level = levelText(p.level);
        out.section(tr("Interaction on the %1 scale").arg(words.outcomeScale));
        QString kind = QString::fromLatin1(to_string(ie.kind));
        if (!kind.isEmpty()) kind[0] = kind[0].toUpper();
        out.line(tr("%1 of %2: %3 (SE %4, %5 CI %6, p %7)")
                     .arg(kind, words.outcomeOf, numberText(ie.estimate), numberText(ie.std_error), level,
                          rangeText(ie.ci_lower, ie.ci_upper), pValueText(ie.p_value)));
        out.line(tr("How the effect of %1 on %2 changes with %3, %4 (Ai & Norton). The product coefficient "
                    "on the %5 scale%6 is not this: it does not give the size, or even the sign, of the "
                    "interaction on the %7 scale.")
                     .arg(q(engine_.focal()), words.outcomeOf, mod,
                          p.averaging == Averaging::AtValues ? tr("at the means of the other predictors")
                                                             : tr("averaged over the observed rows"),
                          words.modelScale, productCoefficientText(), words.outcomeScale));
        out.end();
    } else if (engine_.generalizedModel()) {
        out.section(tr("Interaction on the %1 scale").arg(words.modelScale));
        out.line(tr("The product coefficient%1 is the interaction on the %2 scale only; it is not the interaction "
                    "on the %3 scale. Choose the %3 scale to see that (Ai & Norton).")
                     .arg(productCoefficientText(), words.modelScale, words.outcomeScale));
        out.end();
    }
}

void ProbeSection::summarizeComparisons(SummaryText& out) {
    const ProbeResult& p = engine_.probe();
    const QString focal = q(engine_.focal()), mod = q(engine_.moderator());
    if (p.interaction_test) {
        const WaldTest& t = *p.interaction_test;
        out.section(tr("Does the effect of %1 depend on %2?").arg(focal, mod));
        const QString stat = std::isinf(t.df2)
                                 ? tr("χ²(%1) = %2").arg(exactText(t.df1), numberText(t.chi_square))
                                 : tr("F(%1, %2) = %3").arg(exactText(t.df1), dfText(t.df2), numberText(t.statistic));
        const QString se = run_->fit.multilevel ? seDescription(shown_, *run_) : seKindName(run_->fit.se);
        out.line(tr("Joint test of the interaction with %1 standard errors (the test to report): %2, %3.")
                     .arg(se, stat, pClauseText(t.p_value)));
        if (engine_.probability())
            out.line(tr("Tested on the %1 scale, on the model's coefficients.").arg(engine_.words().modelScale));
        out.end();
    }
    if (p.slope_contrasts.size() < 2) return;
    out.section(tr("Differences between groups in the effect of %1 (p %2)")
                    .arg(focal, QString::fromLatin1(adjustment_text(p.adjustment))));
    for (const SlopeContrast& c : p.slope_contrasts)
        out.line(tr("%1 − %2: %3 (SE %4, %5 CI %6), %7, adjusted %8")
                     .arg(q(c.second), q(c.first), numberText(c.estimate), numberText(c.std_error), levelText(p.level),
                          rangeText(c.ci_lower, c.ci_upper), pClauseText(c.p_value), pClauseText(c.p_adjusted)));
    out.line(tr("%1 pairs compared; each difference is the second group's effect minus the first's.")
                 .arg(p.slope_contrasts.size()));
    out.end();
}

void ProbeSection::summarizeRegions(SummaryText& out) {
    const ProbeResult& p = engine_.probe();
    const QString mod = q(engine_.moderator());
    const bool sim = simultaneousShown();
    const SignificanceRegions* r = engine_.regions(sim);
    out.section(sim ? tr("Region of significance (simultaneous band)") : tr("Region of significance (Johnson–Neyman)"));
    if (!r) {
        if (p.binary_moderator)
            out.line(tr("%1 takes only the values 0 and 1: the effects at 0 and 1 are the whole story, so no region "
                        "of significance over %1 is reported")
                         .arg(mod));
    } else {
        if (sim)
            out.line(tr("Where the whole simultaneous band excludes zero (critical value %1).")
                         .arg(numberText(r->critical_value)));
        else
            out.line(tr("Where the %1 pointwise interval excludes zero (critical value %2).")
                         .arg(levelText(p.level), numberText(r->critical_value)));
        // The memo's own sentences, so the two say the same.
        if (sim) out.line(q(simultaneous_region_sentence(shown_, *run_)));
        else
            for (const std::string& sentence : region_sentences(shown_, *run_)) out.line(q(sentence));
    }
    out.end();
}

void ProbeSection::summarizeCrossovers(SummaryText& out) {
    const ProbeResult& p = engine_.probe();
    out.section(tr("Crossover point"));
    bool any = false;
    for (const Crossover& c : p.crossovers) {
        if (!std::isfinite(c.focal_value)) continue;
        any = true;
        QString interval;
        if (c.ci_kind == FiellerInterval::Bounded) interval = tr("interval %1").arg(rangeText(c.ci_lower, c.ci_upper));
        else if (c.ci_kind == FiellerInterval::Unbounded)
            interval =
                tr("interval unbounded: below %1 and above %2").arg(numberText(c.ci_lower), numberText(c.ci_upper));
        else if (c.ci_kind == FiellerInterval::WholeLine) interval = tr("the interval is the whole line");
        const auto [flo, fhi] = engine_.focalRange();
        out.line(tr("%1: the lines cross at %2 = %3 (%4), %5.")
                     .arg(q(c.groups), q(engine_.focal()), numberText(c.focal_value), interval,
                          c.within_observed_range ? tr("inside the data")
                                                  : tr("beyond the data (observed %1)").arg(rangeText(flo, fhi))));
    }
    if (!any) out.line(tr("The lines are parallel: they do not cross."));
    out.end();
}

void ProbeSection::summarizeGaps(SummaryText& out) {
    const ProbeResult& p = engine_.probe();
    const QString mod = q(engine_.moderator());
    const QString level = levelText(p.level);
    const QString predicted = engine_.words().modelOf;
    const bool groups = engine_.groups();
    out.section(groups ? tr("Where the groups differ") : tr("Where the lines differ"));
    const auto pairs = pairLevels();
    for (std::size_t k = 0; k < p.crossovers.size(); ++k) {
        QString subject;
        if (!groups) subject = tr("Predicted %1 at any two values of %2").arg(predicted, mod);
        else if (p.crossovers.size() == 1 || k >= pairs.size())
            subject = tr("The two groups' predicted %1").arg(predicted);
        else subject = tr("Predicted %1 for %2 = %3 and %2 = %4").arg(predicted, mod, pairs[k].first, pairs[k].second);
        out.line(
            describeGap(p.crossovers[k].gap_regions, subject, q(engine_.focal()), engine_.focalRange(), level).text);
    }
    if (groups && p.crossovers.size() > 1)
        out.line(tr("Each of the %1 pairs is tested on its own at each value of %2, with no adjustment for the "
                    "number of pairs: some of these differences will show by chance.")
                     .arg(p.crossovers.size())
                     .arg(q(engine_.focal())));
    if (engine_.probability())
        out.line(tr("Tested on the %1 scale: where the lines differ there, they differ on the %2 scale too.")
                     .arg(engine_.words().modelScale, engine_.words().outcomeScale));
    out.end();
}

void ProbeSection::moveTo(double m, bool live) {
    if (!engine_.valid()) return;
    current_ = m;
    const bool compute = !live || engine_.effectIsCheap();
    if (compute) point_ = engine_.effectAt(m);
    EffectPoint shown = point_;
    std::optional<std::pair<double, double>> band;
    if (simultaneousShown() && compute) {
        const auto b = effect_band(engine_.probe().effect_function, {m}, engine_.probe().simultaneous->critical_value);
        band = std::make_pair(b.front().lower, b.front().upper);
        shown.ci_lower = band->first;  // the handle's bar shows the band that is drawn
        shown.ci_upper = band->second;
    }
    if (compute) effect_->setCurrent(m, shown, true);
    else {
        EffectPoint moving = shown;
        moving.estimate = std::nan("");
        effect_->setCurrent(m, moving, true);
    }
    if (engine_.groups()) {
        const std::size_t k = static_cast<std::size_t>(std::lround(m));
        lines_->setHighlight(k < groupLines_.size() ? groupLines_[k] : std::vector<CurvePoint>{}, static_cast<int>(k),
                             true, moderatorLabel(m));
    } else {
        lines_->setHighlight(engine_.lineAt(m, engine_.probability() ? 61 : 21), -1, true, moderatorLabel(m));
    }
    readout_->setPoint(moderatorLabel(m), point_, band, !compute);
    slider_->setValue(m);
}

void ProbeSection::commitCurrent(double m, bool mergeWithPrevious) {
    if (!engine_.valid()) return;
    const Analysis* a = doc_->analysis(id_);
    if (!a) return;
    if (!mergeWithPrevious || !lastWasKeyboard_) ++gesture_;
    lastWasKeyboard_ = mergeWithPrevious;
    if (sameNumber(a->probe.current, m)) return;
    Analysis after = *a;
    after.probe.current = m;
    shown_.probe.current = m;
    doc_->setAnalysis(after, tr("Move the moderator to %1").arg(moderatorLabel(m)),
                      QStringLiteral("probe-current:%1:%2").arg(id_).arg(gesture_));
}

void ProbeSection::setCurrentModeratorValue(double m) {
    lastWasKeyboard_ = false;
    moveTo(m, false);
    commitCurrent(m, false);
}

void ProbeSection::applyPreset(const QString& key) {
    if (!engine_.valid() || engine_.groups()) return;
    const Design& d = run_->design;
    const auto it = d.summaries.find(engine_.moderator());
    if (it == d.summaries.end()) return;
    double m = it->second.mean;
    if (key == QStringLiteral("mean-sd")) m = it->second.mean - it->second.sd;
    else if (key == QStringLiteral("mean+sd")) m = it->second.mean + it->second.sd;
    else if (key.startsWith(QLatin1Char('p'))) m = d.percentile(engine_.moderator(), key.mid(1).toDouble());
    if (std::isnan(m)) return;
    setCurrentModeratorValue(m);
}

void ProbeSection::pinCurrentValue() {
    if (!engine_.valid() || engine_.groups()) return;
    const double m = current_;
    const Analysis* a = doc_->analysis(id_);
    if (!a) return;
    const auto [lo, hi] = engine_.observedRange();
    const double tol = 1e-9 * std::max(1.0, hi - lo);
    for (double v : a->probe.pinned)
        if (std::abs(v - m) <= tol) return;  // already pinned
    Analysis after = *a;
    after.probe.pinned.push_back(m);
    after.probe.current = m;
    doc_->setAnalysis(after, tr("Pin %1").arg(moderatorLabel(m)));
}

void ProbeSection::removePinned(const std::vector<int>& indices) {
    const Analysis* a = doc_->analysis(id_);
    if (!a || indices.empty()) return;
    Analysis after = *a;
    std::vector<int> sorted = indices;
    std::sort(sorted.rbegin(), sorted.rend());
    for (int i : sorted)
        if (i >= 0 && i < static_cast<int>(after.probe.pinned.size()))
            after.probe.pinned.erase(after.probe.pinned.begin() + i);
    doc_->setAnalysis(after, indices.size() == 1 ? tr("Remove a pinned value") : tr("Remove pinned values"));
}

void ProbeSection::editSettings(const std::function<void(ProbeSettings&)>& edit, const QString& description) {
    const Analysis* a = doc_->analysis(id_);
    if (!a) return;
    Analysis after = *a;
    edit(after.probe);
    doc_->setAnalysis(after, description);
}

void ProbeSection::onDocumentChanged(const QString& id) {
    if (id != id_ || !engine_.valid()) return;
    const Analysis* a = doc_->analysis(id);
    if (!a) return;
    const ProbeSettings& now = a->probe;
    const ProbeSettings& was = shown_.probe;
    // A change of the probe itself (pinned values, scale, ...) arrives as a new run.
    if (!same_probe(*a, shown_)) return;
    if (now.simultaneous_band != was.simultaneous_band || now.show_points != was.show_points ||
        now.show_gaps != was.show_gaps || now.extend_to_boundaries != was.extend_to_boundaries ||
        now.jitter != was.jitter) {
        rebuild();
        return;
    }
    if (!sameNumber(now.current, was.current)) {
        shown_.probe.current = now.current;
        if (effect_->dragging()) return;
        double m = std::isnan(now.current) ? engine_.defaultValue() : now.current;
        if (!sameNumber(m, current_)) moveTo(m, false);
    }
}

}  // namespace moderato::ui
