#include "probe/probe_engine.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "moderato/support/error.hpp"

namespace moderato::ui {

ProbeEngine::ProbeEngine(std::shared_ptr<const AnalysisRun> run, const Analysis& analysis,
                         std::shared_ptr<const ProbeExtras> extras)
    : run_(std::move(run)), analysis_(analysis), extras_(std::move(extras)) {
    if (!valid()) return;
    const Design& d = run_->design;
    const ProbeResult& p = probe();

    held_ = typical_values(d);
    request_.focal = focal();
    request_.moderator = moderator();
    request_.averaging = p.averaging;
    const std::string& second = analysis_.roles.second_moderator;
    if (!second.empty()) {
        // Its mean (numeric) or reference level (categorical) unless a value is chosen.
        if (!std::isnan(analysis_.probe.second_value)) held_[second] = analysis_.probe.second_value;
        request_.values[second] = held_[second];
    }

    const CategoricalInfo* cat = d.categorical(moderator());
    if (groups()) {
        if (cat) {
            groupNames_ = cat->levels;
            for (std::size_t k = 0; k < cat->levels.size(); ++k) groupValues_.push_back(static_cast<double>(k));
        } else {
            groupNames_ = {"0", "1"};
            groupValues_ = {0.0, 1.0};
        }
    }

    if (!groups()) {
        std::vector<double> pins;
        for (const auto& e : p.effects) pins.push_back(e.moderator_value);
        axisRange_ =
            effectAxisRange(p.observed_range, p.johnson_neyman ? p.johnson_neyman->boundaries : std::vector<double>{},
                            pins, analysis_.probe.extend_to_boundaries);
    } else {
        axisRange_ = {-0.5, static_cast<double>(groupNames_.size()) - 0.5};
    }
}

std::pair<double, double> effectAxisRange(std::pair<double, double> observed, const std::vector<double>& boundaries,
                                          const std::vector<double>& pinned, bool extend) {
    const auto [lo, hi] = observed;
    const double w = hi > lo ? hi - lo : 1.0;
    // A moderator observed only at 0 or above: the axis never shows negative values.
    const double least = lo >= 0 ? 0.0 : -std::numeric_limits<double>::infinity();
    double a = lo - kEffectAxisMargin * w, b = hi + kEffectAxisMargin * w;
    // Pinned values a little outside the data stay in view.
    for (double v : pinned) {
        if (!std::isfinite(v) || v < lo - 0.5 * w || v > hi + 0.5 * w) continue;
        a = std::min(a, v - 0.05 * w);
        b = std::max(b, v + 0.05 * w);
    }
    if (extend)
        for (double v : boundaries) {
            // One the axis may not reach (below the floor) stays a note; the axis does not widen towards it.
            if (!std::isfinite(v) || v < std::max(least, lo - kBoundaryReach * w) || v > hi + kBoundaryReach * w)
                continue;
            a = std::min(a, v - 0.05 * w);
            b = std::max(b, v + 0.05 * w);
        }
    return {std::max(a, least), b};
}

double ProbeEngine::defaultValue() const {
    if (groups()) return 0.0;
    const ProbeResult& p = probe();
    return p.points == ProbePoints::Percentiles ? p.moderator_percentiles[1] : p.moderator_mean;
}

EffectPoint ProbeEngine::effectAt(double m) const {
    const ProbeResult& p = probe();
    if (groups()) {
        const long k = std::lround(m);
        const std::size_t idx = static_cast<std::size_t>(std::clamp(k, 0L, static_cast<long>(p.effects.size()) - 1));
        return p.effects.at(idx);
    }
    if (probability()) {
        EffectPoint e = probability_effect(run_->design, run_->fit, request_, m);
        e.beyond_data = m < p.observed_range.first || m > p.observed_range.second;
        return e;
    }
    return effect_at(p.effect_function, m, run_->fit, p.observed_range);
}

bool ProbeEngine::effectIsCheap() const { return !probability() || run_->design.n() <= kLiveProbabilityRows; }

std::map<std::string, double> ProbeEngine::heldValues(double moderatorValue) const {
    auto v = held_;
    v[moderator()] = moderatorValue;
    return v;
}

std::vector<CurvePoint> ProbeEngine::lineAt(double moderatorValue, int points) const {
    const auto [lo, hi] = focalRange();
    return prediction_line(run_->design, run_->fit, focal(), heldValues(moderatorValue), even_grid(lo, hi, points),
                           probability());
}

std::vector<CurvePoint> ProbeEngine::effectCurve(bool simultaneous, int points) const {
    const ProbeResult& p = probe();
    if (groups()) return {};
    if (probability()) {
        if (run_->design.n() > kLiveProbabilityRows) points = std::min(points, 41);
        std::vector<CurvePoint> out;
        for (double m : even_grid(axisRange_.first, axisRange_.second, points)) {
            const EffectPoint e = probability_effect(run_->design, run_->fit, request_, m);
            out.push_back({m, e.estimate, e.std_error, e.ci_lower, e.ci_upper});
        }
        return out;
    }
    const double q = simultaneous && p.simultaneous ? p.simultaneous->critical_value : p.critical_t;
    return effect_band(p.effect_function, even_grid(axisRange_.first, axisRange_.second, points), q);
}

const SignificanceRegions* ProbeEngine::regions(bool simultaneous) const {
    const ProbeResult& p = probe();
    if (simultaneous && p.simultaneous) return &*p.simultaneous;
    if (p.johnson_neyman) return &*p.johnson_neyman;
    return nullptr;
}

namespace {

// The used rows' focal values, outcome values, moderator values (numeric
// moderator) and group indices (Groups; else 0).
struct RowValues {
    std::vector<double> x, y, moderator;
    std::vector<int> group;
};

}  // namespace

void ProbeEngine::prepareExtras() {
    if (!valid() || extras_) return;
    const Design& d = run_->design;
    const Table& t = *run_->table;
    const Column& focalColumn = t.at(focal());
    const Column& moderatorColumn = t.at(moderator());
    const CategoricalInfo* cat = d.categorical(moderator());
    std::vector<int> codeToGroup;
    if (cat)
        for (const std::string& level : moderatorColumn.levels)
            codeToGroup.push_back(std::max(0, d.level_index(moderator(), level)));
    RowValues v;
    const std::size_t n = d.n();
    v.x.resize(n);
    v.y.resize(n);
    v.group.assign(n, 0);
    if (!cat) v.moderator.resize(n);
    for (std::size_t i = 0; i < n; ++i) {
        const std::size_t r = d.rows[i];
        v.x[i] = focalColumn.numbers[r];
        v.y[i] = d.y[static_cast<Eigen::Index>(i)];
        // On the outcome scale a count model with an exposure draws rates: each row's count per unit of it.
        if (probability() && d.offset.size() > 0) v.y[i] /= std::exp(d.offset[static_cast<Eigen::Index>(i)]);
        if (cat) {
            const int code = moderatorColumn.codes[r];
            v.group[i] = code >= 0 ? codeToGroup[static_cast<std::size_t>(code)] : 0;
        } else {
            v.moderator[i] = moderatorColumn.numbers[r];
            if (groups()) v.group[i] = v.moderator[i] == 1.0 ? 1 : 0;
        }
    }
    extras_ = makeExtras(v.x, v.y, std::move(v.moderator), groups() ? v.group : std::vector<int>{});
}

std::shared_ptr<const ProbeExtras> ProbeEngine::makeExtras(const std::vector<double>& x, const std::vector<double>& y,
                                                           std::vector<double> moderator,
                                                           const std::vector<int>& group) const {
    auto out = std::make_shared<ProbeExtras>();
    out->lines = std::make_shared<const LinesPoints>(makeLinesPoints(x, y, group));
    if (run_->surface) {
        try {
            out->region = data_region(run_->design, run_->surface->x, run_->surface->z);
        } catch (const InputError&) {
            out->region = DataRegion{};
        }
        out->surface = makeSurfacePoints(run_->design, run_->surface->x, run_->surface->z);
    }
    // The rug: distinct moderator values, evenly spaced ranks of them above kRugPoints.
    std::sort(moderator.begin(), moderator.end());
    moderator.erase(std::unique(moderator.begin(), moderator.end()), moderator.end());
    if (moderator.size() <= kRugPoints) {
        out->rug = std::move(moderator);
    } else {
        for (std::size_t k = 0; k < kRugPoints; ++k)
            out->rug.push_back(moderator[k * (moderator.size() - 1) / (kRugPoints - 1)]);
    }
    return out;
}

}  // namespace moderato::ui
