// What the Probe section draws, asked of core for one analysis run: the
// effect at a moderator value (on the cached EffectFunction, or core's
// probability_effect on the probability scale), prediction lines along the
// focal predictor, the effect curve with its band, and the observed data the
// plots show. No statistics are computed here; this only chooses the inputs.
#pragma once

#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "common/scale_words.hpp"
#include "moderato/probing/probe_curves.hpp"
#include "moderato/probing/response_scale.hpp"
#include "moderato/probing/surface_view.hpp"
#include "moderato/project/analysis_run.hpp"
#include "plots/observed_points.hpp"

namespace moderato::ui {

// What the plots need of a run beyond the probe itself that scans every row
// (a sort of the moderator's values, a convex hull, the observed rows made
// ready to draw): computed once per run, in a worker for big data
// (ProbeSection), and handed to the engine.
struct ProbeExtras {
    std::vector<double> rug;           // rug(): distinct moderator values
    std::optional<DataRegion> region;  // the Surface plot's data region (when the run has a surface)
    // The observed rows: focal predictor and outcome per group (Lines plot),
    // focal predictor and moderator (Surface plot, when the run has a surface).
    std::shared_ptr<const LinesPoints> lines;
    std::shared_ptr<const SurfacePoints> surface;
};

class ProbeEngine {
public:
    ProbeEngine() = default;
    // `run` must hold a probe (Continuous or Groups kind). `extras`, when
    // given, must be those of an engine of the same run (else prepareExtras()
    // computes them).
    ProbeEngine(std::shared_ptr<const AnalysisRun> run, const Analysis& analysis,
                std::shared_ptr<const ProbeExtras> extras = nullptr);
    // Computes the extras now, unless the engine was given them (an engine
    // may be built and prepared in a worker: it reads only its run). Every
    // accessor of what they hold needs them.
    void prepareExtras();
    std::shared_ptr<const ProbeExtras> extras() const { return extras_; }

    bool valid() const { return run_ && run_->probe; }
    const AnalysisRun& run() const { return *run_; }
    const ProbeResult& probe() const { return *run_->probe; }
    const Analysis& analysis() const { return analysis_; }

    bool groups() const { return run_->kind == ProbeKind::Groups; }
    bool probability() const { return probe().scale == ProbeScale::Outcome; }
    // A generalized model (logistic, probit, Poisson, negative binomial): two scales to show.
    bool generalizedModel() const { return generalized(run_->fit.family); }
    // The family's words for its two scales, with this analysis's outcome.
    ScaleWords words() const {
        return scaleWords(run_->fit.family, run_->fit.exposure, QString::fromStdString(outcome()));
    }
    const std::string& focal() const { return analysis_.roles.focal; }
    const std::string& moderator() const { return analysis_.roles.moderator; }
    const std::string& outcome() const { return analysis_.roles.outcome; }

    // Groups: the group names and the moderator value of each (level index
    // for a categorical moderator, 0/1 for a 0/1 column).
    const std::vector<std::string>& groupNames() const { return groupNames_; }
    const std::vector<double>& groupValues() const { return groupValues_; }

    // Continuous: the moderator's observed range (used rows) and the Effect
    // plot's axis range (effectAxisRange: a margin beyond the data, and the
    // boundaries when the analysis extends the axis to them).
    std::pair<double, double> observedRange() const { return probe().observed_range; }
    std::pair<double, double> axisRange() const { return axisRange_; }
    std::pair<double, double> focalRange() const { return probe().focal_range; }
    // The moderator's mean; its median when the defaults are percentiles (Groups: the first group).
    double defaultValue() const;

    // The effect at moderator value m (Groups: m is the group index). Link
    // scale: O(p^2) on the cached effect function. Probability scale: core's
    // probability_effect, O(n p).
    EffectPoint effectAt(double m) const;
    // Whether effectAt is cheap enough for every frame of a drag.
    bool effectIsCheap() const;

    // Held values with the moderator at m (second moderator at its held value,
    // the rest at means / reference levels).
    std::map<std::string, double> heldValues(double moderatorValue) const;
    // The predicted outcome along the focal predictor (its observed range)
    // with the moderator at `moderatorValue` (Groups: the group's value).
    std::vector<CurvePoint> lineAt(double moderatorValue, int points = 64) const;

    // Effect curve with its band over the axis range: pointwise (the fit's
    // critical value) or the simultaneous band. Probability scale: core's
    // probability_effect on a grid (pointwise only).
    std::vector<CurvePoint> effectCurve(bool simultaneous, int points = 161) const;
    // Whether the simultaneous band exists for this result (link scale, numeric non-0/1 moderator).
    bool hasSimultaneous() const { return probe().simultaneous.has_value(); }
    // The regions of significance for the band shown (nullptr when none).
    const SignificanceRegions* regions(bool simultaneous) const;

    // Observed data on the used rows, ready to draw: focal values against
    // outcome values by group (Groups; else one group), and focal values
    // against moderator values (nullptr without a surface).
    std::shared_ptr<const LinesPoints> linesPoints() const { return extras_ ? extras_->lines : nullptr; }
    std::shared_ptr<const SurfacePoints> surfacePoints() const { return extras_ ? extras_->surface : nullptr; }
    // Distinct observed moderator values, at most kRugPoints of them (evenly
    // spaced ranks of the sorted distinct values, so the rug keeps its shape).
    std::vector<double> rug() const { return extras_ ? extras_->rug : std::vector<double>{}; }
    static constexpr std::size_t kRugPoints = 2000;
    // The Surface plot's data region when the extras hold it (nullptr: compute it).
    const DataRegion* surfaceRegion() const { return extras_ && extras_->region ? &*extras_->region : nullptr; }

    const ScaleRequest& scaleRequest() const { return request_; }

private:
    std::shared_ptr<const ProbeExtras> makeExtras(const std::vector<double>& x, const std::vector<double>& y,
                                                  std::vector<double> moderator, const std::vector<int>& group) const;

    std::shared_ptr<const AnalysisRun> run_;
    Analysis analysis_;
    ScaleRequest request_;
    std::map<std::string, double> held_;
    std::vector<std::string> groupNames_;
    std::vector<double> groupValues_;
    std::pair<double, double> axisRange_{0, 1};
    std::shared_ptr<const ProbeExtras> extras_;
};

// The Effect plot's moderator axis: the observed range with a margin of
// kEffectAxisMargin of its width either side, widened to take in pinned
// values less than half the width outside and, with `extend`, the
// Johnson–Neyman boundaries less than kBoundaryReach widths outside. A
// moderator observed only at 0 or above never gets an axis below 0, whatever
// the margin, pins or boundaries ask.
inline constexpr double kEffectAxisMargin = 0.08;
inline constexpr double kBoundaryReach = 1.0;
std::pair<double, double> effectAxisRange(std::pair<double, double> observed, const std::vector<double>& boundaries,
                                          const std::vector<double>& pinned, bool extend);

// Rows above which a probability-scale effect is recomputed on release
// instead of on every frame of a drag.
inline constexpr std::size_t kLiveProbabilityRows = 50000;

}  // namespace moderato::ui
