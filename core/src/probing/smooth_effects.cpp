#include "moderato/probing/smooth_effects.hpp"

#include <algorithm>
#include <cmath>

#include "estimation/resampling.hpp"
#include "moderato/estimation/bootstrap.hpp"    // quantile_type7
#include "moderato/probing/binned_effects.hpp"  // ThinRule
#include "moderato/support/error.hpp"
#include "moderato/support/report_text.hpp"
#include "probing/linearity_inputs.hpp"
#include "probing/local_fit.hpp"
#include "support/parallel.hpp"
#include "support/text_util.hpp"

namespace moderato {

using detail::LocalData;
using detail::RowSet;

const char* to_string(BandwidthMethod method) {
    return method == BandwidthMethod::Given ? "given" : "cross-validation";
}

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
const std::string kWhat = "the smooth estimates";

void check_options(const SmoothOptions& o, std::size_t n) {
    if (o.points < 50) throw InputError("the smooth curve needs at least 50 points, got " + std::to_string(o.points));
    if (!std::isnan(o.bandwidth) && !(std::isfinite(o.bandwidth) && o.bandwidth > 0))
        throw InputError("the bandwidth must be a positive number, got " + format_sig(o.bandwidth));
    if (o.folds < 2 || static_cast<std::size_t>(o.folds) > n)
        throw InputError("cross-validation needs from 2 folds to one per row (" + std::to_string(n) + "), got " +
                         std::to_string(o.folds));
    if (o.candidates < 2) throw InputError("cross-validation needs at least 2 candidate bandwidths");
    if (o.replicates != 0 && o.replicates < 100)
        throw InputError("the smooth curve's bootstrap needs at least 100 replicates (or 0 for none), got " +
                         std::to_string(o.replicates));
    if (!(o.level > 0 && o.level < 1)) throw InputError("the level must lie between 0 and 1");
}

std::vector<double> even_grid(double lo, double hi, int points) {
    std::vector<double> g(static_cast<std::size_t>(points));
    for (int k = 0; k < points; ++k) g[static_cast<std::size_t>(k)] = lo + (hi - lo) * k / (points - 1);
    g.back() = hi;
    return g;
}

// Runs fn(i) for i in [0, count) in waves, reporting progress after each.
template <class Fn>
void in_waves(int count, const SmoothOptions& o, int& done, int total, Fn&& fn) {
    const int wave = std::max(8 * static_cast<int>(detail::resolve_threads(o.threads)), 1);
    for (int start = 0; start < count; start += wave) {
        const int len = std::min(wave, count - start);
        detail::parallel_for(static_cast<std::size_t>(len), o.threads,
                             [&](std::size_t i) { fn(start + static_cast<int>(i)); });
        done += len;
        if (o.progress && !o.progress(done, total)) throw Cancelled();
    }
}

// The fold of each row (of each cluster's rows when the model has clusters).
std::vector<int> fold_of(const Design& d, int folds, std::uint64_t seed) {
    const bool clustered = !d.cluster.empty();
    const auto units = static_cast<std::uint64_t>(clustered ? d.n_clusters : static_cast<int>(d.n()));
    const auto perm = detail::seeded_permutation(units, seed);
    std::vector<int> unit_fold(units);
    for (std::uint64_t k = 0; k < units; ++k)
        unit_fold[perm[k]] = static_cast<int>(k % static_cast<std::uint64_t>(folds));
    std::vector<int> f(d.n());
    for (std::size_t i = 0; i < d.n(); ++i) f[i] = unit_fold[clustered ? static_cast<std::size_t>(d.cluster[i]) : i];
    return f;
}

// Mean squared prediction error of bandwidth h over the folds.
double cv_score(const LocalData& L, const std::vector<double>& grid, double h, const std::vector<int>& fold,
                int folds) {
    double sse = 0;
    std::size_t count = 0;
    for (int f = 0; f < folds; ++f) {
        RowSet train, test;
        for (std::size_t i = 0; i < fold.size(); ++i)
            (fold[i] == f ? test : train).add(static_cast<Eigen::Index>(i), 1.0);
        std::vector<Eigen::VectorXd> fits(grid.size());
        for (std::size_t g = 0; g < grid.size(); ++g) fits[g] = detail::local_fit(L, grid[g], h, train);
        for (Eigen::Index i : test.rows) {
            const double yhat = detail::interpolated_prediction(L, grid, fits, i);
            if (!std::isfinite(yhat)) return kInf;
            sse += (L.y[i] - yhat) * (L.y[i] - yhat);
            ++count;
        }
    }
    return count ? sse / static_cast<double>(count) : kInf;
}

void choose_bandwidth(const Design& d, const LocalData& L, const std::vector<double>& grid, double sd,
                      const SmoothOptions& o, int& done, int total, SmoothEffects& r) {
    const auto fold = fold_of(d, o.folds, o.seed);
    const double lo = 0.05 * sd, hi = 3.0 * sd;
    r.scores.resize(static_cast<std::size_t>(o.candidates));
    in_waves(o.candidates, o, done, total, [&](int k) {
        const double h = lo * std::pow(hi / lo, static_cast<double>(k) / (o.candidates - 1));
        r.scores[static_cast<std::size_t>(k)] = {h, cv_score(L, grid, h, fold, o.folds)};
    });
    const auto best =
        std::min_element(r.scores.begin(), r.scores.end(),
                         [](const BandwidthScore& a, const BandwidthScore& b) { return a.score < b.score; });
    if (!std::isfinite(best->score))
        throw InputError("no candidate bandwidth gives a usable smooth curve on every fold (too few rows across " +
                         detail::quoted(r.moderator) + "); give a bandwidth");
    r.bandwidth = best->bandwidth;
    r.method = BandwidthMethod::CrossValidation;
    r.folds = o.folds;
    if (best == r.scores.end() - 1)
        r.notes.push_back("The chosen bandwidth is the largest tried: the smooth curve is close to a straight line");
    if (best == r.scores.begin())
        r.notes.push_back("The chosen bandwidth is the smallest tried: the curve may follow noise");
}

// The curve at the bandwidth on the rows (with multiplicities).
std::vector<double> curve(const LocalData& L, const std::vector<double>& grid, double h, const RowSet& rows) {
    std::vector<double> out(grid.size());
    for (std::size_t g = 0; g < grid.size(); ++g) out[g] = detail::local_fit(L, grid[g], h, rows)[1];
    return out;
}

RowSet replicate_rows(const Design& d, const SmoothOptions& o, int r) {
    const bool clustered = !d.cluster.empty();
    const auto units = static_cast<std::uint64_t>(clustered ? d.n_clusters : static_cast<int>(d.n()));
    const auto counts = detail::draw_counts(units, o.seed, static_cast<std::uint64_t>(r));
    RowSet rows;
    for (std::size_t i = 0; i < d.n(); ++i) {
        const int c = counts[clustered ? static_cast<std::size_t>(d.cluster[i]) : i];
        if (c > 0) rows.add(static_cast<Eigen::Index>(i), c);
    }
    return rows;
}

void bootstrap_band(const Design& d, const LocalData& L, const std::vector<double>& grid, const SmoothOptions& o,
                    int& done, int total, SmoothEffects& r) {
    const auto G = grid.size();
    std::vector<std::vector<double>> reps(static_cast<std::size_t>(o.replicates));
    in_waves(o.replicates, o, done, total,
             [&](int k) { reps[static_cast<std::size_t>(k)] = curve(L, grid, r.bandwidth, replicate_rows(d, o, k)); });
    for (const auto& rep : reps)
        if (std::any_of(rep.begin(), rep.end(), [](double v) { return !std::isfinite(v); })) ++r.failed_replicates;
    const double tail = (1.0 - o.level) / 2.0;
    for (std::size_t g = 0; g < G; ++g) {
        std::vector<double> v;
        for (const auto& rep : reps) v.push_back(rep[g]);
        v = detail::sorted_finite(v);
        r.points[g].low = quantile_type7(v, tail);
        r.points[g].high = quantile_type7(v, 1.0 - tail);
    }
    r.notes.push_back("Band: pointwise " + format_sig(100 * o.level) + " % percentile intervals from " +
                      std::to_string(o.replicates) + " bootstrap replicates (" +
                      (d.cluster.empty() ? std::string("rows") : std::string("whole clusters")) +
                      " drawn with replacement, seed " + std::to_string(o.seed) + ")");
}

void describe_support(const LocalData& L, const std::vector<double>& grid, double h, SmoothEffects& r) {
    const double need = 4.0 * ThinRule::rows_per_coefficient, group_need = 2.0 * ThinRule::rows_per_coefficient;
    for (std::size_t g = 0; g < grid.size(); ++g) {
        auto& p = r.points[g];
        const auto e = detail::effective_rows(L, grid[g], h);
        p.effective_rows = e[0];
        p.effective_zero = e[1];
        p.effective_one = e[2];
        p.thin =
            p.effective_rows < need || (r.binary_focal && std::min(p.effective_zero, p.effective_one) < group_need);
    }
}

void add_cautions(SmoothEffects& r) {
    std::vector<std::string> stretches;
    for (std::size_t g = 0; g < r.points.size();) {
        if (!r.points[g].thin) {
            ++g;
            continue;
        }
        std::size_t e = g;
        while (e + 1 < r.points.size() && r.points[e + 1].thin) ++e;
        stretches.push_back(format_range(r.points[g].moderator_value, r.points[e].moderator_value));
        g = e + 1;
    }
    if (!stretches.empty())
        r.cautions.push_back("The smooth curve rests on few rows where " + r.moderator + " is " +
                             detail::join_and(stretches) + " (fewer than 40 effective rows" +
                             (r.binary_focal ? " or 20 in either group of " + r.focal : std::string()) +
                             ": the rule of at least 10 rows per local coefficient); read it there with care");
    if (r.replicates > 0)
        r.cautions.push_back("The band holds at each value of " + r.moderator +
                             " separately, not for the whole curve at once");
    if (r.family == Family::Logistic) r.notes.push_back("Smooth effects are on the model (log-odds) scale");
}

}  // namespace

SmoothEffects smooth_effects(const Design& d, const FitResult& fit, const std::string& focal,
                             const std::string& moderator, const SmoothOptions& o) {
    const auto in = detail::linearity_inputs(d, fit, focal, moderator, kWhat);
    check_options(o, d.n());
    const LocalData L = detail::local_data(d, in, fit.family == Family::Logistic);
    SmoothEffects r;
    r.focal = focal;
    r.moderator = moderator;
    r.family = fit.family;
    r.binary_focal = in.binary_focal;
    r.seed = o.seed;
    r.replicates = o.replicates;
    r.level = o.level;
    const auto grid = even_grid(in.moderator.minCoeff(), in.moderator.maxCoeff(), o.points);
    const bool cv = std::isnan(o.bandwidth);
    int done = 0;
    const int total = (cv ? o.candidates : 0) + 1 + o.replicates;
    if (cv) choose_bandwidth(d, L, grid, in.moderator_sd, o, done, total, r);
    else r.bandwidth = o.bandwidth;
    const auto effects = curve(L, grid, r.bandwidth, RowSet::all(d.n()));
    r.points.resize(grid.size());
    for (std::size_t g = 0; g < grid.size(); ++g) r.points[g] = {grid[g], effects[g]};
    ++done;
    if (o.replicates > 0) bootstrap_band(d, L, grid, o, done, total, r);
    describe_support(L, grid, r.bandwidth, r);
    r.notes.insert(r.notes.begin(),
                   "Bandwidth " + format_sig(r.bandwidth) +
                       (cv ? " chosen by " + std::to_string(o.folds) + "-fold cross-validation over " +
                                 std::to_string(o.candidates) + " candidates (seed " + std::to_string(o.seed) + ")"
                           : std::string(" (given)")));
    add_cautions(r);
    return r;
}

}  // namespace moderato
